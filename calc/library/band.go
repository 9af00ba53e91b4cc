package library

import (
	"errors"
	"fmt"
	"strings"

	"cleave/calc"
	"cleave/calc/band"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// bandFuncs wire the one-dimensional Schrödinger–Poisson solver of calc/band into the
// language: expected_density(wafer.layers) solves a wafer's layer table and returns the
// density it expects, with the subbands, the band profile and the analytic heterojunction
// estimate beside it.
func bandFuncs() []calc.Func {
	eV := quantity.MustUnit("eV")
	return []calc.Func{{Name: "expected_density",
		Doc: "the 2D density a self-consistent Schrödinger–Poisson solution of the layer table expects (surface pinned at `barrier` below the conduction band, or a gate at `gate` volts; donors shallow and hydrogenic unless `donor_depth` gives an effective deep level such as a DX centre), with the subbands and the analytic heterojunction estimate",
		Params: []calc.Param{{Name: "layers"}, {Name: "T", Default: calc.Q(quantity.New(1.5, dTemp)), Dim: dimp(dTemp)},
			{Name: "barrier", Default: calc.Q(quantity.New(band.DefaultPinningEV, eV.D).Scale(eV.Scale)), Dim: dimp(eV.D)},
			{Name: "gate", Default: calc.String("none")},
			{Name: "donor_depth", Default: calc.Q(quantity.New(0, eV.D)), Dim: dimp(eV.D)}},
		Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
			layers, err := stackArg(a, 0)
			if err != nil {
				return nil, err
			}
			st := band.Stack{Layers: layers}
			st.Surface.BarrierEV = qa(a, 2).Value() / eV.Scale
			if g, ok := a[3].(calc.Quantity); ok {
				if g.Q.Dim() != dVolt {
					return nil, &calc.ArgError{Arg: 3, Err: fmt.Errorf("%w: gate must be a voltage, found %s", calc.ErrArgument, g.Q.Dim())}
				}
				st.Surface.Kind = band.SurfaceGate
				st.Surface.BarrierEV = 0 // the Schottky default of a gate
				if a[2] != nil && qa(a, 2).Value()/eV.Scale != band.DefaultPinningEV {
					st.Surface.BarrierEV = qa(a, 2).Value() / eV.Scale
				}
				st.Surface.GateV = g.Q.Value()
			}
			depth := qa(a, 4).Value() / eV.Scale
			if depth < 0 {
				return nil, &calc.ArgError{Arg: 4, Err: fmt.Errorf("%w: donor_depth must be positive (an energy below the conduction band)", calc.ErrArgument)}
			}
			res, err := band.Solve(st, band.Options{TemperatureK: qa(a, 1).Value(), DonorDepthEV: depth})
			if err != nil {
				var ce *band.ConvergenceError
				if errors.As(err, &ce) {
					return nil, fmt.Errorf("expected_density: %w", err)
				}
				return nil, err
			}
			return bandValue(st, res, depth), nil
		}}}
}

// stackArg reads a layer table: a list of records with material, thickness and doping (the
// notebook gives a wafer's table as wafer.layers), surface first.
func stackArg(args []calc.Value, i int) ([]band.Layer, error) {
	l, ok := args[i].(calc.List)
	if !ok || len(l) == 0 {
		return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a layer table such as wafer.layers (a list of rows with material, thickness, doping)", calc.ErrArgument)}
	}
	var out []band.Layer
	for k, it := range l {
		f, ok := it.(calc.Fielder)
		if !ok {
			return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: layer %d: expected a row with material, thickness, doping, found %s", calc.ErrArgument, k+1, it.Type())}
		}
		var lay band.Layer
		if v, ok := f.Field("layer"); ok {
			lay.Name = textOf(v)
		}
		mv, ok := f.Field("material")
		if !ok || textOf(mv) == "" {
			return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: layer %d has no material", calc.ErrArgument, k+1)}
		}
		lay.Material = textOf(mv)
		tv, ok := f.Field("thickness")
		if !ok {
			return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: layer %d (%s) has no thickness", calc.ErrArgument, k+1, lay.Material)}
		}
		switch t := tv.(type) {
		case calc.Quantity:
			if t.Q.Dim() != quantity.Length {
				return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: layer %d thickness must be a length, found %s", calc.ErrArgument, k+1, t.Q.Dim())}
			}
			lay.ThicknessM = t.Q.Value()
		default:
			th, err := band.ParseThickness(textOf(tv))
			if err != nil {
				return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("layer %d: %w", k+1, err)}
			}
			lay.ThicknessM = th
		}
		if dv, ok := f.Field("doping"); ok {
			d, err := band.ParseDoping(textOf(dv))
			if err != nil {
				return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("layer %d: %w", k+1, err)}
			}
			lay.Doping = d
		}
		out = append(out, lay)
	}
	return out, nil
}

