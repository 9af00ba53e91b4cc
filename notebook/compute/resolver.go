package compute

import (
	"errors"
	"fmt"
	"strings"

	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
	"cleave/notebook"

	"go.yaml.in/yaml/v3"
)

// resolver answers the names of DESIGN's field access for one entry (see the package doc).
type resolver struct {
	v     *view
	e     *notebook.Entry
	depth int // how many scorecards this evaluation is nested in
	memo  map[string]calc.Value
}

func newResolver(v *view, e *notebook.Entry, depth int) *resolver {
	return &resolver{v: v, e: e, depth: depth, memo: map[string]calc.Value{}}
}

// Lookup implements calc.Resolver.
func (r *resolver) Lookup(name string) (calc.Value, bool) {
	if v, ok := r.memo[name]; ok {
		return v, v != nil
	}
	v := r.lookup(name)
	r.memo[name] = v
	return v, v != nil
}

func (r *resolver) lookup(name string) calc.Value {
	if r.e == nil {
		return nil
	}
	if name == "geometry" {
		g, err := r.geometry()
		if err != nil {
			return nil
		}
		return g
	}
	for _, k := range notebook.Kinds() {
		if string(k) == name {
			if a, ok := r.v.nearest(r.e, k); ok {
				// Records are never changed once made, so the files of a run share them.
				return r.v.run.shared(a.Path+"\x00"+name, func() calc.Value { return entryRecord(a, name) })
			}
			return nil
		}
	}
	// The entry's own field by its bare name.
	if n, ok := r.e.Field(name); ok {
		return nodeValue(n, name)
	}
	return nil
}

// geometry is the Hall-bar geometry calculations use: the device's as-built width and
// probes where given, otherwise the mask's drawn ones.
func (r *resolver) geometry() (calc.Value, error) {
	src := geometrySources(r.v, r.e)
	dev, hasDev, mask := src.dev, src.hasDev, src.mask
	if mask == nil && !hasDev {
		return nil, errors.New("geometry: no device or mask in this entry's lineage")
	}
	key := "geometry\x00"
	if hasDev {
		key += dev.Path
	}
	key += "\x00"
	if mask != nil {
		key += mask.Path
	}
	return r.v.run.shared(key, func() calc.Value { return buildGeometry(src) }), nil
}

// buildGeometry makes the geometry record of a device and its mask.
func buildGeometry(src geomSources) calc.Value {
	dev, hasDev, mask := src.dev, src.hasDev, src.mask
	g := &calc.Record{Path: "geometry"}
	pick := func(field string) {
		if hasDev {
			if n, ok := dev.Field("as_built", field); ok {
				g.Fields = append(g.Fields, calc.RecordField{Name: field, Value: nodeValue(n, "device.as_built."+field)})
				return
			}
		}
		if mask != nil {
			if n, ok := mask.Field(field); ok {
				g.Fields = append(g.Fields, calc.RecordField{Name: field, Value: nodeValue(n, "mask."+field)})
			}
		}
	}
	for _, f := range []string{"width", "length", "probes"} {
		pick(f)
	}
	return g
}

// geomSources names the entries the geometry of an entry is read from: the nearest device
// (with its as-built map, nil when it has none) and the mask.
type geomSources struct {
	dev     *notebook.Entry
	hasDev  bool
	asBuilt *yaml.Node
	mask    *notebook.Entry
}

func geometrySources(v *view, e *notebook.Entry) geomSources {
	var g geomSources
	g.dev, g.hasDev = v.nearest(e, notebook.KindDevice)
	if g.hasDev {
		if id, ok := g.dev.Text("mask"); ok && id != "" {
			g.mask, _ = v.entry(id)
		}
		g.asBuilt, _ = g.dev.Field("as_built")
	}
	if g.mask == nil {
		g.mask, _ = v.nearest(e, notebook.KindMask)
	}
	return g
}

