package transport

import (
	"fmt"
	"math"
)

// DingleResult is the outcome of QuantumLifetime.
type DingleResult struct {
	QuantumLifetime   Estimate // τ_q, s
	DingleTemperature Estimate // T_D = ħ/(2π k_B τ_q), K
	QuantumMobility   Estimate // μ_q = e τ_q/m*, m^2/(V s)
	TransportLifetime Estimate // τ_t = μ m*/e, s (zero without WithMobility)
	DingleRatio       Estimate // τ_t/τ_q (zero without WithMobility)
	Slope             Estimate // of the Dingle plot, T (= −π m*/(e τ_q))
	Intercept         Estimate // of the Dingle plot (≈ 0 for a homogeneous sample)
	Fit               *PolyFit // the weighted line through the Dingle plot

	InvB, Y   []float64  // the Dingle plot: 1/B (1/T) and ln[ΔR sinh X/(4 R_0 X)]
	Sigma     []float64  // standard uncertainty of each Y (the fit's weights are 1/Sigma²)
	Extrema   []Extremum // the extrema used
	Frequency float64    // SdH frequency used to place the extrema, T
	FreqFrom  string     // where it came from

	Mass, Density, Temperature float64 // inputs, SI
	XCol, YCol                 string
	BMin, BMax                 float64
	DataHash                   string
	Points                     int
	Method                     string
	Warnings                   []Warning
}

// dingleFloor is a relative uncertainty added in quadrature to each Dingle-plot
// point: the local half-period fits reproduce noise-free amplitudes of the
// model to about ±1 % (an even residual of the background alternates between
// maxima and minima), which would otherwise dominate χ² at high field.
const dingleFloor = 0.01

// MinDingleExtrema is the fewest significant extrema QuantumLifetime accepts.
const MinDingleExtrema = 3

