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
		return bad("%q: %v (expected %s with a unit, e.g. `%s`)", v.Value, err, want, f.Example)
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
