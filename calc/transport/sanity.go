package transport

import (
	"fmt"
	"math"
)

// extOptions holds the options of the plateau, Lifshitz–Kosevich, Dingle and
// sanity analyses.
type extOptions struct {
	mobility, mobilitySigma float64 // transport mobility for the Dingle ratio, m^2/(V s)
	massLo, massHi          float64 // expected m*/m_e range; 0 = no check
	density                 float64 // expected density for the filling-factor checks, m^-2
}

// WithMobility gives the transport mobility μ (m^2/(V s)) and its standard
// uncertainty, so that QuantumLifetime reports τ_t = μ m*/e and the Dingle
// ratio τ_t/τ_q.
func WithMobility(mu, sigma float64) Option {
	return func(o *options) { o.ext.mobility, o.ext.mobilitySigma = mu, sigma }
}

// WithExpectedMass sets the plausible range of m*/m_e; the LK analyses warn
// (WarnMass) when the fitted mass lies outside. GaAsMassRange is the range
// for GaAs electrons.
func WithExpectedMass(lo, hi float64) Option {
	return func(o *options) { o.ext.massLo, o.ext.massHi = lo, hi }
}

// WithDensity gives the sheet density (m^-2) that CheckSweep uses to decide
// where the quantum Hall regime begins (ν = n h/(e|B|) ≤ 10).
func WithDensity(n float64) Option { return func(o *options) { o.ext.density = n } }

// GaAsMassRange is the plausible m*/m_e range of a GaAs 2DEG: the band-edge
// value 0.067 raised slightly by nonparabolicity at high density (common
// practice).
var GaAsMassRange = [2]float64{0.055, 0.08}

// More warning codes of the analyses in this package.
const (
	WarnXYAtZero      = "rxy-at-zero"      // R_xy far from 0 at B = 0
	WarnRxxNotZero    = "rxx-min-not-zero" // R_xx minima do not reach 0 in the quantum Hall regime
	WarnPlateauDev    = "plateau-deviation"
	WarnFilling       = "filling-mismatch"
	WarnSaturation    = "lk-saturation"
	WarnMass          = "mass-range"
	WarnDingleRatio   = "dingle-ratio"
	WarnIntercept     = "dingle-intercept"
	WarnFrequency     = "frequency-mismatch"
	WarnInsignificant = "insignificant-extrema"
	WarnReciprocity   = "vdp-reciprocity"
	WarnVdPRatio      = "vdp-ratio"
)

// CheckSweep runs the sanity checks of a raw sweep that do not belong to one
// analysis (field column "B" unless WithField says otherwise; columns "Rxx"
// and "Rxy"; either may be missing, then its checks are skipped):
//
//   - R_xy at B = 0 (ZeroField) beyond 3σ and beyond 1 % of |R_xy| at the
//     largest field: misaligned Hall probes or an offset (common practice);
//   - R_xx minima in the quantum Hall regime (ν = n h/(e|B|) ≤ 10, density from
//     WithDensity; skipped without it) that stay above 5 % of R_xx at the
//     smallest |B|: parallel conduction or heating ([src:GRAYSON2005]; common practice);
//   - a large out-of-phase lock-in column for Rxx or Rxy (common practice);
//   - fewer than 10 points in the file.
//
// It returns the warnings found; errors are reserved for unusable input (no
// field column, or a column in the wrong unit).
func CheckSweep(d *Dataset, opts ...Option) ([]Warning, error) {
	o := newOptions(opts)
	xc, err := column(d, o.field, DimField)
	if err != nil {
		return nil, err
	}
	var ws []Warning
	n := 0
	bmax := 0.0
	for _, b := range xc.Values {
		if !math.IsNaN(b) {
			n++
			bmax = math.Max(bmax, math.Abs(b))
		}
	}
	if n < 10 {
		ws = append(ws, Warning{WarnFewPoints, fmt.Sprintf("only %d points with a field value", n)})
	}
	if yc, err := column(d, "Rxy", DimResistance); err == nil {
		if z, err := ZeroField(d, yc.Name, WithField(xc.Name), WithPoints(o.points)); err == nil {
			ref := 0.0
			for i, b := range xc.Values {
				if math.Abs(b) == bmax && !math.IsNaN(yc.Values[i]) {
					ref = math.Max(ref, math.Abs(yc.Values[i]))
				}
			}
			v := z.Value
			if math.Abs(v.Value) > 3*v.Uncertainty && math.Abs(v.Value) > 0.01*ref {
				ws = append(ws, Warning{WarnXYAtZero, fmt.Sprintf(
					"%s(B = 0) = %.4g ± %.2g Ohm, %.1f %% of |%s| at %.3g T: misaligned Hall probes or an offset; antisymmetrize over ±B",
					yc.Name, v.Value, v.Uncertainty, 100*math.Abs(v.Value)/ref, yc.Name, bmax)})
			}
		}
		if w := outOfPhase(d, xc, yc, 0, math.Inf(1), o.maxYFrac); w != nil {
			ws = append(ws, *w)
		}
	}
	if rc, err := column(d, "Rxx", DimResistance); err == nil {
		if w := outOfPhase(d, xc, rc, 0, math.Inf(1), o.maxYFrac); w != nil {
			ws = append(ws, *w)
		}
		if o.ext.density > 0 {
			if w := rxxMinima(xc.Values, rc.Values, o.ext.density); w != nil {
				ws = append(ws, *w)
			}
		}
	}
	return ws, nil
}

// rxxMinima checks that R_xx gets close to zero somewhere in the quantum Hall
// regime ν ≤ 10 (ν = n h/(e|B|), [src:AFS1982]): it compares the smallest
// R_xx there with R_xx at the smallest |B|.
func rxxMinima(B, R []float64, n float64) *Warning {
	r0, b0 := math.NaN(), math.Inf(1)
	minR, bAt := math.Inf(1), 0.0
	qh := 0
	for i, b := range B {
		if math.IsNaN(b) || math.IsNaN(R[i]) {
			continue
		}
		ab := math.Abs(b)
		if ab < b0 {
			b0, r0 = ab, R[i]
		}
		if ab > 0 && hPl*n/(qe*ab) <= 10 {
			qh++
			if R[i] < minR {
				minR, bAt = R[i], ab
			}
		}
	}
	if qh < 5 || !(r0 > 0) {
		return nil
	}
	if minR > 0.05*r0 {
		return &Warning{WarnRxxNotZero, fmt.Sprintf(
			"in the quantum Hall regime (ν ≤ 10) R_xx stays above %.3g Ohm (%.0f %% of R_xx at %.3g T; lowest at %.3g T): parallel conduction or heating?",
			minR, 100*minR/r0, b0, bAt)}
	}
	return nil
}
