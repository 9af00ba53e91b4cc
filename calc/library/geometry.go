package library

import (
	"errors"
	"fmt"
	"strings"

	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// geometryFuncs are the device-geometry functions: squares between probes (along the
// current's path on an L-shaped bar; the geometric factor of a Corbino disc), the Hall pairs,
// the van der Pauw configurations in the mask's contact names, and the Corbino closed forms.
// They read the entry's `geometry` (the device's as-built values over its mask's, provided by
// the notebook) through the Env, so its fields are dependencies of the line.
func geometryFuncs() []calc.Func {
	type q = quantity.Quantity
	return []calc.Func{
		{Name: "squares",
			Doc:    "the number of squares between probes a and b of the entry's Hall bar, along the current's path (each section's length over its width on an L-shaped bar; as-built where recorded); on a Corbino disc, without arguments, ln(r_out/r_in)/(2 pi)",
			Params: []calc.Param{{Name: "a", Default: calc.String("")}, {Name: "b", Default: calc.String("")}},
			Call: func(e *calc.Env, args []calc.Value) (calc.Value, error) {
				g, err := geometryOf(e)
				if err != nil {
					return nil, err
				}
				a, b := nameArg(args[0]), nameArg(args[1])
				if g.shape == ShapeCorbino {
					if a != "" || b != "" {
						return nil, fmt.Errorf("%w: a Corbino disc has no probes: squares() without arguments is ln(r_out/r_in)/(2 pi)", calc.ErrArgument)
					}
					sq, err := physics.CorbinoSquares(g.rIn, g.rOut)
					return calc.Q(sq), err
				}
				if a == "" || b == "" {
					return nil, fmt.Errorf("%w: squares(a, b) needs two probe names of the %s", calc.ErrArgument, g.shape)
				}
				hb, err := g.hallBar()
				if err != nil {
					return nil, err
				}
				sq, err := hb.Squares(a, b)
				if err != nil {
					return nil, err
				}
				return calc.Q(sq), nil
			}},
		{Name: "hall_pairs",
			Doc: "the probe pairs facing each other across the Hall bar (on each section of an L-shaped bar)",
			Call: func(e *calc.Env, _ []calc.Value) (calc.Value, error) {
				g, err := geometryOf(e)
				if err != nil {
					return nil, err
				}
				hb, err := g.hallBar()
				if err != nil {
					return nil, err
				}
				var l calc.List
				for _, p := range hb.HallPairs() {
					l = append(l, calc.List{calc.String(p[0]), calc.String(p[1])})
				}
				return l, nil
			}},
		{Name: "vdp_contacts",
			Doc: "the van der Pauw configurations of the entry's square or cloverleaf in its mask's contact names (corners in order around the edge): R_A, R_B, their reciprocals and the Hall configuration",
			Call: func(e *calc.Env, _ []calc.Value) (calc.Value, error) {
				g, err := geometryOf(e)
				if err != nil {
					return nil, err
				}
				if g.shape != ShapeVdP && g.shape != ShapeCloverleaf {
					return nil, fmt.Errorf("%w: vdp_contacts() needs a mask of shape van-der-pauw or cloverleaf, this one is a %s", calc.ErrArgument, g.shape)
				}
				c := g.corners
				cfg := func(a, b, m, n string) calc.String {
					return calc.String(fmt.Sprintf("I %s → %s, V %s − %s", a, b, m, n))
				}
				return calc.NewRecord("",
					"corners", calc.List{calc.String(c[0]), calc.String(c[1]), calc.String(c[2]), calc.String(c[3])},
					"R_A", cfg(c[0], c[1], c[3], c[2]), "R_A_reciprocal", cfg(c[3], c[2], c[0], c[1]),
					"R_B", cfg(c[1], c[2], c[0], c[3]), "R_B_reciprocal", cfg(c[0], c[3], c[1], c[2]),
					"hall", cfg(c[0], c[2], c[1], c[3])), nil
			}},
		closedForm("corbino_sigma", "sheet conductivity of a Corbino disc from its conductance: sigma = G ln(r_out/r_in)/(2 pi)",
			[]calc.Param{req("G", dResistance.Pow(-1)), req("r_in", quantity.Length), req("r_out", quantity.Length)},
			func(a []calc.Value) (q, error) { return physics.CorbinoSigma(qa(a, 0), qa(a, 1), qa(a, 2)) }),
		closedForm("corbino_conductance", "conductance of a Corbino disc of sheet conductivity sigma: G = 2 pi sigma/ln(r_out/r_in)",
			[]calc.Param{req("sigma", dResistance.Pow(-1)), req("r_in", quantity.Length), req("r_out", quantity.Length)},
			func(a []calc.Value) (q, error) { return physics.CorbinoConductance(qa(a, 0), qa(a, 1), qa(a, 2)) }),
	}
}

// Mask shapes (the mask's `shape:` field).
const (
	ShapeHallBar    = "hall-bar"
	ShapeL          = "L"
	ShapeVdP        = "van-der-pauw"
	ShapeCloverleaf = "cloverleaf"
	ShapeCorbino    = "corbino"
)

// Shapes lists the shapes a mask may name.
var Shapes = []string{ShapeHallBar, ShapeL, ShapeVdP, ShapeCloverleaf, ShapeCorbino}

// geom is the entry's geometry record read for one shape.
type geom struct {
	rec       *calc.Record
	shape     string
	corners   []string          // van der Pauw and cloverleaf
	rIn, rOut quantity.Quantity // Corbino
}

// geometryOf reads the entry's `geometry` through the Env.
func geometryOf(e *calc.Env) (*geom, error) {
	v, err := e.Eval("geometry")
	if err != nil {
		return nil, errors.New("no device geometry: this entry has no device or mask in its lineage")
	}
	r, ok := v.(*calc.Record)
	if !ok {
		return nil, errors.New("geometry is not a record")
	}
	g := &geom{rec: r, shape: ShapeHallBar}
	if s := pathText(r, "shape"); s != "" {
		g.shape = s
	}
	switch g.shape {
	case ShapeHallBar, ShapeL:
	case ShapeVdP, ShapeCloverleaf:
		c, err := Corners(pathField(r, "contacts"))
		if err != nil {
			return nil, err
		}
		g.corners = c
	case ShapeCorbino:
		var ok1, ok2 bool
		g.rIn, ok1 = pathQuantity(r, quantity.Length, "inner_radius")
		g.rOut, ok2 = pathQuantity(r, quantity.Length, "outer_radius")
		if !ok1 || !ok2 {
			return nil, errors.New("a Corbino disc needs inner_radius and outer_radius, lengths such as `50 um` (in the mask or the device's as_built)")
		}
	default:
		return nil, fmt.Errorf("geometry shape %q: expected one of %s", g.shape, strings.Join(Shapes, ", "))
	}
	return g, nil
}

// Corners reads the four corner contacts of a van der Pauw square or cloverleaf, in order
// around the edge, from a mask's `contacts`: a list of four names, or a map with `corners:`.
func Corners(v calc.Value) ([]string, error) {
	if r, ok := v.(*calc.Record); ok {
		v, _ = r.Field("corners")
	}
	l, ok := v.(calc.List)
	if !ok || len(l) != 4 {
		return nil, errors.New("a van der Pauw square or cloverleaf needs its four corner contacts in order around the edge: contacts: {corners: [\"1\", \"2\", \"3\", \"4\"]}")
	}
	out := make([]string, 4)
	for i, it := range l {
		out[i] = nameArg(it)
		if out[i] == "" {
			return nil, fmt.Errorf("corner %d has no name", i+1)
		}
	}
	return out, nil
}

// hallBar builds the physics model of a Hall-bar geometry.
func (g *geom) hallBar() (physics.HallBar, error) {
	if g.shape != ShapeHallBar && g.shape != ShapeL {
		return physics.HallBar{}, fmt.Errorf("this geometry is a %s, not a Hall bar: it has no probes along a channel", g.shape)
	}
	return HallBarOf(g.rec)
}

// HallBarOf builds the physics model of a Hall bar from a geometry record: `width` and
// `probes` ({name, position, arm_width, side, section}), `sections` ({name, width, length,
// direction}) for an L-shaped bar, and `contacts` ({source, drain}).
func HallBarOf(g *calc.Record) (physics.HallBar, error) {
	var hb physics.HallBar
	if c, ok := pathField(g, "contacts").(*calc.Record); ok {
		hb.Source, hb.Drain = pathName(c, "source"), pathName(c, "drain")
	}
	if sl, ok := pathField(g, "sections").(calc.List); ok {
		for i, it := range sl {
			r, ok := it.(*calc.Record)
			if !ok {
				return hb, fmt.Errorf("section %d: expected a map with name, width and length", i+1)
			}
			s := physics.Section{Name: pathName(r, "name"), Direction: pathText(r, "direction")}
			var ok1, ok2 bool
			s.Width, ok1 = pathQuantity(r, quantity.Length, "width")
			s.Length, ok2 = pathQuantity(r, quantity.Length, "length")
			if s.Name == "" || !ok1 || !ok2 {
				return hb, fmt.Errorf("section %d: needs a name, a width and a length (lengths such as `50 um`)", i+1)
			}
			hb.Sections = append(hb.Sections, s)
		}
	}
	if len(hb.Sections) == 0 {
		w, ok := pathField(g, "width").(calc.Quantity)
		switch {
		case pathField(g, "width") == nil:
			return hb, errors.New("geometry has no width (set mask.width or device.as_built.width)")
		case !ok || w.Q.Dim() != quantity.Length:
			return hb, fmt.Errorf("geometry width: expected a length such as `100 um`, got %s", calc.Display(pathField(g, "width")))
		}
		hb.Width = w.Q
	}
	pv := pathField(g, "probes")
	if pv == nil {
		return hb, errors.New("geometry has no probes (set mask.probes or device.as_built.probes)")
	}
	list, ok := pv.(calc.List)
	if !ok {
		return hb, errors.New("geometry probes: expected a list of {name, position, arm_width, side}")
	}
	for i, it := range list {
		rec, ok := it.(*calc.Record)
		if !ok {
			return hb, fmt.Errorf("probe %d: expected a map with name and position", i+1)
		}
		p := physics.Probe{Name: pathName(rec, "name"), Side: pathName(rec, "side"), Section: pathName(rec, "section")}
		if p.Name == "" {
			return hb, fmt.Errorf("probe %d: no name", i+1)
		}
		pos, ok := pathQuantity(rec, quantity.Length, "position")
		if !ok {
			return hb, fmt.Errorf("probe %q: position must be a length such as `250 um`", p.Name)
		}
		p.Position = pos
		if aw, ok := pathQuantity(rec, quantity.Length, "arm_width"); ok {
			p.ArmWidth = aw
		}
		hb.Probes = append(hb.Probes, p)
	}
	return hb, nil
}

// nameArg reads a contact or probe name given as text or as a bare number ("2" or 2).
func nameArg(v calc.Value) string { return strings.TrimSpace(calc.NameText(v)) }

// fieldName is a name field of a record, text or a bare number.
func pathName(r *calc.Record, name string) string {
	v := pathField(r, name)
	if v == nil {
		return ""
	}
	return nameArg(v)
}
