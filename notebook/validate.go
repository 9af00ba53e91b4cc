package notebook

import (
	"cleave/calc"
	"cleave/calc/physics"
	"cmp"
	"errors"
	"fmt"
	"io/fs"
	"path"
	"slices"
	"strings"
	"time"

	"cleave/calc/library"
	"cleave/calc/quantity"

	"go.yaml.in/yaml/v3"
)

// Problem is one thing wrong in the notebook, at a file position.
type Problem struct {
	Path      string // slash path relative to the notebook root
	Line, Col int    // 1-based; Col counts characters
	Msg       string
}

// Error formats the problem as path:line:col: message.
func (p Problem) Error() string { return fmt.Sprintf("%s:%d:%d: %s", p.Path, p.Line, p.Col, p.Msg) }

func sortProblems(ps []Problem) {
	slices.SortStableFunc(ps, func(a, b Problem) int {
		return cmp.Or(strings.Compare(a.Path, b.Path), cmp.Compare(a.Line, b.Line), cmp.Compare(a.Col, b.Col), strings.Compare(a.Msg, b.Msg))
	})
}

// Validate returns every problem in the notebook, sorted by path, line and
// column: the load problems (front matter, layer tables) and those found by
// checking entries against [Schema] and each other: duplicate ids, unknown
// kinds, dangling links, links to the wrong kind, cycles in the lineage,
// quantity fields without a unit or of the wrong dimension, bad dates, enums
// and booleans.
func (nb *Notebook) Validate() []Problem {
	ps := slices.Clone(nb.Problems) // each file's own problems, found when it was loaded
	add := func(p string, line, col int, format string, args ...any) {
		ps = append(ps, Problem{Path: p, Line: line, Col: max(col, 1), Msg: fmt.Sprintf(format, args...)})
	}
	// Duplicate ids: each copy names the others.
	for id, es := range nb.dups {
		for _, e := range es {
			var others []string
			for _, o := range es {
				if o != e {
					others = append(others, fmt.Sprintf("%s:%d", o.Path, o.idPos().Line))
				}
			}
			p := e.idPos()
			add(e.Path, p.Line, p.Col, "duplicate id %q: also used in %s", id, strings.Join(others, ", "))
		}
	}
	for _, e := range nb.Entries {
		fields, ok := fullSchemas[e.Kind]
		if !ok {
			continue // an unknown kind: reported with the file's own problems
		}
		for _, l := range e.links() {
			f, _ := lookupField(fields, l.Field)
			t, ok := nb.byID[l.ID]
			switch {
			case !ok:
				add(e.Path, l.Line, l.Col, "%s: no entry has id %q (dangling link; expected a %s)", l.Field, l.ID, orKinds(f.Kinds))
			case !slices.Contains(f.Kinds, t.Kind):
				add(e.Path, l.Line, l.Col, "%s: %q is a %s (%s), expected a %s", l.Field, l.ID, t.Kind, t.Path, orKinds(f.Kinds))
			case t == e:
				add(e.Path, l.Line, l.Col, "%s: an entry cannot link to itself", l.Field)
			}
		}
	}
	for _, e := range nb.Entries {
		if e.Kind == KindCooldown {
			ps = append(ps, nb.checkDataFiles(e)...)
		}
		if e.Kind == KindDevice || e.Kind == KindCooldown {
			ps = append(ps, nb.checkContacts(e)...)
		}
	}
	for _, cyc := range nb.cycles() {
		if len(cyc) == 1 {
			continue // a self-link, reported above
		}
		var ids []string
		for _, c := range cyc {
			ids = append(ids, c.ID)
		}
		ids = append(ids, cyc[0].ID)
		e, next := cyc[0], cyc[1%len(cyc)]
		p := e.metaPos()
		line, col := p.Line, p.Col
		for _, l := range e.links() {
			if l.ID == next.ID {
				line, col = l.Line, l.Col
				break
			}
		}
		add(e.Path, line, col, "lineage cycle: %s (an entry cannot descend from itself)", strings.Join(ids, " → "))
	}
	sortProblems(ps)
	return slices.Compact(ps)
}

