package compute

import (
	"errors"
	"fmt"
	"strings"

	"cleave/calc"
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
	if k := notebook.Kind(name); k.Known() {
		if a, ok := r.v.nearest(r.e, k); ok {
			// Records are never changed once made, so the files of a run share them.
			return r.v.run.shared(a.Path+"\x00"+name, func() calc.Value { return entryRecord(a, name) })
		}
		return nil
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
	// The device counts only through its as-built map: devices without one share the
	// geometry their mask draws (built once per run).
	key := "geometry\x00"
	if hasDev && src.asBuilt != nil {
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
	for _, f := range []string{"shape", "width", "length", "probes", "sections", "contacts", "inner_radius", "outer_radius"} {
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

// register adds the entry-bound functions to env.
func (r *resolver) register(env *calc.Env) {
	env.Register(calc.Func{
		Name:   "scorecard",
		Doc:    "what the cooldowns below this entry measured: density (the first of the names in `density` a cooldown defines) and mobility, dark and illuminated, with their temperatures",
		Params: []calc.Param{{Name: "density", Default: calc.String("n_SdH|n_H")}, {Name: "mobility", Default: calc.String("mu")}},
		Call: func(e *calc.Env, args []calc.Value) (calc.Value, error) {
			return r.scorecard(e, calc.NameText(args[0]), calc.NameText(args[1]))
		},
	})
	env.Register(calc.Func{
		Name:   "entry",
		Doc:    "the front matter of the entry with this id (a wafer's with its layers), as a record: calibration wafers for cell_calibration, a mask outside the lineage",
		Params: []calc.Param{{Name: "id"}},
		Call: func(_ *calc.Env, args []calc.Value) (calc.Value, error) {
			id := strings.TrimSpace(calc.NameText(args[0]))
			en, ok := r.v.entry(id) // recorded: which file holds id, and that file's text
			if !ok {
				return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: no entry has id %q", calc.ErrArgument, id)}
			}
			return entryRecord(en, string(en.Kind)), nil
		},
	})
}
