package transport

import (
	"fmt"
	"math"
)

// Warning codes of the transfer-length fit.
const (
	WarnTLMLinearity = "tlm-linearity" // R_T(d) not a straight line
	WarnTLMIntercept = "tlm-intercept" // non-positive intercept: no contact resistance to extract
)

// TLMFit is the straight line R_T(d) = Intercept + Slope·d through the total resistances
// of a transfer-length pattern against the gaps between its contacts.
type TLMFit struct {
	Intercept Estimate      // Ohm: twice the contact resistance
	Slope     Estimate      // Ohm/m: sheet resistance over the contact width
	Cov       [2][2]float64 // covariance of (Intercept, Slope), SI
	Points    int
	R2        float64 // coefficient of determination of the line
	Fit       *PolyFit
	Warnings  []Warning
}

// FitTLM fits R_T = 2R_c + (R_sh/W)·d to the total resistances R (Ohm) measured across gaps d
// (m) of a transfer-length pattern ([src:BERGER1972], [src:RH1982]) by least squares; sigma, if not nil,
// weights the resistances. The covariance is residual-scaled (see [FitPoly]), so a pattern
// needs at least three gaps, two of them different. Four or more gaps let the fit show
// whether the points lie on a line; fewer give a warning, and so do a coefficient of
// determination below 0.99 (a bad pad, or gaps that differ from the drawn ones; common
// practice) and a non-positive intercept (contacts too good, or too noisy, for these gaps).
func FitTLM(d, R, sigma []float64) (*TLMFit, error) {
	if len(d) != len(R) || (sigma != nil && len(sigma) != len(R)) {
		return nil, fmt.Errorf("TLM: %d gaps and %d resistances: give one resistance per gap: %w", len(d), len(R), ErrBadArgument)
	}
	for i := range d {
		if !(d[i] >= 0) || math.IsInf(d[i], 0) || math.IsNaN(R[i]) || math.IsInf(R[i], 0) {
			return nil, fmt.Errorf("TLM: point %d (gap %g m, R %g Ohm): gaps must be finite and >= 0, resistances finite: %w", i+1, d[i], R[i], ErrBadArgument)
		}
	}
	if len(d) < 3 {
		return nil, fmt.Errorf("TLM: %d gaps; need at least 3: %w", len(d), ErrTooFewPoints)
	}
	fit, err := FitPoly(d, R, sigma, 1)
	if err != nil {
		return nil, fmt.Errorf("TLM: %w", err)
	}
	res := &TLMFit{Fit: fit, Points: fit.N,
		Intercept: fit.CoefEstimate(0), Slope: fit.CoefEstimate(1),
		Cov: [2][2]float64{{fit.Cov[0][0], fit.Cov[0][1]}, {fit.Cov[1][0], fit.Cov[1][1]}}}
	var mean, ssTot, ssRes float64
	for _, r := range R {
		mean += r / float64(len(R))
	}
	for i := range R {
		ssTot += (R[i] - mean) * (R[i] - mean)
		e := R[i] - fit.Eval(d[i])
		ssRes += e * e
	}
	res.R2 = 1
	if ssTot > 0 {
		res.R2 = 1 - ssRes/ssTot
	}
	if res.Slope.Value <= 0 {
		return nil, fmt.Errorf("TLM: the resistance does not grow with the gap (slope %.3g Ohm/um): check that gaps and resistances are in the same order: %w", res.Slope.Value*1e-6, ErrBadArgument)
	}
	if fit.N < 4 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %d gaps: with four or more the fit shows whether the points lie on a line", fit.N)})
	}
	if res.R2 < 0.99 {
		res.Warnings = append(res.Warnings, Warning{WarnTLMLinearity, fmt.Sprintf("R_T(d) is not a straight line (R² = %.4f): a bad contact pad, or gaps that differ from the drawn ones?", res.R2)})
	}
	if res.Intercept.Value <= 0 {
		res.Warnings = append(res.Warnings, Warning{WarnTLMIntercept, fmt.Sprintf("the line meets d = 0 at %.3g Ohm (≤ 0): no contact resistance can be extracted; contacts too good, or too noisy, for these gaps", res.Intercept.Value)})
	}
	return res, nil
}

// ArrheniusFit is y = A exp(−E_a/(k_B T)) fitted as ln y = ln A − (E_a/k_B)(1/T).
type ArrheniusFit struct {
	LnA       Estimate      // ln of the prefactor, in the SI unit of y
	Slope     Estimate      // −E_a/k_B, in K
	Cov       [2][2]float64 // covariance of (LnA, Slope)
	Points    int
	TMin      float64 // K, the coldest and hottest point
	TMax      float64
	ScatterLn float64 // rms residual of ln y (the relative scatter of y)
	Fit       *PolyFit
	Warnings  []Warning
}

// FitArrhenius fits y = A exp(−E_a/(k_B T)) to values y > 0 measured at absolute
// temperatures T > 0 (K), by least squares on ln y against 1/T; sigma, if not nil, gives the
// standard uncertainty of each y and weights the fit by (y/σ)². The flux of an effusion cell,
// and the doping it gives at a fixed growth rate, follow this law in the cell temperature
// over a calibration range (common practice). The covariance is residual-scaled
// ([FitPoly]); at least three points at two or more temperatures are needed.
func FitArrhenius(T, y, sigma []float64) (*ArrheniusFit, error) {
	if len(T) != len(y) || (sigma != nil && len(sigma) != len(y)) {
		return nil, fmt.Errorf("Arrhenius fit: %d temperatures and %d values: %w", len(T), len(y), ErrBadArgument)
	}
	if len(T) < 3 {
		return nil, fmt.Errorf("Arrhenius fit: %d points; need at least 3: %w", len(T), ErrTooFewPoints)
	}
	x := make([]float64, len(T))
	ly := make([]float64, len(T))
	var sl []float64
	if sigma != nil {
		sl = make([]float64, len(T))
	}
	res := &ArrheniusFit{TMin: math.Inf(1), TMax: math.Inf(-1)}
	for i := range T {
		if !(T[i] > 0) || math.IsInf(T[i], 0) || !(y[i] > 0) || math.IsInf(y[i], 0) {
			return nil, fmt.Errorf("Arrhenius fit: point %d (T = %g K, value %g): temperatures and values must be positive and finite: %w", i+1, T[i], y[i], ErrBadArgument)
		}
		x[i], ly[i] = 1/T[i], math.Log(y[i])
		if sl != nil {
			sl[i] = sigma[i] / y[i]
		}
		res.TMin, res.TMax = math.Min(res.TMin, T[i]), math.Max(res.TMax, T[i])
	}
	fit, err := FitPoly(x, ly, sl, 1)
	if err != nil {
		return nil, fmt.Errorf("Arrhenius fit: %w", err)
	}
	res.Fit, res.Points = fit, fit.N
	res.LnA, res.Slope = fit.CoefEstimate(0), fit.CoefEstimate(1)
	res.Cov = [2][2]float64{{fit.Cov[0][0], fit.Cov[0][1]}, {fit.Cov[1][0], fit.Cov[1][1]}}
	var ss float64
	for i := range x {
		e := ly[i] - fit.Eval(x[i])
		ss += e * e
	}
	res.ScatterLn = math.Sqrt(ss / float64(len(x)))
	if fit.N < 4 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %d calibration points: the fit cannot show whether they follow the Arrhenius law", fit.N)})
	}
	return res, nil
}