// ownProblems checks an entry against its kind's schema: what can be said of it without
// looking at any other file.
func (e *Entry) ownProblems() []Problem {
	var ps []Problem
	add := func(line, col int, format string, args ...any) {
		ps = append(ps, Problem{Path: e.Path, Line: line, Col: max(col, 1), Msg: fmt.Sprintf(format, args...)})
	}
	fields, ok := fullSchemas[e.Kind]
	if !ok {
		n, _ := e.Field("kind")
		l, c := e.Pos(n)
		add(l, c, "unknown kind %q: expected one of %s", e.Kind, kindList())
		return ps
	}
	ps = append(ps, checkFields(e, e.meta, fields, "")...)
	if e.Kind == KindMask {
		ps = append(ps, maskShapeProblems(e)...)
	}
	for _, f := range linkFields(e.Kind) {
		n, ok := e.Field(f.Name)
		if !ok {
			if f.Required {
				if k := metaKey(e, f.Name); k != nil { // written but left empty
					l, c := e.Pos(k)
					add(l, c, "`%s:` is empty: expected the id of a %s (%s)", f.Name, orKinds(f.Kinds), f.Doc)
				} else {
					l, _ := e.Pos(e.meta)
					add(max(l-1, 1), 1, "missing `%s:` (%s: the id of a %s)", f.Name, f.Doc, orKinds(f.Kinds))
				}
			}
			continue
		}
		if f.Type == TypeLink && n.Kind != yaml.ScalarNode {
			l, c := e.Pos(n)
			add(l, c, "%s: expected one id, found a %s", f.Name, nodeKindName(n))
		}
	}
	return ps
}

// idPos is where the entry's id is written.
func (e *Entry) idPos() Pos {
	if e.sum != nil {
		return e.sum.IDPos
	}
	l, c := e.Pos(idNode(e))
	return Pos{l, c}
}

// metaPos is where the entry's front matter starts (its first field).
func (e *Entry) metaPos() Pos {
	if e.sum != nil {
		return e.sum.MetaPos
	}
	l, c := e.Pos(e.meta)
	return Pos{l, c}
}

func idNode(e *Entry) *yaml.Node {
	n, _ := e.Field("id")
	return n
}

func orKinds(ks []Kind) string {
	var s []string
	for _, k := range ks {
		s = append(s, string(k))
	}
	return strings.Join(s, " or ")
}

// checkFields checks the members of mapping m against fields. prefix is the
// dotted path of m ("" at the top).
func checkFields(e *Entry, m *yaml.Node, fields []FieldSpec, prefix string) []Problem {
	var ps []Problem
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := m.Content[i], deref(m.Content[i+1])
		f, ok := lookupField(fields, k.Value)
		if !ok || v == nil || isNull(v) {
			continue // a free field, or left empty
		}
		ps = append(ps, checkValue(e, v, f, prefix+f.Name)...)
	}
	return ps
}

