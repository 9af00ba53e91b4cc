package transport

import (
	"fmt"
	"math"
)

// HallResult is the outcome of HallDensity. It records everything the value
// depends on (data hash, columns, range, points), so a changed file or range
// shows as a changed result.
type HallResult struct {
	Density Estimate // sheet density n = 1/(e|slope|), m^-2, always > 0
	// Carriers is the carrier type: the one recorded for the sample (WithCarrier), else
	// MeasuredCarriers.
	Carriers string
	// MeasuredCarriers is what the slope's sign says: with R_xy = Orientation·ρ_xy, a
	// negative ρ_xy slope means electrons.
	MeasuredCarriers string
	Orientation      float64  // ±1: R_xy as measured = Orientation·ρ_xy
	Convention       string   // what Orientation rests on
	Slope            Estimate // dR_xy/dB, Ohm/T
	Intercept        Estimate // R_xy at B = 0 from the linear fit, Ohm
	Fit              *PolyFit // the linear fit

	XCol, YCol string  // columns used
	BMin, BMax float64 // |B| range, T
	DataHash   string  // Dataset.Hash of the input
	// FieldOffset is the field offset the input had applied (Dataset.FieldOffset), T.
	FieldOffset float64
	// Sweep says which field polarities the data cover (SweepSpan): "±B, …" or
	// "one-sided, 0 to 9 T".
	Sweep    string
	B, R     []float64 // the points used (SI)
	Warnings []Warning
}

// MinHallPoints is the fewest points HallDensity accepts in its range.
const MinHallPoints = 5

// HallDensity fits R_xy = a + s·B by least squares over bmin ≤ |B| ≤ bmax (T)
// and returns the sheet density n = 1/(e|s|) with its standard uncertainty
// σ_n = n σ_s/|s| from the slope's residual-based standard error.
//
// Sign convention ([src:IHN2010]): with B along +z, current along +x and
// ρ_xy = E_y/j_x, Drude gives ρ_xy = B/(q n), so a negative ρ_xy slope means
// electrons and a positive one holes. Whether the file's column is ρ_xy or −ρ_xy
// depends on the wiring and the magnet polarity: WithOrientation gives the factor
// (default +1). WithCarrier gives the carrier type recorded for the sample, which is
// then reported, with a warning when the slope says the other type.
//
// Points with NaN in either column are dropped. Fewer than MinHallPoints points
// in the range is an error wrapping ErrTooFewPoints. WithSigma weights the fit.
//
// Warnings: curvature (a significant quadratic term on one-sided data, or a
// cubic term on ±B data: parallel conduction or a second subband, [src:IHN2010]),
// an even part on ±B data (R_xx pick-up; antisymmetrize first), an intercept
// far from 0 (probe misalignment), and a large out-of-phase lock-in column.
// A term is "significant" when it exceeds 3 standard errors and changes R_xy at
// bmax by more than 0.5 % of the linear part (both thresholds common practice).
func HallDensity(d *Dataset, xcol, ycol string, bmin, bmax float64, opts ...Option) (*HallResult, error) {
	o := newOptions(opts)
	if !(bmin >= 0) || !(bmax > bmin) {
		return nil, fmt.Errorf("%s: Hall fit: field range %g T to %g T: expected a range lo .. hi with 0 ≤ lo < hi: %w", d.Name, bmin, bmax, ErrBadArgument)
	}
	xc, err := column(d, xcol, DimField)
	if err != nil {
		return nil, err
	}
	yc, err := column(d, ycol, DimResistance)
	if err != nil {
		return nil, err
	}
	var sig []float64
	if o.sigma != "" {
		sc, err := column(d, o.sigma, DimResistance)
		if err != nil {
			return nil, err
		}
		sig = sc.Values
	}
	B, R, S := selectPairs(xc.Values, yc.Values, sig, bmin, bmax)
	if len(B) < MinHallPoints {
		return nil, fmt.Errorf("%s: Hall fit of %s over %g T ≤ |B| ≤ %g T: %d points; need at least %d%s: %w",
			d.Name, yc.Name, bmin, bmax, len(B), MinHallPoints, fieldSpan(xc, bmin, bmax), ErrTooFewPoints)
	}
	lin, err := FitPoly(B, R, S, 1)
	if err != nil {
		return nil, fmt.Errorf("%s: Hall fit of %s: %w", d.Name, yc.Name, err)
	}
	res := &HallResult{
		Slope: lin.CoefEstimate(1), Intercept: lin.CoefEstimate(0), Fit: lin,
		XCol: xc.Name, YCol: yc.Name, BMin: bmin, BMax: bmax, DataHash: d.Hash, B: B, R: R,
		FieldOffset: d.FieldOffset,
	}
	s := res.Slope.Value
	if s == 0 {
		return nil, fmt.Errorf("%s: Hall fit of %s: zero slope, no density: %w", d.Name, yc.Name, ErrBadArgument)
	}
	n := 1 / (qe * math.Abs(s))
	res.Density = Estimate{n, n * res.Slope.Uncertainty / math.Abs(s)}
	orient, basis := o.orient, o.orientBasis
	if orient == 0 {
		orient, basis = 1, "the default convention R_xy = ρ_xy, B along +z"
	}
	res.Orientation, res.Convention = orient, basis
	measured := "electrons"
	if orient*s > 0 {
		measured = "holes"
	}
	res.Carriers, res.MeasuredCarriers = measured, measured
	if c := o.carrier; c == "electrons" || c == "holes" {
		res.Carriers = c
		if c != measured {
			res.Warnings = append(res.Warnings, Warning{WarnCarrierSign, fmt.Sprintf(
				"the Hall slope %.4g Ohm/T means %s by %s, but %s records %s: check the Hall probes' wiring and the magnet's polarity, or state the cooldown's convention (convention: {electrons: %s})",
				s, measured, basis, o.carrierFrom, c, signWord(s))})
		}
	}

	// Sanity checks.
	bref := 0.0
	neg, pos := false, false
	for _, b := range B {
		bref = math.Max(bref, math.Abs(b))
		neg = neg || b < 0
		pos = pos || b > 0
	}
	lin0 := math.Abs(s) * bref
	significant := func(c Estimate, pow int) bool {
		return math.Abs(c.Value) > 3*c.Uncertainty && math.Abs(c.Value)*math.Pow(bref, float64(pow)) > 0.005*lin0
	}
	if neg && pos {
		if len(B) >= 6 {
			if cub, err := FitPoly(B, R, S, 3); err == nil {
				if c := cub.CoefEstimate(3); significant(c, 3) {
					res.Warnings = append(res.Warnings, Warning{WarnCurvature, fmt.Sprintf(
						"R_xy(B) is not linear over %g–%g T (cubic term %.3g ± %.2g Ohm/T^3): parallel conduction or a second subband?", bmin, bmax, c.Value, c.Uncertainty)})
				}
				if c := cub.CoefEstimate(2); significant(c, 2) {
					res.Warnings = append(res.Warnings, Warning{WarnEvenPart, fmt.Sprintf(
						"R_xy has a part even in B (quadratic term %.3g ± %.2g Ohm/T^2): R_xx pick-up; antisymmetrize over ±B", c.Value, c.Uncertainty)})
				}
			}
		}
	} else if quad, err := FitPoly(B, R, S, 2); err == nil {
		if c := quad.CoefEstimate(2); significant(c, 2) {
			res.Warnings = append(res.Warnings, Warning{WarnCurvature, fmt.Sprintf(
				"R_xy(B) is not linear over %g–%g T (quadratic term %.3g ± %.2g Ohm/T^2): parallel conduction, a second subband, or R_xx pick-up?", bmin, bmax, c.Value, c.Uncertainty)})
		}
	}
	curved := len(res.Warnings) > 0 && res.Warnings[0].Code == WarnCurvature
	span, oneSided := SweepSpan(xc.Values)
	res.Sweep = span
	if a := res.Intercept; !curved && math.Abs(a.Value) > 3*a.Uncertainty && math.Abs(a.Value) > 0.01*lin0 {
		fix := "antisymmetrize over ±B"
		if oneSided {
			fix = "the sweep is one-sided (" + span + "): a sweep to the other polarity would let antisymmetrisation remove it"
		}
		res.Warnings = append(res.Warnings, Warning{WarnOffset, fmt.Sprintf(
			"R_xy(0) = %.4g ± %.2g Ohm is %.1f %% of the Hall signal at %g T: misaligned Hall probes? %s",
			a.Value, a.Uncertainty, 100*math.Abs(a.Value)/lin0, bref, fix)})
	}
	if w := densityRange(n); w != nil {
		res.Warnings = append(res.Warnings, *w)
	}
	if len(B) < 10 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %d points in the fit range", len(B))})
	}
	if w := outOfPhase(d, xc, yc, bmin, bmax, o.maxYFrac); w != nil {
		res.Warnings = append(res.Warnings, *w)
	}
	return res, nil
}

