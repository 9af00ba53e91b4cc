package library

import (
	"fmt"
	"math"

	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// hallFuncs measure the carrier density: from the Hall slope of a sweep (a linear fit) or
// of a number, from the Shubnikov–de Haas oscillations of a sweep (their frequency in 1/B)
// or the frequency a density gives, from van der Pauw readings at both field polarities,
// and the comparison of the Hall and SdH densities that flags parallel conduction. The
// analyses and their sources are in calc/transport, the closed forms in calc/physics.
func hallFuncs() []calc.Func {
	type q = quantity.Quantity
	return []calc.Func{
		{Name: "hall_density",
			Doc:    "Hall density from a linear fit of R_xy against B over a |B| range: n = 1/(e |slope|); the carriers are the wafer's, checked against the slope's sign read with the cooldown's wiring or convention",
			Params: []calc.Param{{Name: "d"}, {Name: "range"}, {Name: "x", Default: calc.String("B")}, {Name: "y", Default: calc.String("Rxy")}},
			Call: func(e *calc.Env, a []calc.Value) (calc.Value, error) {
				d, lo, hi, err := dataAndRange(a)
				if err != nil {
					return nil, err
				}
				x, _ := strArg(a, 2)
				y, _ := strArg(a, 3)
				h, err := transport.HallDensity(d, x, y, lo, hi, hallOptions(e, y)...)
				if err != nil {
					return nil, err
				}
				return hallValue(h), nil
			}},
		{Name: "sdh_density",
			Doc: "Shubnikov-de Haas density from the Fourier spectrum of R_xx against 1/B over a |B| range: n = gs gv (e/h) f_B; background= is the degree (0-3) of the smooth background removed first",
			Params: []calc.Param{{Name: "d"}, {Name: "range"}, {Name: "gs", Default: num(2)}, {Name: "gv", Default: num(1)}, {Name: "x", Default: calc.String("B")}, {Name: "y", Default: calc.String("Rxx")},
				{Name: "background", Dim: dimp(dNone), Default: num(3)}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				d, lo, hi, err := dataAndRange(a)
				if err != nil {
					return nil, err
				}
				gs, err := intArg(a, 2)
				if err != nil {
					return nil, err
				}
				gv, err := intArg(a, 3)
				if err != nil {
					return nil, err
				}
				x, _ := strArg(a, 4)
				y, _ := strArg(a, 5)
				bg, err := intArg(a, 6)
				if err != nil {
					return nil, err
				}
				if bg < 0 || bg > 3 {
					return nil, &calc.ArgError{Arg: 6, Err: fmt.Errorf("%w: background = %d: the degree of the background polynomial is 0, 1, 2 or 3", calc.ErrArgument, bg)}
				}
				s, err := transport.SdHDensity(d, lo, hi, float64(gs), transport.WithColumns(x, y), transport.WithValleyDegeneracy(float64(gv)), transport.WithBackground(bg))
				if err != nil {
					return nil, err
				}
				return sdhValue(s), nil
			}},
		{Name: "compare_densities",
			Doc:    "Hall against SdH density: flags parallel conduction when they differ by more than twice their combined uncertainty and by more than 5 %",
			Params: []calc.Param{{Name: "hall"}, {Name: "sdh"}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				h, ok1 := a[0].(*calc.AnalysisResult)
				s, ok2 := a[1].(*calc.AnalysisResult)
				if !ok1 || h.Kind != "hall_density" {
					return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: expected the result of hall_density", calc.ErrArgument)}
				}
				if !ok2 || s.Kind != "sdh_density" {
					return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: expected the result of sdh_density", calc.ErrArgument)}
				}
				hr, ok1 := h.Detail.(*transport.HallResult)
				sr, ok2 := s.Detail.(*transport.SdHResult)
				if !ok1 {
					return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: this hall_density result carries no fit", calc.ErrArgument)}
				}
				if !ok2 {
					return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: this sdh_density result carries no spectrum", calc.ErrArgument)}
				}
				c := transport.CompareDensities(hr, sr)
				verdict := "agree"
				if c.Disagree {
					verdict = "disagree: possible parallel conduction or a second subband"
				}
				r := newResult("compare_densities", "relative_difference", []string{"verdict"},
					"relative_difference", num(c.RelDiff),
					"difference", est(c.Diff, dDensity),
					"verdict", calc.String(verdict))
				if c.Warning != nil {
					r.Warnings = append(r.Warnings, c.Warning.Msg)
				}
				return r, nil
			}},
		closedForm("density_from_slope", "n = 1/(e |dR_xy/dB|) from a Hall slope (hall_density fits a data set)", []calc.Param{req("slope", dHallSlope)},
			func(a []calc.Value) (q, error) { return physics.HallDensity(qa(a, 0)) }),
		{Name: "vdp_hall_density",
			Doc:    "van der Pauw Hall density n = 2B/(e |R_13,24(+B) - R_13,24(-B)|) from readings at both field polarities",
			Params: []calc.Param{{Name: "B", Dim: dimp(dField)}, {Name: "R_plus", Dim: dimp(dResistance)}, {Name: "R_minus", Dim: dimp(dResistance)}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				r, err := transport.VdPHallDensityPolarity(math.Abs(qa(a, 0).Value()),
					transport.Estimate{Value: qa(a, 1).Value(), Uncertainty: qa(a, 1).Uncertainty()},
					transport.Estimate{Value: qa(a, 2).Value(), Uncertainty: qa(a, 2).Uncertainty()})
				if err != nil {
					return nil, err
				}
				return newResult("vdp_hall_density", "n", []string{"carriers"}, "n", est(r.Density, dDensity),
					"carriers", calc.String(r.Carriers), "delta_R", est(r.DeltaR, dResistance)), nil
			}},
		closedForm("sdh_frequency", "SdH frequency in 1/B: f_B = h n/(e gs gv)", []calc.Param{req("n", dDensity), opt("gs", 2), opt("gv", 1)},
			func(a []calc.Value) (q, error) {
				gs, gv, err := degeneracies(a, 1)
				if err != nil {
					return q{}, err
				}
				return physics.SdHFrequency(qa(a, 0), gs, gv)
			}),
	}
}

// hallValue is the language's view of a Hall fit.
func hallValue(h *transport.HallResult) *calc.AnalysisResult {
	r := withWarnings(newResult("hall_density", "n", []string{"carriers"},
		"n", est(h.Density, dDensity),
		"carriers", calc.String(h.Carriers),
		"slope", est(h.Slope, dHallSlope),
		"intercept", est(h.Intercept, dResistance),
		"points", num(float64(len(h.B))),
		"range", calc.Range{Lo: quantity.New(h.BMin, dField), Hi: quantity.New(h.BMax, dField)},
		"offset", calc.Q(quantity.New(h.FieldOffset, dField)),
		"measured_carriers", calc.String(h.MeasuredCarriers),
		"convention", calc.String(h.Convention),
		"sweep", calc.String(h.Sweep),
	), h.Warnings)
	r.Detail = h
	return r
}

// sdhValue is the language's view of an SdH analysis.
func sdhValue(s *transport.SdHResult) *calc.AnalysisResult {
	r := withWarnings(newResult("sdh_density", "n", []string{"frequency"},
		"n", est(s.Density, dDensity),
		"frequency", est(s.Frequency, dField),
		"oscillations", num(s.Oscillations),
		"gs", num(s.GS),
		"gv", num(s.GV),
		"points", num(float64(s.Points)),
		"range", calc.Range{Lo: quantity.New(s.BMin, dField), Hi: quantity.New(s.BMax, dField)},
		"offset", calc.Q(quantity.New(s.FieldOffset, dField)),
		"sweep", calc.String(s.Sweep),
	), s.Warnings)
	r.Detail = s
	return r
}
