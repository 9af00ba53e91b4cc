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
	dVol := quantity.Length.Pow(-3)
	return []calc.Func{{Name: "expected_density",
		Doc: "the 2D channel density a self-consistent Schrödinger–Poisson solution of the layer table expects, dark (Si in Al-rich AlGaAs at the DX level, or at `donor_depth`) and illuminated (shallow donors), in the Γ, X and L valleys, with the surface pinned at `barrier` below the conduction band (or a gate at `gate` volts) and the substrate `bottom` = \"semi-insulating\" (E_F pinned `substrate_pin` below the conduction band), \"p-type\" (acceptor `background`) or \"zero-field\"; gives the subbands, the wells (channel, doping wells, parasitic channels) with their electrons, warnings for electrons outside the channel, and the analytic heterojunction estimate where it applies",
		Params: []calc.Param{{Name: "layers"}, {Name: "T", Default: calc.Q(quantity.New(1.5, dTemp)), Dim: dimp(dTemp)},
			{Name: "barrier", Default: calc.Q(quantity.New(band.DefaultPinningEV, eV.D).Scale(eV.Scale)), Dim: dimp(eV.D)},
			{Name: "gate", Default: calc.String("none")},
			{Name: "donor_depth", Default: calc.Q(quantity.New(0, eV.D)), Dim: dimp(eV.D)},
			{Name: "bottom", Default: calc.String("semi-insulating")},
			{Name: "substrate_pin", Default: calc.Q(quantity.New(band.DefaultSubstratePinEV, eV.D).Scale(eV.Scale)), Dim: dimp(eV.D)},
			{Name: "background", Default: calc.Q(quantity.New(0, dVol)), Dim: dimp(dVol)}},
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
			switch b := textOf(a[5]); b {
			case "semi-insulating":
				st.Bottom.Kind = band.BottomPinned
			case "p-type":
				st.Bottom.Kind = band.BottomBulk
			case "zero-field":
				st.Bottom.Kind = band.BottomZeroField
			default:
				return nil, &calc.ArgError{Arg: 5, Err: fmt.Errorf("%w: bottom must be \"semi-insulating\", \"p-type\" or \"zero-field\", found %q", calc.ErrArgument, b)}
			}
			st.Bottom.PinEV = qa(a, 6).Value() / eV.Scale
			st.Bottom.BackgroundM3 = qa(a, 7).Value()
			if st.Bottom.PinEV <= 0 || st.Bottom.BackgroundM3 < 0 {
				return nil, &calc.ArgError{Arg: 6, Err: fmt.Errorf("%w: substrate_pin must be positive and background not negative", calc.ErrArgument)}
			}
			ex, err := band.Expect(st, band.Options{TemperatureK: qa(a, 1).Value(), DonorDepthEV: depth})
			if err != nil {
				var ce *band.ConvergenceError
				if errors.As(err, &ce) {
					return nil, fmt.Errorf("expected_density: %w", err)
				}
				return nil, err
			}
			return bandValue(st, ex), nil
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

// bandValue is the language's view of a solved stack: the dark state's channel is `n`.
func bandValue(st band.Stack, ex *band.Expectation) *calc.AnalysisResult {
	meV := quantity.MustUnit("meV")
	energy := func(ev float64) calc.Value { return calc.Q(quantity.New(ev*meV.Scale*1e3, meV.D)) }
	dens := func(m2 float64) calc.Value { return calc.Q(quantity.New(m2, dDensity)) }
	res := ex.Dark
	var subs calc.List
	for _, s := range res.Subbands {
		subs = append(subs, calc.NewRecord("", "E", energy(s.E), "n", dens(s.N2D), "mean_z", calc.Q(quantity.New(s.MeanZ, quantity.Length)),
			"valley", calc.String(s.Valley), "region", calc.String(res.Regions[s.Region].Kind.String())))
		if len(subs) == 6 {
			break
		}
	}
	var wells calc.List
	for _, g := range res.Regions {
		if g.N2D < 1e4 && g.Kind != band.RegionChannel && g.Kind != band.RegionDopingWell {
			continue
		}
		wells = append(wells, calc.NewRecord("", "name", calc.String(g.Name), "kind", calc.String(g.Kind.String()),
			"from", calc.Q(quantity.New(g.StartM, quantity.Length)), "to", calc.Q(quantity.New(g.EndM, quantity.Length)),
			"n", dens(g.N2D), "n_Gamma", dens(g.ValleyN2D[0]), "n_X", dens(g.ValleyN2D[1]+g.ValleyN2D[2]), "n_L", dens(g.ValleyN2D[3])))
	}
	occ := res.Occupied()
	var freqs calc.List
	for _, i := range occ {
		freqs = append(freqs, calc.Q(quantity.New(res.Subbands[i].SdHFrequency(), dField)))
	}
	r := newResult("expected_density", "n", []string{"occupied", "analytic"},
		"n", dens(res.ChannelN2D),
		"n_dark", dens(res.ChannelN2D),
		"n_illuminated", dens(ex.Illuminated.ChannelN2D),
		"n_total", dens(res.TotalN2D),
		"occupied", calc.String(fmt.Sprintf("%d subband(s) below E_F", len(occ))),
		"subbands", subs,
		"wells", wells,
		"sdh_frequencies", freqs,
		"iterations", num(float64(res.Iterations)),
		"neutrality_error", dens(res.NeutralityError),
	)
	if ch := res.ChannelSubbands(); len(ch) > 0 {
		r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "E0", Value: energy(res.Subbands[ch[0]].E)})
		if len(ch) > 1 {
			r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "subband_separation", Value: energy(res.Subbands[ch[1]].E - res.Subbands[ch[0]].E)})
		}
	}
	r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "profile", Value: profileData(res)})
	r.Detail = &BandDetail{Stack: st, Expectation: ex}
	r.Warnings = append(r.Warnings, ex.Warnings...)
	if ex.AnalyticNote != "" {
		r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "analytic", Value: calc.String("analytic: not applicable (" + ex.AnalyticNote + ")")})
		return r
	}
	an := ex.Analytic
	r.Rec.Fields = append(r.Rec.Fields, calc.RecordField{Name: "analytic", Value: dens(an.N2D)})
	// The analytic estimate assumes a heterojunction; when it asks for more electrons than
	// the stack has donors, it does not describe this stack.
	if nd := donorSheet(st); an.N2D > nd {
		r.Warnings = append(r.Warnings, fmt.Sprintf("the analytic estimate %.3g cm^-2 exceeds the %.3g cm^-2 donors of the stack: its model does not apply here",
			an.N2D*1e-4, nd*1e-4))
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