func checkValue(e *Entry, v *yaml.Node, f FieldSpec, name string) []Problem {
	line, col := e.Pos(v)
	bad := func(format string, args ...any) []Problem {
		return []Problem{{Path: e.Path, Line: line, Col: col, Msg: name + ": " + fmt.Sprintf(format, args...)}}
	}
	switch f.Type {
	case TypeText:
		if v.Kind != yaml.ScalarNode {
			return bad("expected text, found a %s", nodeKindName(v))
		}
	case TypeDate:
		if v.Kind != yaml.ScalarNode {
			return bad("expected a date like 2024-03-18, found a %s", nodeKindName(v))
		}
		if !isDate(v.Value) {
			return bad("%q is not a date: expected YYYY-MM-DD, e.g. 2024-03-18", v.Value)
		}
	case TypeBool:
		if v.Kind != yaml.ScalarNode || v.Tag != "!!bool" {
			return bad("expected true or false, found %q", scalarOr(v))
		}
	case TypeEnum:
		if v.Kind != yaml.ScalarNode || !slices.Contains(f.Values, v.Value) {
			if f.Name == "kind" {
				return nil // reported as an unknown kind
			}
			return bad("%q is not allowed: expected one of %s", scalarOr(v), strings.Join(f.Values, ", "))
		}
	case TypeQuantity:
		return checkQuantity(e, v, f, name)
	case TypeLink, TypeLinks:
		if v.Kind == yaml.SequenceNode && f.Type == TypeLinks {
			var ps []Problem
			for _, c := range v.Content {
				c = deref(c)
				if c != nil && c.Kind != yaml.ScalarNode {
					l, cc := e.Pos(c)
					ps = append(ps, Problem{Path: e.Path, Line: l, Col: cc, Msg: fmt.Sprintf("%s: expected an id, found a %s", name, nodeKindName(c))})
				}
			}
			return ps
		}
		if v.Kind == yaml.MappingNode {
			return bad("expected an id, found a map")
		}
	case TypeTextList:
		if v.Kind != yaml.SequenceNode && v.Kind != yaml.ScalarNode {
			return bad("expected a list, found a %s", nodeKindName(v))
		}
	case TypeMap:
		switch {
		case v.Kind == yaml.MappingNode:
			return checkFields(e, v, f.Fields, name+".")
		case v.Kind == yaml.ScalarNode && f.TextOK:
		default:
			return bad("expected a map of %s, found a %s", memberNames(f), nodeKindName(v))
		}
	case TypeList:
		if v.Kind != yaml.SequenceNode {
			return bad("expected a list, found a %s", nodeKindName(v))
		}
		var ps []Problem
		for i, c := range v.Content {
			c = deref(c)
			if c == nil || isNull(c) {
				continue
			}
			if c.Kind != yaml.MappingNode {
				l, cc := e.Pos(c)
				ps = append(ps, Problem{Path: e.Path, Line: l, Col: cc, Msg: fmt.Sprintf("%s[%d]: expected a map of %s, found a %s", name, i, memberNames(f), nodeKindName(c))})
				continue
			}
			ps = append(ps, checkFields(e, c, f.Fields, fmt.Sprintf("%s[%d].", name, i))...)
		}
		return ps
	case TypeMapOrList:
		if v.Kind != yaml.MappingNode && v.Kind != yaml.SequenceNode {
			return bad("expected a map or a list, found a %s", nodeKindName(v))
		}
	case TypeQuantityList:
		if v.Kind != yaml.SequenceNode {
			return bad("expected a list such as %s, found a %s", f.Example, nodeKindName(v))
		}
		item := f
		item.Type, item.Example = TypeQuantity, strings.TrimSuffix(strings.TrimPrefix(strings.SplitN(f.Example, ",", 2)[0], "["), "]")
		var ps []Problem
		for i, c := range v.Content {
			if c = deref(c); c != nil && !isNull(c) {
				ps = append(ps, checkQuantity(e, c, item, fmt.Sprintf("%s[%d]", name, i))...)
			}
		}
		return ps
	case TypeNamedMaps:
		return checkNamedMaps(e, v, f, name)
	case TypeMetalStack:
		if v.Kind != yaml.ScalarNode {
			return bad("expected a metal stack such as \"Ni/AuGe/Ni/Au 5/150/30/100 nm\", found a %s", nodeKindName(v))
		}
		if _, err := physics.ParseStack(v.Value); err != nil {
			var se *physics.StackError
			if errors.As(err, &se) {
				return bad("%s (expected the metals, bottom first, then their thicknesses and one unit: \"Ni/AuGe/Ni/Au 5/150/30/100 nm\")", se.Msg)
			}
			return bad("%v", err)
		}
	}
	return nil
}