// textOf is the text of a string value, or the display of any other.
func textOf(v calc.Value) string {
	if s, ok := v.(calc.String); ok {
		return strings.TrimSpace(string(s))
	}
	return calc.Display(v)
}

// bandValue is the language's view of a solved stack.
func bandValue(st band.Stack, res *band.Solution, donorDepthEV float64) *calc.AnalysisResult {
	meV := quantity.MustUnit("meV")
	var subs calc.List
	occupied := 0
	for _, s := range res.Subbands {
		if s.E < 0 { // below the Fermi level; thermal tails above it do not count
			occupied++
		}
		subs = append(subs, calc.NewRecord("", "E", calc.Q(quantity.New(s.E*meV.Scale*1e3, meV.D)), "n", calc.Q(quantity.New(s.N2D, dDensity)),
			"mean_z", calc.Q(quantity.New(s.MeanZ, quantity.Length))))
		if len(subs) == 4 {
			break
		}
	}
	var wells calc.List
	for _, w := range res.Density2D {
		wells = append(wells, calc.NewRecord("", "from", calc.Q(quantity.New(w.StartM, quantity.Length)), "to", calc.Q(quantity.New(w.EndM, quantity.Length)),
			"n", calc.Q(quantity.New(w.N2D, dDensity))))
	}
	r := newResult("expected_density", "n", []string{"occupied", "analytic"},
		"n", calc.Q(quantity.New(res.TotalN2D, dDensity)),
		"occupied", calc.String(fmt.Sprintf("%d subband(s) below E_F", occupied)),
		"subbands", subs,
		"wells", wells,
		"iterations", num(float64(res.Iterations)),
		"neutrality_error", calc.Q(quantity.New(res.NeutralityError, dDensity)),
	)
	if len(res.Subbands) > 0 {
		r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "E0", Value: calc.Q(quantity.New(res.Subbands[0].E*1e3*meV.Scale, meV.D))})
	}
	r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "profile", Value: profileData(res)})
	if in, err := band.AnalyticInputFor(st, donorDepthEV); err == nil {
		if an, err := band.Analytic(in); err == nil {
			r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "analytic", Value: calc.Q(quantity.New(an.N2D, dDensity))})
			// The analytic estimate assumes a doped layer thick enough to supply any density
			// and no surface; when it asks for more electrons than the stack has donors,
			// it does not describe this stack.
			if nd := donorSheet(st); an.N2D > nd {
				r.Warnings = append(r.Warnings, fmt.Sprintf("the analytic estimate %.3g cm^-2 exceeds the %.3g cm^-2 donors of the stack: its thick-doped-layer, no-surface model does not apply here",
					an.N2D*1e-4, nd*1e-4))
			}
		}
	}
	return r
}

// donorSheet is the stack's donors per area, m^-2: sheet densities plus bulk densities times
// their layer thickness.
func donorSheet(st band.Stack) float64 {
	total := 0.0
	for _, l := range st.Layers {
		switch {
		case !l.Doping.Donor() || l.Doping.Density <= 0:
		case l.Doping.Sheet:
			total += l.Doping.Density
		default:
			total += l.Doping.Density * l.ThicknessM
		}
	}
	return total
}

// profileData is the solution as a data set a plot can use: depth z, the conduction-band
// edge E_c relative to E_F, the electron density, and |psi|^2 of the lowest subbands (at
// most four), one row per grid node.
func profileData(res *band.Solution) *DataSet {
	eV := quantity.MustUnit("eV")
	ec := make([]float64, len(res.Ec))
	for i, v := range res.Ec {
		ec[i] = v * eV.Scale // SI, J
	}
	ds := &transport.Dataset{Name: "band profile", Columns: []transport.Column{
		{Name: "z", Unit: "nm", Dim: quantity.Length, Values: res.Z},
		{Name: "Ec", Unit: "eV", Dim: eV.D, Values: ec},
		{Name: "n", Unit: "cm^-3", Dim: quantity.Length.Pow(-3), Values: res.N3D},
	}}
	for k, sb := range res.Subbands {
		if k == 4 {
			break
		}
		p2 := make([]float64, len(sb.Psi))
		for i, v := range sb.Psi {
			p2[i] = v * v // m^-1
		}
		ds.Columns = append(ds.Columns, transport.Column{Name: fmt.Sprintf("psi2_%d", k), Unit: "nm^-1", Dim: quantity.Length.Pow(-1), Values: p2})
	}
	return &DataSet{D: ds}
}
