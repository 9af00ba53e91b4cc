package transport

import (
	"fmt"
	"math"

	"cleave/calc/constants"
)

var eps0 = constants.Value("eps_0") // vacuum permittivity, F/m (CODATA 2018 via calc/constants)

// ParallelPlateCapacitance returns the geometric gate capacitance per area
// C = ε_r ε_0/d (F/m²) of a gate at distance d (m) from the 2D channel through
// a dielectric of relative permittivity ε_r (Gauss's law; [src:W24]). The
// density then changes by dn/dV_g = C/e.
func ParallelPlateCapacitance(epsR, d float64) float64 { return epsR * eps0 / d }

// GateResult is the outcome of GateCapacitance.
type GateResult struct {
	Capacitance Estimate // C = e|dn/dV_g|, F/m²
	Slope       Estimate // dn/dV_g, m^-2/V (negative for holes under a top gate)
	Threshold   Estimate // V_th, where the fitted line reaches n = 0, V
	Fit         *PolyFit
	Points      int
	Warnings    []Warning
}

// WarnGateCurvature is raised when n(V_g) bends (a significant quadratic term):
// density saturation, a second subband, quantum capacitance or leakage
// (common practice).
const WarnGateCurvature = "gate-curvature"

// GateCapacitance fits n = C(V_g − V_th)/e to densities n (m^-2) measured at
// gate voltages Vg (V) by weighted least squares (sigma: standard
// uncertainties of n, or nil) and returns C per area (F/m²), dn/dV_g and V_th
// with standard uncertainties from the fit covariance; the uncertainty of
// V_th = −a_0/a_1 includes the covariance of the two coefficients:
//
//	σ²(V_th) = [σ²(a_0) − 2 V_th' cov(a_0, a_1) + V_th'² σ²(a_1)]/a_1²,  V_th' = −V_th.
//
// Mismatched lengths, fewer than 3 points or non-finite values are errors.
func GateCapacitance(Vg, n, sigma []float64) (*GateResult, error) {
	if len(Vg) != len(n) || (sigma != nil && len(sigma) != len(n)) {
		return nil, fmt.Errorf("gate capacitance: %d voltages, %d densities, %d uncertainties: %w", len(Vg), len(n), len(sigma), ErrBadArgument)
	}
	for i := range Vg {
		if math.IsNaN(Vg[i]) || math.IsInf(Vg[i], 0) || math.IsNaN(n[i]) || math.IsInf(n[i], 0) {
			return nil, fmt.Errorf("gate capacitance: point %d (V_g = %g V, n = %g m^-2) is not a finite number: %w", i+1, Vg[i], n[i], ErrBadArgument)
		}
	}
	if len(Vg) < 3 {
		return nil, fmt.Errorf("gate capacitance: %d points; need at least 3: %w", len(Vg), ErrTooFewPoints)
	}
	fit, err := FitPoly(Vg, n, sigma, 1)
	if err != nil {
		return nil, fmt.Errorf("gate capacitance: %w", err)
	}
	a0, a1 := fit.Coef[0], fit.Coef[1]
	if a1 == 0 {
		return nil, fmt.Errorf("gate capacitance: the density does not change with V_g: %w", ErrBadArgument)
	}
	res := &GateResult{Fit: fit, Points: fit.N, Slope: fit.CoefEstimate(1)}
	res.Capacitance = Estimate{qe * math.Abs(a1), qe * res.Slope.Uncertainty}
	vth := -a0 / a1
	v := (fit.Cov[0][0] + 2*vth*fit.Cov[0][1] + vth*vth*fit.Cov[1][1]) / (a1 * a1)
	res.Threshold = Estimate{vth, math.Sqrt(math.Max(v, 0))}
	if len(Vg) >= 5 {
		if q, err := FitPoly(Vg, n, sigma, 2); err == nil {
			c := q.CoefEstimate(2)
			lo, hi := math.Inf(1), math.Inf(-1)
			for _, x := range Vg {
				lo, hi = math.Min(lo, x), math.Max(hi, x)
			}
			span := (hi - lo) / 2
			if math.Abs(c.Value) > 3*c.Uncertainty && math.Abs(c.Value)*span*span > 0.02*math.Abs(a1)*2*span {
				res.Warnings = append(res.Warnings, Warning{WarnGateCurvature, fmt.Sprintf(
					"n(V_g) is curved (quadratic term %.3g ± %.2g m^-2/V^2): saturation, a second subband, quantum capacitance or leakage?", c.Value, c.Uncertainty)})
			}
		}
	}
	return res, nil
}

// PowerLawResult is the outcome of MobilityPowerLaw.
type PowerLawResult struct {
	Alpha      Estimate // exponent α of μ ∝ n^α
	Prefactor  Estimate // μ at n = NRef, m^2/(V s)
	NRef       float64  // geometric mean of the densities used, m^-2
	NMin, NMax float64  // range used, m^-2
	Points     int
	Fit        *PolyFit // ln μ against ln(n/NRef)
	Warnings   []Warning
}

// MobilityPowerLaw fits μ = μ_ref (n/n_ref)^α by least squares on ln μ against
// ln(n/n_ref) over nmin ≤ n ≤ nmax (m^-2; nmax may be +Inf) and returns α with
// its standard uncertainty from the fit covariance; n_ref is the geometric
// mean of the densities used, which decorrelates α and μ_ref. The exponent
// is a hint about the dominant scattering, not a verdict [src:DSH2013].
// Fewer than 3 points in range, non-positive values inside it, or mismatched
// lengths are errors.
func MobilityPowerLaw(n, mu []float64, nmin, nmax float64) (*PowerLawResult, error) {
	if len(n) != len(mu) {
		return nil, fmt.Errorf("mobility power law: %d densities but %d mobilities: %w", len(n), len(mu), ErrBadArgument)
	}
	if !(nmin >= 0) || !(nmax > nmin) {
		return nil, fmt.Errorf("mobility power law: density range %g to %g m^-2: expected 0 ≤ nmin < nmax: %w", nmin, nmax, ErrBadArgument)
	}
	var x, y []float64
	res := &PowerLawResult{NMin: nmin, NMax: nmax}
	sl := 0.0
	for i := range n {
		if math.IsNaN(n[i]) || math.IsNaN(mu[i]) || n[i] < nmin || n[i] > nmax {
			continue
		}
		if !(n[i] > 0) || !(mu[i] > 0) || math.IsInf(mu[i], 0) {
			return nil, fmt.Errorf("mobility power law: point %d (n = %g m^-2, μ = %g m^2/(V s)): both must be > 0: %w", i+1, n[i], mu[i], ErrBadArgument)
		}
		x = append(x, math.Log(n[i]))
		y = append(y, math.Log(mu[i]))
		sl += math.Log(n[i])
	}
	if len(x) < 3 {
		return nil, fmt.Errorf("mobility power law: %d points in %g–%g m^-2; need at least 3: %w", len(x), nmin, nmax, ErrTooFewPoints)
	}
	lref := sl / float64(len(x))
	for i := range x {
		x[i] -= lref
	}
	fit, err := FitPoly(x, y, nil, 1)
	if err != nil {
		return nil, fmt.Errorf("mobility power law: %w", err)
	}
	res.Fit, res.Points, res.NRef = fit, len(x), math.Exp(lref)
	res.Alpha = fit.CoefEstimate(1)
	c := fit.CoefEstimate(0)
	res.Prefactor = Estimate{math.Exp(c.Value), math.Exp(c.Value) * c.Uncertainty}
	if len(x) < 5 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %d densities in the fit range", len(x))})
	}
	return res, nil
}