// checkNamedMaps checks a mapping of names to maps (the process steps, a mask's TLM
// patterns): each member a map whose fields are f.Fields, plus the fields of its kind's
// variant when f has variants (then `kind` is required and must be one of them).
func checkNamedMaps(e *Entry, v *yaml.Node, f FieldSpec, name string) []Problem {
	line, col := e.Pos(v)
	if v.Kind != yaml.MappingNode {
		return []Problem{{Path: e.Path, Line: line, Col: col, Msg: fmt.Sprintf("%s: expected a map of named entries (name: {fields}), found a %s", name, nodeKindName(v))}}
	}
	var ps []Problem
	for i := 0; i+1 < len(v.Content); i += 2 {
		k, m := v.Content[i], deref(v.Content[i+1])
		member := name + "." + k.Value
		if m == nil || isNull(m) {
			continue
		}
		if m.Kind != yaml.MappingNode {
			l, c := e.Pos(m)
			ps = append(ps, Problem{Path: e.Path, Line: l, Col: c, Msg: fmt.Sprintf("%s: expected a map of %s, found a %s", member, memberNames(f), nodeKindName(m))})
			continue
		}
		fields := f.Fields
		if f.Variants != nil {
			kn := deref(mapValue(m, "kind"))
			switch {
			case kn == nil:
				l, c := e.Pos(k)
				ps = append(ps, Problem{Path: e.Path, Line: l, Col: c, Msg: fmt.Sprintf("%s: missing kind: expected one of %s", member, strings.Join(stepKindNames(), ", "))})
				continue
			case f.Variants[kn.Value] == nil && kn.Kind == yaml.ScalarNode:
				l, c := e.Pos(kn)
				ps = append(ps, Problem{Path: e.Path, Line: l, Col: c, Msg: fmt.Sprintf("%s.kind: %q is not a kind of step: expected one of %s", member, kn.Value, strings.Join(stepKindNames(), ", "))})
				continue
			}
			fields = append(slices.Clone(f.Fields), f.Variants[kn.Value]...)
		}
		ps = append(ps, checkFields(e, m, fields, member+".")...)
	}
	return ps
}

func memberNames(f FieldSpec) string {
	if len(f.Fields) == 0 {
		return "fields"
	}
	var s []string
	for _, m := range f.Fields {
		s = append(s, m.Name)
	}
	return strings.Join(s, ", ")
}

func isDate(s string) bool {
	for _, layout := range []string{"2006-01-02", time.RFC3339, "2006-01-02 15:04", "2006-01-02T15:04", "2006-01-02 15:04:05"} {
		if _, err := time.Parse(layout, s); err == nil {
			return true
		}
	}
	return false
}

func checkQuantity(e *Entry, v *yaml.Node, f FieldSpec, name string) []Problem {
	line, col := e.Pos(v)
	want := dimName(f.Dims[0])
	if len(f.Dims) > 1 {
		var ns []string
		for _, d := range f.Dims {
			ns = append(ns, dimName(d))
		}
		want = strings.Join(ns, " or ")
	}
	bad := func(format string, args ...any) []Problem {
		return []Problem{{Path: e.Path, Line: line, Col: col, Msg: name + ": " + fmt.Sprintf(format, args...)}}
	}
	if v.Kind != yaml.ScalarNode {
		return bad("expected %s with a unit, e.g. `%s`, found a %s", want, f.Example, nodeKindName(v))
	}
	qv, err := quantity.ParseQuantity(v.Value)
	if err != nil {
		return bad("%q: %s (expected %s with a unit, e.g. `%s`)", v.Value, quantity.Reason(err), want, f.Example)
	}
	if slices.Contains(f.Dims, qv.Dim()) {
		return nil
	}
	if qv.Dim().IsDimensionless() {
		return bad("expected %s with a unit, e.g. `%s`", want, f.Example)
	}
	if hint := celsiusHint(qv.Dim(), f.Dims[0]); hint != "" {
		return bad("%q %s", v.Value, hint)
	}
	return bad("%q is %s, expected %s, e.g. `%s`", v.Value, dimName(qv.Dim()), want, f.Example)
}

// metaKey returns the key node of a top-level front-matter field, or nil.
func metaKey(e *Entry, name string) *yaml.Node {
	m := deref(e.Front())
	if m == nil || m.Kind != yaml.MappingNode {
		return nil
	}
	for i := 0; i+1 < len(m.Content); i += 2 {
		if m.Content[i].Value == name {
			return m.Content[i]
		}
	}
	return nil
}

