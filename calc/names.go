package calc

import (
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"

	"cleave/calc/constants"
	"cleave/calc/materials"
	"cleave/calc/quantity"
)

// lookupName resolves an identifier: variables first, then pi, then constants (CODATA 2018, from
// calc/constants), then materials (calc/materials), then the notebook resolver. A
// variable may therefore shadow a constant (`e = 2` hides the elementary charge for the
// rest of the file), and a notebook field named like a constant is reached through its
// entry (`device.h`).
func (e *Env) lookupName(id *Ident) (Value, error) {
	if v, ok := e.vars[id.Name]; ok {
		return v, nil
	}
	if id.Name == "pi" || id.Name == "π" {
		return num(math.Pi), nil
	}
	if c, ok := constants.Lookup(id.Name); ok {
		return Q(c.Quantity()), nil
	}
	if r, ok := materialRecord(id.Name); ok {
		return r, nil
	}
	if e.resolver != nil {
		if v, ok := e.resolver.Lookup(id.Name); ok {
			if r, ok := v.(*Record); ok && r.Path == "" {
				cp := *r
				cp.Path = id.Name
				v = &cp
			}
			return v, nil
		}
	}
	if ln, ok := e.failed[id.Name]; ok {
		return nil, &Error{Line: id.Pos.Line, Col: id.Pos.Col, Err: ErrUnknownName,
			Msg: "\"" + id.Name + "\" has no value: its definition on line " + strconv.Itoa(ln) + " failed"}
	}
	msg := "unknown name \"" + id.Name + "\""
	if s := nearest(id.Name, e.knownNames()); s != "" {
		msg += " (did you mean " + s + "?)"
	}
	return nil, &Error{Line: id.Pos.Line, Col: id.Pos.Col, Msg: msg, Err: ErrUnknownName}
}

func (e *Env) knownNames() []string {
	names := append([]string(nil), e.order...)
	names = append(names, "pi")
	names = append(names, constants.Symbols()...)
	names = append(names, "GaAs", "AlAs", "InAs", "InSb", "In0.53Ga0.47As", "Si", "Ge", "graphene")
	if n, ok := e.resolver.(Namer); ok && e.resolver != nil {
		names = append(names, n.Names()...)
	}
	return names
}

// MaterialRecord turns a material into a record: name, mstar (a mass, mstar·m_e),
// eps_r, g, gs, gv, vF (m/s), carrier, x, a (the cubic lattice constant at 300 K). Fields that do not apply (NaN or zero in the
// table, such as graphene's mass) are left out.
func MaterialRecord(m materials.Material) *Record {
	r := &Record{Fields: make([]RecordField, 0, 10)} // room for every field
	add := func(n string, v Value) { r.Fields = append(r.Fields, RecordField{n, v}) }
	add("name", String(m.Name))
	if m.Mstar > 0 {
		// an exact multiple of the unit m_e: the table gives no uncertainty for m*/m_e
		add("mstar", Q(quantity.New(m.Mstar*quantity.ElectronMass, quantity.Mass)))
	}
	if !math.IsNaN(m.EpsR) && m.EpsR > 0 {
		add("eps_r", num(m.EpsR))
	}
	if !math.IsNaN(m.G) {
		add("g", num(m.G))
	}
	add("gs", num(float64(m.Gs)))
	add("gv", num(float64(m.Gv)))
	if m.VF > 0 {
		add("vF", Q(quantity.New(m.VF, quantity.Length.Div(quantity.Time))))
	}
	if m.Carrier != "" {
		add("carrier", String(m.Carrier))
	}
	if !math.IsNaN(m.X) {
		add("x", num(m.X))
	}
	if !math.IsNaN(m.A) && m.A > 0 {
		add("a", Q(quantity.New(m.A*1e-10, quantity.Length)))
	}
	return r
}

// materialRecord is the record MaterialRecord makes of the material called name, if there is
// one. The fields of each material's record are made once and shared: a field's value is
// never changed, and each record gets a slice of fields of its own.
func materialRecord(name string) (*Record, bool) {
	materialFields.mu.RLock()
	f, ok := materialFields.m[name]
	materialFields.mu.RUnlock()
	if !ok {
		m, found := materials.Find(name)
		if !found {
			return nil, false
		}
		f = MaterialRecord(m).Fields
		materialFields.mu.Lock()
		if len(materialFields.m) < maxMaterialRecords {
			materialFields.m[strings.Clone(name)] = f
		}
		materialFields.mu.Unlock()
	}
	return &Record{Fields: slices.Clone(f)}, true
}

// materialFields holds the fields of the material records made so far, by the name a line
// wrote (the same name always gives the same material); past maxMaterialRecords names a
// record is made at every lookup.
var materialFields = struct {
	mu sync.RWMutex
	m  map[string][]RecordField
}{m: map[string][]RecordField{}}

const maxMaterialRecords = 1024

// nearest returns the candidate closest to name by edit distance, if it is close enough
// to be a plausible typo.
func nearest(name string, cands []string) string {
	best, bestD := "", -1
	for _, c := range cands {
		if c == name {
			continue
		}
		d := editDistance(strings.ToLower(name), strings.ToLower(c))
		if bestD < 0 || d < bestD || d == bestD && c < best {
			best, bestD = c, d
		}
	}
	limit := 1 + len([]rune(name))/3
	if bestD < 0 || bestD > limit {
		return ""
	}
	return best
}

func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// materialCall reads Si(100) and Ge(holes), material names that look like calls.
func materialCall(n *Call) (Value, bool) {
	if len(n.Args) != 1 || n.Args[0].Name != "" {
		return nil, false
	}
	var inner string
	switch a := n.Args[0].Value.(type) {
	case *NumberLit:
		if a.Unc != "" || a.Unit != "" {
			return nil, false
		}
		inner = a.Text
	case *Ident:
		inner = a.Name
	default:
		return nil, false
	}
	r, ok := materialRecord(n.Func + "(" + inner + ")")
	if !ok {
		return nil, false
	}
	return r, true
}