// hallBar builds the physics model of the geometry record.
func hallBar(g *calc.Record) (physics.HallBar, error) {
	var hb physics.HallBar
	w, ok := g.Field("width")
	if !ok {
		return hb, errors.New("geometry has no width (set mask.width or device.as_built.width)")
	}
	wq, ok := w.(calc.Quantity)
	if !ok || wq.Q.Dim() != quantity.Length {
		return hb, fmt.Errorf("geometry width: expected a length such as `100 um`, got %s", calc.Display(w))
	}
	hb.Width = wq.Q
	pv, ok := g.Field("probes")
	if !ok {
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
		var p physics.Probe
		if v, ok := rec.Field("name"); ok {
			p.Name = displayName(v)
		}
		if p.Name == "" {
			return hb, fmt.Errorf("probe %d: no name", i+1)
		}
		pos, ok := rec.Field("position")
		pq, isQ := pos.(calc.Quantity)
		if !ok || !isQ || pq.Q.Dim() != quantity.Length {
			return hb, fmt.Errorf("probe %q: position must be a length such as `250 um`", p.Name)
		}
		p.Position = pq.Q
		if v, ok := rec.Field("arm_width"); ok {
			if aq, ok := v.(calc.Quantity); ok && aq.Q.Dim() == quantity.Length {
				p.ArmWidth = aq.Q
			}
		}
		if v, ok := rec.Field("side"); ok {
			p.Side = displayName(v)
		}
		hb.Probes = append(hb.Probes, p)
	}
	return hb, nil
}

// displayName reads a probe name or side written either as text or as a bare number.
func displayName(v calc.Value) string {
	switch x := v.(type) {
	case calc.String:
		return string(x)
	case calc.Quantity:
		if x.Q.Dim().IsDimensionless() {
			return fmt.Sprint(x.Q.Value())
		}
	}
	return calc.Display(v)
}

// register adds the entry-bound functions to env.
func (r *resolver) register(env *calc.Env) {
	env.Register(calc.Func{
		Name:   "squares",
		Doc:    "number of squares between probes a and b of the entry's Hall-bar geometry: centre-to-centre spacing over the channel width (as-built where recorded)",
		Params: []calc.Param{{Name: "a"}, {Name: "b"}},
		Call: func(e *calc.Env, args []calc.Value) (calc.Value, error) {
			hb, err := r.hallBarFor(e)
			if err != nil {
				return nil, err
			}
			a, b := displayName(args[0]), displayName(args[1])
			q, err := hb.Squares(a, b)
			if err != nil {
				return nil, err
			}
			return calc.Q(q), nil
		},
	})
	env.Register(calc.Func{
		Name:   "scorecard",
		Doc:    "what the cooldowns below this entry measured: density (the first of the names in `density` a cooldown defines) and mobility, dark and illuminated, with their temperatures",
		Params: []calc.Param{{Name: "density", Default: calc.String("n_SdH|n_H")}, {Name: "mobility", Default: calc.String("mu")}},
		Call: func(e *calc.Env, args []calc.Value) (calc.Value, error) {
			return r.scorecard(e, displayName(args[0]), displayName(args[1]))
		},
	})
	env.Register(calc.Func{
		Name:   "entry",
		Doc:    "the front matter of the entry with this id (a wafer's with its layers), as a record: calibration wafers for cell_calibration, a mask outside the lineage",
		Params: []calc.Param{{Name: "id"}},
		Call: func(_ *calc.Env, args []calc.Value) (calc.Value, error) {
			id := strings.TrimSpace(displayName(args[0]))
			en, ok := r.v.entry(id) // recorded: which file holds id, and that file's text
			if !ok {
				return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: no entry has id %q", calc.ErrArgument, id)}
			}
			return entryRecord(en, string(en.Kind)), nil
		},
	})
	env.Register(calc.Func{
		Name: "hall_pairs",
		Doc:  "the probe pairs facing each other across the Hall bar",
		Call: func(e *calc.Env, _ []calc.Value) (calc.Value, error) {
			hb, err := r.hallBarFor(e)
			if err != nil {
				return nil, err
			}
			var l calc.List
			for _, p := range hb.HallPairs() {
				l = append(l, calc.List{calc.String(p[0]), calc.String(p[1])})
			}
			return l, nil
		},
	})
}

// hallBarFor resolves the geometry through the environment, so that its fields are
// recorded as dependencies of the line.
func (r *resolver) hallBarFor(e *calc.Env) (physics.HallBar, error) {
	v, err := e.Eval("geometry")
	if err != nil {
		return physics.HallBar{}, errors.New("no Hall-bar geometry: this entry has no device or mask in its lineage")
	}
	g, ok := v.(*calc.Record)
	if !ok {
		return physics.HallBar{}, errors.New("geometry is not a record")
	}
	// Touch the fields through the environment so they count as dependencies.
	for _, f := range []string{"width", "probes"} {
		_, _ = e.Eval("geometry." + f)
	}
	return hallBar(g)
}