// WarnDensityRange is raised when a density lies outside PlausibleDensity.
const WarnDensityRange = "density-range"

// PlausibleDensity is the range of sheet densities, m^-2, of the 2D systems
// cleave's users measure: 1e9 to 1e14 cm^-2, a decade beyond the dilute GaAs
// and the densest gated graphene or Si samples on either side (GaAs 2D gases
// span 1e10–1e12 cm^-2; both ranges are common practice).
var PlausibleDensity = [2]float64{1e13, 1e18}

// densityRange warns about a density outside PlausibleDensity. A factor of
// 1000 off is the signature of a field column in the wrong unit (mT read as
// T, kG written as G) or a resistance in kOhm read as Ohm.
func densityRange(n float64) *Warning {
	if n >= PlausibleDensity[0] && n <= PlausibleDensity[1] {
		return nil
	}
	return &Warning{WarnDensityRange, fmt.Sprintf(
		"density %.3g cm^-2 is outside %.0e–%.0e cm^-2 (common practice): check the units in the header of the field and resistance columns (mT vs T, G vs kG, kOhm vs Ohm)",
		n*1e-4, PlausibleDensity[0]*1e-4, PlausibleDensity[1]*1e-4)}
}

// fieldSpan tells, for a too-few-points error, where the field column's data
// lie when they miss the window or fill less than a tenth of it: such a
// column usually has the wrong unit in its header (G for kG, T for mT).
func fieldSpan(xc *Column, bmin, bmax float64) string {
	lo, hi := math.Inf(1), 0.0
	for _, b := range xc.Values {
		if a := math.Abs(b); !math.IsNaN(a) {
			lo, hi = math.Min(lo, a), math.Max(hi, a)
		}
	}
	if hi == 0 || !(hi < bmin || lo > bmax || hi < 0.1*bmax) {
		return ""
	}
	unit := xc.Unit
	if unit == "" {
		unit = "T (no unit given)"
	}
	return fmt.Sprintf(" (the %s column spans |B| = %.3g–%.3g T; its header unit is %s: is that right?)", xc.Name, lo, hi, unit)
}

// signWord is "positive" or "negative".
func signWord(s float64) string {
	if s > 0 {
		return "positive"
	}
	return "negative"
}