// QuantumLifetime runs the Dingle analysis of R_xx (columns "B" and "Rxx"
// unless WithColumns says otherwise) over bmin ≤ |B| ≤ bmax (T), for effective
// mass mstar (kg), density n (m^-2; used to check the oscillation frequency,
// 0 to skip) and temperature T (K).
//
// Method (the Dingle plot [src:DINGLE1952] as Coleridge, Stoner & Fletcher
// 1989 use it [src:CSF1989]): the smooth background R_0(B) (a polynomial in
// B, degree from WithBackground, as in SdHDensity) is removed; the extrema of
// the oscillatory part ΔR are placed using the SdH frequency of the data
// (SdHDensity; the frequency h n/(2e)/g_v from n when that analysis fails)
// and each is measured by a local least-squares sinusoid over one period
// centred on it. Extrema with |ΔR| < 2σ are dropped. The Dingle plot
//
//	y = ln[|ΔR| sinh X / (4 R_0 X)],  X = 2π² k_B T m*/(ħ e B),
//
// against 1/B is fitted with a straight line weighted by 1/σ_y², σ_y² = (σ_ΔR/ΔR)² + 0.01²
// (the second term is the accuracy of the local fits on noise-free model data);
// τ_q = π m*/(e |slope|). The uncertainty of the slope is that of the weighted
// fit, scaled by sqrt(χ²/DoF) when that exceeds 1. Since ΔR/R_0 is a ratio the
// Hall-bar geometry cancels.
//
// With WithMobility, τ_t = μ m*/e and the Dingle ratio τ_t/τ_q are reported.
// Warnings: an intercept beyond 3σ and beyond ln 2 from 0 (density
// inhomogeneity or a wrong prefactor), an extremum with |ΔR|/R_0 above 0.5 (outside the
// low-field form; see largeAmplitude), τ_t/τ_q < 0.8 (theory allows no less
// than 1/2 [src:DSS1985]; the bound 0.8 is common practice), a data frequency
// more than 5 % from the one of n, dropped extrema.
func QuantumLifetime(d *Dataset, bmin, bmax, mstar, n, T float64, opts ...Option) (*DingleResult, error) {
	o := newOptions(opts)
	switch {
	case !(bmin > 0) || !(bmax > bmin) || math.IsInf(bmax, 0):
		return nil, fmt.Errorf("%s: Dingle analysis: field range %g T to %g T: expected a range lo .. hi with 0 < lo < hi: %w", d.Name, bmin, bmax, ErrBadArgument)
	case !(mstar > 0) || mstar > 1e-28:
		return nil, fmt.Errorf("%s: Dingle analysis: effective mass %g kg: expected a mass in kg such as 0.067 m_e = 6.1e-32 kg: %w", d.Name, mstar, ErrBadArgument)
	case !(T > 0) || math.IsInf(T, 0):
		return nil, fmt.Errorf("%s: Dingle analysis: temperature %g K: expected > 0: %w", d.Name, T, ErrBadArgument)
	case !(n >= 0) || math.IsInf(n, 0):
		return nil, fmt.Errorf("%s: Dingle analysis: density %g m^-2: expected ≥ 0: %w", d.Name, n, ErrBadArgument)
	case !(o.gv > 0):
		return nil, fmt.Errorf("%s: Dingle analysis: valley degeneracy %g: %w", d.Name, o.gv, ErrBadArgument)
	}
	xc, err := column(d, o.field, DimField)
	if err != nil {
		return nil, err
	}
	yc, err := column(d, o.ycol, DimResistance)
	if err != nil {
		return nil, err
	}
	B, R, _ := selectPairs(xc.Values, yc.Values, nil, bmin, bmax)
	if len(B) < 32 {
		return nil, fmt.Errorf("%s: Dingle analysis of %s over %g T ≤ |B| ≤ %g T: %d points; need at least 32: %w",
			d.Name, yc.Name, bmin, bmax, len(B), ErrTooFewPoints)
	}
	od, err := newOscData(B, R, o.bgDeg)
	if err != nil {
		return nil, fmt.Errorf("%s: Dingle background: %w", d.Name, err)
	}
	res := &DingleResult{Mass: mstar, Density: n, Temperature: T, XCol: xc.Name, YCol: yc.Name,
		BMin: bmin, BMax: bmax, DataHash: d.Hash, Points: len(B)}
	hint := 0.0
	if n > 0 {
		hint = SdHFrequency(n, 2, o.gv)
	}
	f, from, err := oscFrequency(d, bmin, bmax, hint, forward(o))
	if err != nil {
		return nil, fmt.Errorf("Dingle analysis: %w", err)
	}
	res.Frequency, res.FreqFrom = f, from
	if hint > 0 && math.Abs(f-hint) > 0.05*hint {
		res.Warnings = append(res.Warnings, Warning{WarnFrequency, fmt.Sprintf(
			"the oscillation frequency %.4g T differs by %.1f %% from h n/(2e g_v) = %.4g T of the given density: parallel conduction, spin splitting or a wrong density?",
			f, 100*(f-hint)/hint, hint)})
	}
	var ys, ss []float64
	dropped := 0
	for _, e := range od.extrema(f) {
		a := math.Abs(e.Value.Value)
		if a < 2*e.Value.Uncertainty || !(e.Background > 0) {
			dropped++
			continue
		}
		x := lkArgument(T, e.B, mstar)
		g := xOverSinh(x)
		if g == 0 {
			dropped++
			continue
		}
		res.Extrema = append(res.Extrema, e)
		res.InvB = append(res.InvB, 1/e.B)
		ys = append(ys, math.Log(a/(4*e.Background*g)))
		ss = append(ss, math.Hypot(e.Value.Uncertainty/a, dingleFloor))
	}
	res.Y, res.Sigma = ys, ss
	if len(ys) < MinDingleExtrema {
		return nil, fmt.Errorf("%s: Dingle analysis of %s over %g–%g T: %d significant extrema (%d dropped); need at least %d: %w",
			d.Name, yc.Name, bmin, bmax, len(ys), dropped, MinDingleExtrema, ErrTooFewPoints)
	}
	fit, err := FitPoly(res.InvB, ys, ss, 1)
	if err != nil {
		return nil, fmt.Errorf("%s: Dingle fit: %w", d.Name, err)
	}
	res.Fit = fit
	scale := 1.0 // FitPoly's covariance is residual-scaled; use the absolute one unless χ²/DoF > 1
	if fit.Sigma > 0 && fit.Sigma < 1 {
		scale = 1 / fit.Sigma
	}
	s, c := fit.CoefEstimate(1), fit.CoefEstimate(0)
	s.Uncertainty *= scale
	c.Uncertainty *= scale
	res.Slope, res.Intercept = s, c
	if !(s.Value < 0) {
		return nil, fmt.Errorf("%s: Dingle analysis of %s: the amplitude does not fall with 1/B (slope %.3g T): no Dingle damping to measure: %w",
			d.Name, yc.Name, s.Value, ErrBadArgument)
	}
	tq := math.Pi * mstar / (qe * -s.Value)
	rel := s.Uncertainty / -s.Value
	res.QuantumLifetime = Estimate{tq, tq * rel}
	td := hbar / (2 * math.Pi * kB * tq)
	res.DingleTemperature = Estimate{td, td * rel}
	mq := qe * tq / mstar
	res.QuantumMobility = Estimate{mq, mq * rel}
	if mu := o.ext.mobility; mu > 0 {
		tt := mu * mstar / qe
		res.TransportLifetime = Estimate{tt, o.ext.mobilitySigma * mstar / qe}
		ratio := tt / tq
		res.DingleRatio = Estimate{ratio, ratio * math.Hypot(o.ext.mobilitySigma/mu, rel)}
		if ratio < 0.8 {
			res.Warnings = append(res.Warnings, Warning{WarnDingleRatio, fmt.Sprintf(
				"τ_t/τ_q = %.3g < 0.8: it needs dominant backscattering, so an analysis error (mass, temperature, mobility, field range) is more likely (common practice)", ratio)})
		}
	}
	if math.Abs(c.Value) > 3*c.Uncertainty && math.Abs(c.Value) > math.Ln2 {
		res.Warnings = append(res.Warnings, Warning{WarnIntercept, fmt.Sprintf(
			"Dingle-plot intercept %.3g ± %.2g is far from 0: density inhomogeneity or a wrong prefactor (mass, temperature)?", c.Value, c.Uncertainty)})
	}
	if w := largeAmplitude(res.Extrema); w != nil {
		res.Warnings = append(res.Warnings, *w)
	}
	if dropped > 0 {
		res.Warnings = append(res.Warnings, Warning{WarnInsignificant, fmt.Sprintf("%d extrema dropped (amplitude below 2σ)", dropped)})
	}
	if len(ys) < 6 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %d extrema in the Dingle plot", len(ys))})
	}
	res.Method = fmt.Sprintf("background polynomial of degree %d in B; extrema placed with f = %.4g T (%s); half-period sinusoid fits; weighted line through ln[ΔR sinh X/(4 R_0 X)] vs 1/B", o.bgDeg, f, from)
	return res, nil
}

// forward rebuilds the options that SdHDensity reads from a parsed set.
func forward(o options) []Option {
	return []Option{WithColumns(o.field, o.ycol), WithValleyDegeneracy(o.gv), WithBackground(o.bgDeg), WithPadding(o.pad)}
}