// dataRefs lists the data files a cooldown names in `data:` (items with `file:`, or plain
// paths), with their positions.
func (e *Entry) dataRefs() []DataRef {
	if e.Kind != KindCooldown {
		return nil
	}
	list, ok := e.Field("data")
	if !ok || list.Kind != yaml.SequenceNode {
		return nil
	}
	var out []DataRef
	for _, item := range list.Content {
		var fn *yaml.Node
		switch item.Kind {
		case yaml.MappingNode:
			for i := 0; i+1 < len(item.Content); i += 2 {
				if item.Content[i].Value == "file" {
					fn = item.Content[i+1]
				}
			}
		case yaml.ScalarNode:
			fn = item
		}
		if fn == nil {
			continue
		}
		l, c := e.Pos(fn)
		name := ""
		if fn.Kind == yaml.ScalarNode {
			name = strings.TrimSpace(fn.Value)
		}
		out = append(out, DataRef{Name: name, Line: l, Col: c})
	}
	return out
}

// checkDataFiles reports the data files a cooldown lists that leave the notebook or are not
// regular files in it. Paths are relative to the entry's folder.
func (nb *Notebook) checkDataFiles(e *Entry) []Problem {
	if nb.fsys == nil || e.file == nil {
		return nil
	}
	var ps []Problem
	for _, d := range e.file.data {
		if d.Name == "" {
			ps = append(ps, Problem{Path: e.Path, Line: d.Line, Col: max(d.Col, 1),
				Msg: "data: empty file name: expected a path relative to the entry's folder, such as data/sweep.csv"})
			continue
		}
		// The same rule as data("...") in calc blocks, links included.
		full, real, err := calc.ResolveDataPath(nb.fsys, path.Dir(e.Path), d.Name)
		if err != nil {
			ps = append(ps, Problem{Path: e.Path, Line: d.Line, Col: max(d.Col, 1),
				Msg: fmt.Sprintf("data: %v (paths are relative to %s)", err, path.Dir(e.Path)+"/")})
			continue
		}
		fi, err := fs.Stat(nb.fsys, real)
		switch {
		case err != nil:
			ps = append(ps, Problem{Path: e.Path, Line: d.Line, Col: max(d.Col, 1),
				Msg: fmt.Sprintf("data: file %q not found (looked for %s; paths are relative to the entry's folder)", d.Name, full)})
		case !fi.Mode().IsRegular():
			what := "a special file (a pipe, a device or a socket)"
			if fi.IsDir() {
				what = "a folder"
			}
			ps = append(ps, Problem{Path: e.Path, Line: d.Line, Col: max(d.Col, 1),
				Msg: fmt.Sprintf("data: %s is %s, not a data file", full, what)})
		case fi.Size() > calc.MaxDataBytes:
			ps = append(ps, Problem{Path: e.Path, Line: d.Line, Col: max(d.Col, 1),
				Msg: fmt.Sprintf("data: %s: %v", full, calc.DataSizeError(fi.Size()))})
		}
	}
	return ps
}

// Contacts and device shapes: a device's bonding map and good contacts, and a cooldown's
// wiring, name contacts of the mask; a mask carries what its shape needs.

// contactRoles are the keys of a mask's `contacts` map whose values name contacts (the
// other keys are themselves contact names, with a pad number as value).
var contactRoles = []string{"source", "drain", "inner", "outer", "corners", "gate", "gates", "pads"}

