package transport

import (
	"fmt"
	"math"
	"slices"
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
//   - fewer than 10 points in the file;
//   - one-point spikes in a resistance column: a point more than 10 robust standard
//     deviations (1.4826 × the median absolute deviation of all such residuals) from the
//     median of its four neighbours, which agree with each other, and more than three times
//     as far as any other point within 25 rows (common practice);
//   - a field reading that steps back inside a sweep branch (Directions), by more than
//     half the median step and three robust deviations of the steps;
//   - a column stuck at its largest or smallest value for 3 or more consecutive rows: an
//     overloaded lock-in input or a clipped range (common practice);
//   - on a back-and-forth sweep, a field lag between the branches and a difference the lag
//     does not explain (SplitSweep).
//
// Each warning names the field where it happens. It returns the warnings found; errors are
// reserved for unusable input (no field column, or a column in the wrong unit).
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
	_, oneSided := SweepSpan(xc.Values)
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
				fix := "antisymmetrize over ±B"
				if oneSided {
					fix = "a sweep to the other field polarity would let antisymmetrisation remove it"
				}
				ws = append(ws, Warning{WarnXYAtZero, fmt.Sprintf(
					"%s(B = 0) = %.4g ± %.2g Ohm, %.1f %% of |%s| at %.3g T: misaligned Hall probes or an offset; %s",
					yc.Name, v.Value, v.Uncertainty, 100*math.Abs(v.Value)/ref, yc.Name, bmax, fix)})
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
	for i := range d.Columns {
		c := &d.Columns[i]
		if c.IsText() || c.Dim != DimResistance && c.Dim != DimVoltage {
			continue
		}
		if w := spikes(xc.Values, c); w != nil {
			ws = append(ws, *w)
		}
		if w := saturated(xc.Values, c); w != nil {
			ws = append(ws, *w)
		}
	}
	dir, _, err := Directions(d, xc.Name)
	if err != nil {
		return nil, err
	}
	if w := backSteps(xc.Values, dir); w != nil {
		ws = append(ws, *w)
	}
	if slices.Contains(dir, 1) && slices.Contains(dir, -1) {
		if sp, err := SplitSweep(d, WithField(xc.Name)); err == nil {
			for _, w := range sp.Warnings {
				if w.Code == WarnLag || w.Code == WarnHysteresis {
					ws = append(ws, w)
				}
			}
		}
	}
	return ws, nil
}

// spikes finds one-point spikes in column c (see CheckSweep).
func spikes(B []float64, c *Column) *Warning {
	y := c.Values
	n := len(y)
	if n < 9 {
		return nil
	}
	res := make([]float64, n)
	var all []float64
	nb := make([]float64, 4)
	for i := range res {
		res[i] = math.NaN()
		if i < 2 || i > n-3 {
			continue
		}
		nb[0], nb[1], nb[2], nb[3] = y[i-2], y[i-1], y[i+1], y[i+2]
		if math.IsNaN(y[i]) || slices.ContainsFunc(nb, math.IsNaN) {
			continue
		}
		slices.Sort(nb)
		res[i] = y[i] - (nb[1]+nb[2])/2
		all = append(all, res[i])
	}
	if len(all) < 5 {
		return nil
	}
	m := median(all)
	dev := make([]float64, len(all))
	for i, r := range all {
		dev[i] = math.Abs(r - m)
	}
	scale := 1.4826 * median(dev)
	if !(scale > 0) {
		return nil
	}
	count, worst, at := 0, 0.0, 0
	for i, r := range res {
		if math.IsNaN(r) || math.Abs(r-m) <= spikeSigmas*scale || math.Abs(r) <= 5*math.Abs(y[i+1]-y[i-1]) {
			continue
		}
		// It must stand out from everything around it too: a feature that recurs within
		// the window (Landau levels sampled too coarsely) is the signal, not a glitch.
		local := 0.0
		for j := max(i-spikeWindow, 0); j <= min(i+spikeWindow, n-1); j++ {
			if j != i && !math.IsNaN(res[j]) {
				local = math.Max(local, math.Abs(res[j]-m))
			}
		}
		if math.Abs(r-m) <= 3*local {
			continue
		}
		count++
		if math.Abs(r) > math.Abs(worst) {
			worst, at = r, i
		}
	}
	if count == 0 {
		return nil
	}
	return &Warning{WarnSpike, fmt.Sprintf(
		"%d one-point spike(s) in %s; the largest, %+.4g %s (%.0f robust deviations), at B = %.4g T (row %d): a glitch to drop, or a feature the sweep does not resolve",
		count, c.Name, worst, siUnitOf(c), math.Abs(worst-m)/scale, B[at], at+1)}
}

// siUnitOf names the SI unit a column's values are in, for messages.
func siUnitOf(c *Column) string {
	if c.Dim == DimVoltage {
		return "V"
	}
	return "Ohm"
}

// saturated finds a run of identical readings at the column's extreme (see CheckSweep).
func saturated(B []float64, c *Column) *Warning {
	y := c.Values
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range y {
		if !math.IsNaN(v) {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if !(hi > lo) {
		return nil // empty or constant
	}
	for i := 0; i < len(y); {
		j := i + 1
		for j < len(y) && y[j] == y[i] {
			j++
		}
		if j-i >= minSaturatedRun && (y[i] == lo || y[i] == hi) {
			which := "largest"
			if y[i] == lo {
				which = "smallest"
			}
			return &Warning{WarnSaturated, fmt.Sprintf(
				"%s stays at %.6g %s, its %s value, for %d rows from B = %.4g T to %.4g T: an overloaded lock-in input or a clipped range; drop those rows or remeasure at a larger sensitivity",
				c.Name, y[i], siUnitOf(c), which, j-i, B[i], B[j-1])}
		}
		i = j
	}
	return nil
}

// backSteps finds the field reading stepping back inside a sweep branch (see CheckSweep).
func backSteps(B []float64, dir []int) *Warning {
	var steps []float64
	for i := 1; i < len(B); i++ {
		if d := B[i] - B[i-1]; !math.IsNaN(d) {
			steps = append(steps, d)
		}
	}
	if len(steps) < 5 {
		return nil
	}
	abs := make([]float64, len(steps))
	for i, s := range steps {
		abs[i] = math.Abs(s)
	}
	m := median(steps)
	dev := make([]float64, len(steps))
	for i, s := range steps {
		dev[i] = math.Abs(s - m)
	}
	tol := math.Max(0.5*median(abs), 3*1.4826*median(dev))
	count, worst, at := 0, 0.0, 0
	for i := 1; i < len(B); i++ {
		if dir[i] == 0 || dir[i] != dir[i-1] || math.IsNaN(B[i]) || math.IsNaN(B[i-1]) {
			continue
		}
		back := -float64(dir[i]) * (B[i] - B[i-1])
		if back > tol && back > 0 {
			count++
			if back > worst {
				worst, at = back, i
			}
		}
	}
	if count == 0 {
		return nil
	}
	return &Warning{WarnNonMonotonic, fmt.Sprintf(
		"the field reading steps back %d time(s) inside a sweep branch; the largest, %.3g mT, at B = %.4g T (row %d): a glitch of the readback or a paused magnet; such rows scramble the 1/B grid of an SdH analysis",
		count, 1e3*worst, B[at-1], at+1)}
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
