package library

import (
	"fmt"
	"math"
	"strconv"

	"cleave/calc"
	"cleave/calc/band"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// The fits keep what they fitted in AnalysisResult.Detail, so that a plot can draw the points
// with the fitted curve and `cleave eval --csv` can export them (see [Points]). A fit whose
// transport result does not hold its input points gets a detail type of its own below.

// FanDetail is the Detail of a landau_fan result: the fit and the points it was given.
type FanDetail struct {
	*transport.FanResult
	B, SigmaB, Nu []float64 // fields (T, |B|), their uncertainties (nil when none) and filling factors
}

// GateDetail is the Detail of a gate_capacitance result.
type GateDetail struct {
	*transport.GateResult
	Vg, N, SigmaN []float64 // gate voltages (V), densities (m^-2), their uncertainties (nil when none)
}

// PowerLawDetail is the Detail of a mobility_power_law result.
type PowerLawDetail struct {
	*transport.PowerLawResult
	N, Mu []float64 // densities (m^-2) and mobilities (m^2/(V s)) given, in range or not
}

// BandDetail is the Detail of an expected_density result: the stack solved and both
// solutions.
type BandDetail struct {
	Stack band.Stack
	*band.Expectation
}

// Points is a fit result's points and its fitted curve as a data set (one row per point,
// values in SI, display units in the header), or a data set as it is: what `cleave eval
// --csv` writes and what a plot draws. Values that are neither give an error that says which
// values can be exported.
func Points(v calc.Value) (*transport.Dataset, error) {
	switch x := v.(type) {
	case *DataSet:
		return x.D, nil
	case *calc.AnalysisResult:
		if d := pointsOf(x); d != nil {
			return d, nil
		}
		if p, ok := x.Field("profile"); ok {
			if d, ok := p.(*DataSet); ok {
				return d.D, nil
			}
		}
		return nil, fmt.Errorf("a %s has no points to export (fits export their points and fitted curve; data sets export as they are)", x.Type())
	}
	return nil, fmt.Errorf("--csv needs a data set (data(\"...\"), symmetrize(...), a band profile) or a fit result (hall_density, sdh_density, lk_mass, quantum_lifetime, landau_fan, gate_capacitance, mobility_power_law), found a %s", v.Type())
}

// col is a column of SI values shown in unit u.
func col(name, u string, vals []float64) transport.Column {
	d := dNone
	if u != "" {
		d = quantity.MustUnit(u).D
	}
	return transport.Column{Name: name, Unit: u, Dim: d, Values: vals}
}

func fmtG(x float64) string { return strconv.FormatFloat(x, 'g', 8, 64) }

// pointsOf builds the table of a fit result from its Detail; nil when it has none.
func pointsOf(r *calc.AnalysisResult) *transport.Dataset {
	meta := []transport.KV{{Key: "fit", Value: r.Kind}}
	switch d := r.Detail.(type) {
	case *transport.HallResult:
		fit := make([]float64, len(d.B))
		for i, b := range d.B {
			fit[i] = d.Fit.Eval(b)
		}
		meta = append(meta, transport.KV{Key: "model", Value: "Rxy = intercept + slope*B"},
			transport.KV{Key: "slope", Value: fmtG(d.Slope.Value) + " Ohm/T"}, transport.KV{Key: "intercept", Value: fmtG(d.Intercept.Value) + " Ohm"})
		return &transport.Dataset{Name: "hall_density fit", Meta: meta, Columns: []transport.Column{
			col("B", "T", d.B), col(d.YCol, "Ohm", d.R), col(d.YCol+"_fit", "Ohm", fit)}}
	case *transport.SdHResult:
		meta = append(meta, transport.KV{Key: "f_B", Value: fmtG(d.Frequency.Value) + " T"},
			transport.KV{Key: "peak", Value: fmtG(d.FFTFrequency) + " T"}, transport.KV{Key: "method", Value: d.Method})
		return &transport.Dataset{Name: "sdh_density spectrum", Meta: meta, Columns: []transport.Column{
			col("f", "T", d.Spectrum.Freq), col("amplitude", "Ohm", d.Spectrum.Amp)}}
	case *transport.DingleResult:
		b := make([]float64, len(d.InvB))
		fit := make([]float64, len(d.InvB))
		for i, u := range d.InvB {
			b[i] = 1 / u
			fit[i] = d.Fit.Eval(u)
		}
		sig := d.Sigma
		if len(sig) != len(b) {
			sig = nanSlice(len(b))
		}
		meta = append(meta, transport.KV{Key: "model", Value: "ln[dR sinh(X)/(4 R0 X)] = intercept + slope/B"},
			transport.KV{Key: "slope", Value: fmtG(d.Slope.Value) + " T"}, transport.KV{Key: "intercept", Value: fmtG(d.Intercept.Value)})
		return &transport.Dataset{Name: "quantum_lifetime Dingle plot", Meta: meta, Columns: []transport.Column{
			col("B", "T", b), col("inv_B", "1/T", d.InvB), col("dingle", "", d.Y), col("sigma", "", sig), col("dingle_fit", "", fit)}}
	case *transport.LKResult:
		meta = append(meta, transport.KV{Key: "B", Value: fmtG(d.B) + " T"}, transport.KV{Key: "model", Value: "A = A0 X/sinh(X), X = 2 pi^2 k_B T m/(hbar e B)"})
		sig := d.Sigma
		if len(sig) != len(d.T) {
			sig = nanSlice(len(d.T))
		}
		return &transport.Dataset{Name: "lk_mass fit", Meta: meta, Columns: []transport.Column{
			col("T", "K", d.T), col("A", "", d.A), col("sigma_A", "", sig), col("A_fit", "", d.Fitted)}}
	case *transport.LKSweepsResult:
		meta = append(meta, transport.KV{Key: "model", Value: "|dR| = A0 X/sinh(X) at each extremum, X = 2 pi^2 k_B T m/(hbar e B)"})
		var bs, ts, as, ss, fs []float64
		for _, e := range d.Extrema {
			if e.Fit == nil {
				continue
			}
			for i, t := range e.Fit.T {
				bs = append(bs, e.B)
				ts = append(ts, t)
				as = append(as, e.Fit.A[i])
				if i < len(e.Fit.Sigma) {
					ss = append(ss, e.Fit.Sigma[i])
				} else {
					ss = append(ss, math.NaN())
				}
				fs = append(fs, e.Fit.Fitted[i])
			}
		}
		return &transport.Dataset{Name: "lk_mass fits", Meta: meta, Columns: []transport.Column{
			col("B", "T", bs), col("T", "K", ts), col("A", "Ohm", as), col("sigma_A", "Ohm", ss), col("A_fit", "Ohm", fs)}}
	case *FanDetail:
		inv := make([]float64, len(d.B))
		fit := make([]float64, len(d.B))
		for i, b := range d.B {
			inv[i] = 1 / math.Abs(b)
			fit[i] = d.Fit.Eval(inv[i])
		}
		sig := d.SigmaB
		if len(sig) != len(d.B) {
			sig = nanSlice(len(d.B))
		}
		meta = append(meta, transport.KV{Key: "model", Value: "nu = intercept + slope/B"})
		return &transport.Dataset{Name: "landau_fan fit", Meta: meta, Columns: []transport.Column{
			col("B", "T", d.B), col("sigma_B", "T", sig), col("inv_B", "1/T", inv), col("nu", "", d.Nu), col("nu_fit", "", fit)}}
	case *GateDetail:
		fit := make([]float64, len(d.Vg))
		for i, v := range d.Vg {
			fit[i] = d.Fit.Eval(v)
		}
		sig := d.SigmaN
		if len(sig) != len(d.Vg) {
			sig = nanSlice(len(d.Vg))
		}
		meta = append(meta, transport.KV{Key: "model", Value: "n = C (Vg - Vth)/e"})
		return &transport.Dataset{Name: "gate_capacitance fit", Meta: meta, Columns: []transport.Column{
			col("Vg", "V", d.Vg), col("n", "cm^-2", d.N), col("sigma_n", "cm^-2", sig), col("n_fit", "cm^-2", fit)}}
	case *PowerLawDetail:
		fit := make([]float64, len(d.N))
		for i, n := range d.N {
			fit[i] = d.Prefactor.Value * math.Pow(n/d.NRef, d.Alpha.Value)
		}
		meta = append(meta, transport.KV{Key: "model", Value: "mu = mu_ref (n/n_ref)^alpha"}, transport.KV{Key: "n_ref", Value: fmtG(d.NRef*1e-4) + " cm^-2"})
		return &transport.Dataset{Name: "mobility_power_law fit", Meta: meta, Columns: []transport.Column{
			col("n", "cm^-2", d.N), col("mu", "cm^2/(V s)", d.Mu), col("mu_fit", "cm^2/(V s)", fit)}}
	}
	return nil
}

func nanSlice(n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = math.NaN()
	}
	return s
}