// MaskContacts lists the contact names a mask defines: its probes' names and the names in
// `contacts` (the values of source, drain, inner, outer, corners and gates, the keys of pads,
// the other keys of the map, or the items of a list).
func MaskContacts(m *Entry) []string {
	var names []string
	add := func(n *yaml.Node) {
		n = deref(n)
		if n == nil {
			return
		}
		switch n.Kind {
		case yaml.ScalarNode:
			if v := strings.TrimSpace(n.Value); v != "" && !slices.Contains(names, v) {
				names = append(names, v)
			}
		case yaml.SequenceNode:
			for _, c := range n.Content {
				if c = deref(c); c != nil && c.Kind == yaml.MappingNode {
					if nn := mapValue(c, "name"); nn != nil {
						c = nn
					}
				}
				if c != nil && c.Kind == yaml.ScalarNode && !slices.Contains(names, strings.TrimSpace(c.Value)) {
					names = append(names, strings.TrimSpace(c.Value))
				}
			}
		}
	}
	if ps, ok := m.Field("probes"); ok && ps.Kind == yaml.SequenceNode {
		for _, p := range ps.Content {
			if p = deref(p); p != nil && p.Kind == yaml.MappingNode {
				add(mapValue(p, "name"))
			}
		}
	}
	if c, ok := m.Field("contacts"); ok {
		switch c.Kind {
		case yaml.SequenceNode:
			add(c)
		case yaml.MappingNode:
			for i := 0; i+1 < len(c.Content); i += 2 {
				k, v := c.Content[i].Value, deref(c.Content[i+1])
				switch {
				case k == "pads" && v != nil && v.Kind == yaml.MappingNode:
					for j := 0; j < len(v.Content); j += 2 {
						add(v.Content[j])
					}
				case slices.Contains(contactRoles, k):
					add(v)
				default:
					add(c.Content[i])
				}
			}
		}
	}
	return names
}

// maskShapeProblems checks that a mask carries what its shape needs: a Hall bar a width and
// probes (a mask without a shape that holds only TLM patterns is no Hall bar), an L-shaped bar sections (each with a width and a length) and probes on them, a van
// der Pauw square or cloverleaf its four corner contacts, a Corbino disc both radii.
func maskShapeProblems(e *Entry) []Problem {
	var ps []Problem
	at := func(n *yaml.Node, format string, args ...any) {
		l, c := e.Pos(n)
		if n == nil {
			p := e.idPos()
			l, c = p.Line, p.Col
		}
		ps = append(ps, Problem{Path: e.Path, Line: l, Col: max(c, 1), Msg: fmt.Sprintf(format, args...)})
	}
	shape := "hall-bar"
	sn, hasShape := e.Field("shape")
	if hasShape {
		if sn.Kind != yaml.ScalarNode || !slices.Contains(MaskShapes, sn.Value) {
			return nil // reported by the schema check
		}
		shape = sn.Value
	}
	need := func(field, what string) *yaml.Node {
		n, ok := e.Field(field)
		if !ok {
			at(sn, "a %s mask needs `%s:` (%s)", shape, field, what)
			return nil
		}
		return n
	}
	if _, hasTLM := e.Field("tlm"); !hasShape && hasTLM {
		if _, hasProbes := e.Field("probes"); !hasProbes {
			return nil // a mask of transfer-length patterns only, no Hall bar
		}
	}
	switch shape {
	case "hall-bar":
		need("width", "the channel width, e.g. `100 um`")
		if p := need("probes", "the voltage probes with name, position, arm_width and side"); p != nil && p.Kind == yaml.SequenceNode && len(p.Content) == 0 {
			at(p, "a hall-bar mask needs at least one probe in `probes:`")
		}
	case "L":
		secs := need("sections", "the straight sections from source to drain, each {name, width, length, direction}")
		var names []string
		if secs != nil && secs.Kind == yaml.SequenceNode {
			for i, s := range secs.Content {
				s = deref(s)
				if s == nil || s.Kind != yaml.MappingNode {
					continue // reported by the schema check
				}
				for _, f := range []string{"name", "width", "length"} {
					if mapValue(s, f) == nil {
						at(s, "sections[%d]: an L-shaped bar's section needs `%s:`", i, f)
					}
				}
				if n := mapValue(s, "name"); n != nil {
					names = append(names, n.Value)
				}
			}
			if len(secs.Content) < 2 {
				at(secs, "an L-shaped bar has at least two sections (the arms on either side of the bend)")
			}
		}
		if p := need("probes", "the voltage probes with name, section, position and side"); p != nil && p.Kind == yaml.SequenceNode {
			for i, pr := range p.Content {
				pr = deref(pr)
				if pr == nil || pr.Kind != yaml.MappingNode {
					continue
				}
				s := mapValue(pr, "section")
				switch {
				case s == nil:
					at(pr, "probes[%d]: on an L-shaped bar a probe names its `section:` (one of %s)", i, strings.Join(names, ", "))
				case len(names) > 0 && !slices.Contains(names, s.Value):
					at(s, "probes[%d]: section %q is not one of the mask's sections (%s)", i, s.Value, strings.Join(names, ", "))
				}
			}
		}
	case "van-der-pauw", "cloverleaf":
		c, ok := e.Field("contacts")
		var corners *yaml.Node
		if ok && c.Kind == yaml.MappingNode {
			corners = deref(mapValue(c, "corners"))
		} else if ok && c.Kind == yaml.SequenceNode {
			corners = c
		}
		if corners == nil || corners.Kind != yaml.SequenceNode || len(corners.Content) != 4 {
			n := sn
			if corners != nil {
				n = corners
			}
			at(n, "a %s mask needs its four corner contacts in order around the edge: `contacts: {corners: [\"1\", \"2\", \"3\", \"4\"]}`", shape)
		}
	case "corbino":
		in := need("inner_radius", "the radius of the inner contact's edge, e.g. `100 um`")
		out := need("outer_radius", "the radius of the outer contact's edge, e.g. `500 um`")
		if in != nil && out != nil {
			ri, err1 := e.Quantity("inner_radius")
			ro, err2 := e.Quantity("outer_radius")
			if err1 == nil && err2 == nil && ri.Dim() == ro.Dim() && !(ro.Value() > ri.Value()) {
				at(out, "outer_radius %s must exceed inner_radius %s", out.Value, in.Value)
			}
		}
	}
	return ps
}

