package transport

import (
	"fmt"
	"math"
)

// FanResult is the outcome of LandauFan.
type FanResult struct {
	Density   Estimate // n = (e/h)·slope, m^-2
	Slope     Estimate // dν/d(1/B) = n h/e, T (the SdH frequency times g_s g_v)
	Intercept Estimate // ν at 1/B → 0: ≈ 0 for a 2D gas with a parabolic band; a Berry phase shifts it (graphene: [src:NOVOSELOV2005])
	Points    int
	Fit       *PolyFit
	Warnings  []Warning
}

// WarnFanIntercept flags a fan whose intercept differs from zero by more than three standard
// uncertainties and by more than 0.25: a misassigned filling factor, or a Berry phase.
const WarnFanIntercept = "fan-intercept"

// LandauFan fits the Landau fan ν = (h n/e)(1/B) + ν₀ to the fields B (T) at which the
// filling factors nu are reached (R_xx minima, or plateau centres), and returns the density
// from the slope (ν = n h/(e B), [src:AFS1982]). sigmaB, if not nil, gives the
// standard uncertainty of each field; it is carried to 1/B as σ/B². Fewer than 3 points,
// mismatched lengths or a non-positive field are errors.
func LandauFan(B, nu, sigmaB []float64) (*FanResult, error) {
	if len(B) != len(nu) || (sigmaB != nil && len(sigmaB) != len(B)) {
		return nil, fmt.Errorf("%w: Landau fan: %d fields, %d filling factors", ErrBadArgument, len(B), len(nu))
	}
	if len(B) < 3 {
		return nil, fmt.Errorf("%w: Landau fan: %d points, need at least 3", ErrTooFewPoints, len(B))
	}
	x := make([]float64, len(B))
	var sig []float64
	for i, b := range B {
		if !(math.Abs(b) > 0) || math.IsInf(b, 0) {
			return nil, fmt.Errorf("%w: Landau fan: field %d is %g T; fields must be non-zero", ErrBadArgument, i+1, b)
		}
		x[i] = 1 / math.Abs(b)
	}
	if sigmaB != nil {
		// ν is exact; the field's uncertainty moves the point along 1/B. Swap the roles for
		// the weights: σ(ν) = slope·σ(1/B), with the slope from an unweighted first pass.
		first, err := FitPoly(x, nu, nil, 1)
		if err != nil {
			return nil, err
		}
		sig = make([]float64, len(B))
		for i, b := range B {
			sig[i] = math.Abs(first.Coef[1]) * sigmaB[i] / (b * b)
			if !(sig[i] > 0) {
				sig = nil
				break
			}
		}
	}
	fit, err := FitPoly(x, nu, sig, 1)
	if err != nil {
		return nil, err
	}
	slope := fit.CoefEstimate(1)
	r := &FanResult{
		Slope:     slope,
		Density:   Estimate{Value: qe / hPl * math.Abs(slope.Value), Uncertainty: qe / hPl * slope.Uncertainty},
		Intercept: fit.CoefEstimate(0),
		Points:    fit.N,
		Fit:       fit,
	}
	if ic := r.Intercept; math.Abs(ic.Value) > 0.25 && math.Abs(ic.Value) > 3*ic.Uncertainty {
		r.Warnings = append(r.Warnings, Warning{Code: WarnFanIntercept,
			Msg: fmt.Sprintf("the fan meets 1/B = 0 at ν = %.2f ± %.2f, not 0: a misassigned filling factor, or a Berry phase", ic.Value, ic.Uncertainty)})
	}
	return r, nil
}