// ContactRef is a contact name an entry's front matter uses, with the key it sits under and
// its position.
type ContactRef struct {
	Key, Name string
	Line, Col int
}

// ContactFacts is what the contact checks need of an entry, read once when it is loaded (and
// kept in its summary, so the checks read no file known unchanged): a mask's contact names; a
// device's mask, bonding map and good contacts; a cooldown's wiring.
type ContactFacts struct {
	Mask       []string     // a mask: the contact names it defines (MaskContacts)
	MaskID     string       // a device: its `mask:` id
	Bonding    []ContactRef // a device: pin → contact
	Good       []ContactRef // a device: its good contacts
	GoodListed bool         // a device: good_contacts is a non-empty list
	Wiring     []ContactRef // a cooldown: channel → the entry's text (a pair such as "1 -> 5")
}

// contactFacts reads what the contact checks need from the entry's front matter.
func (e *Entry) contactFacts() *ContactFacts {
	ref := func(key string, n *yaml.Node) ContactRef {
		l, c := e.Pos(n)
		return ContactRef{Key: key, Name: strings.TrimSpace(n.Value), Line: l, Col: c}
	}
	cf := &ContactFacts{}
	switch e.Kind {
	case KindMask:
		cf.Mask = MaskContacts(e)
	case KindDevice:
		cf.MaskID, _ = e.Text("mask")
		if b, ok := e.Field("bonding"); ok && b.Kind == yaml.MappingNode {
			for i := 0; i+1 < len(b.Content); i += 2 {
				if v := deref(b.Content[i+1]); v != nil && v.Kind == yaml.ScalarNode && v.Value != "" {
					cf.Bonding = append(cf.Bonding, ref(b.Content[i].Value, v))
				}
			}
		}
		if g, ok := e.Field("good_contacts"); ok && g.Kind == yaml.SequenceNode {
			cf.GoodListed = len(g.Content) > 0 // an empty list is not recorded yet
			for _, v := range g.Content {
				if v = deref(v); v != nil && v.Kind == yaml.ScalarNode {
					cf.Good = append(cf.Good, ref("", v))
				}
			}
		}
	case KindCooldown:
		if w, ok := e.Field("wiring"); ok && w.Kind == yaml.MappingNode {
			for i := 0; i+1 < len(w.Content); i += 2 {
				if v := deref(w.Content[i+1]); v != nil && v.Kind == yaml.ScalarNode {
					cf.Wiring = append(cf.Wiring, ref(w.Content[i].Value, v))
				}
			}
		}
	default:
		return nil
	}
	return cf
}

// facts are the entry's contact facts (nil for other kinds).
func (e *Entry) facts() *ContactFacts {
	if e.file == nil {
		return nil
	}
	return e.file.contacts
}

// checkContacts reports contacts a device's bonding map or good contacts, or a cooldown's
// wiring, name but its mask does not define, and wired contacts that are not among the
// device's good contacts.
func (nb *Notebook) checkContacts(e *Entry) []Problem {
	var ps []Problem
	at := func(r ContactRef, format string, args ...any) {
		ps = append(ps, Problem{Path: e.Path, Line: r.Line, Col: max(r.Col, 1), Msg: fmt.Sprintf(format, args...)})
	}
	maskOf := func(d *Entry) (*Entry, []string) {
		df := d.facts()
		if df == nil || df.MaskID == "" {
			return nil, nil
		}
		m, ok := nb.Entry(df.MaskID)
		if !ok || m.Kind != KindMask || m.facts() == nil {
			return nil, nil // a dangling link, reported elsewhere
		}
		names := m.facts().Mask
		if len(names) == 0 {
			return nil, nil // a mask that names no contacts: nothing to check against
		}
		return m, names
	}
	ef := e.facts()
	if ef == nil {
		return nil
	}
	switch e.Kind {
	case KindDevice:
		m, names := maskOf(e)
		if m == nil {
			return nil
		}
		for _, r := range ef.Bonding {
			if !slices.Contains(names, r.Name) {
				at(r, "bonding: %s: contact %q is not on mask %s (its contacts: %s)", r.Key, r.Name, m.ID, contactList(names))
			}
		}
		for _, r := range ef.Good {
			if !slices.Contains(names, r.Name) {
				at(r, "good_contacts: %q is not a contact of mask %s (its contacts: %s)", r.Name, m.ID, contactList(names))
			}
		}
	case KindCooldown:
		if len(ef.Wiring) == 0 {
			return nil
		}
		var names, good, devs []string
		anyGood := false
		for _, l := range e.links() {
			if l.Field != "devices" {
				continue
			}
			d, ok := nb.Entry(l.ID)
			if !ok || d.Kind != KindDevice || d.facts() == nil {
				continue
			}
			devs = append(devs, d.ID)
			if _, ns := maskOf(d); ns != nil {
				names = append(names, ns...)
			}
			if d.facts().GoodListed {
				anyGood = true
				for _, g := range d.facts().Good {
					good = append(good, g.Name)
				}
			}
		}
		if len(names) == 0 {
			return nil
		}
		for _, r := range ef.Wiring {
			a, b, ok := parseWiringPair(r.Name)
			if !ok {
				continue
			}
			for _, c := range []string{a, b} {
				switch {
				case !slices.Contains(names, c):
					at(r, "wiring: %s: contact %q is not on the mask of %s (its contacts: %s)", r.Key, c, strings.Join(devs, ", "), contactList(names))
				case anyGood && !slices.Contains(good, c):
					at(r, "wiring: %s: contact %q is not among the good contacts of %s", r.Key, c, strings.Join(devs, ", "))
				}
			}
		}
	}
	return ps
}

// parseWiringPair reads a wiring entry "1 -> 5" or "7 - 3" (the notation of calc's wiring,
// see calc/library.ParsePair); entries whose sides hold blanks (free text) are not pairs.
func parseWiringPair(s string) (string, string, bool) {
	a, b, ok := library.ParsePair(s)
	if !ok || strings.ContainsAny(a, " \t") || strings.ContainsAny(b, " \t") {
		return "", "", false
	}
	return a, b, true
}

// contactList shows contact names sorted, once each.
func contactList(names []string) string {
	return strings.Join(slices.Compact(slices.Sorted(slices.Values(names))), ", ")
}
