package transport

import (
	"fmt"
	"math"
	"slices"
	"sort"

	"cleave/calc/quantity"
)

// WarnRHEEDMissed: some oscillations in the window were too weak to time.
const WarnRHEEDMissed = "rheed-missed"

// RHEEDResult is the period of RHEED intensity oscillations.
type RHEEDResult struct {
	Period       Estimate  // s: one period is one monolayer of growth
	Oscillations int       // whole periods between the first and last crossing timed
	Crossings    []float64 // s, the upward zero crossings of the detrended intensity
	Start, End   float64   // s, the window used
	Warnings     []Warning
}

// RHEEDPeriod returns the period of the intensity oscillations of a RHEED spot during
// layer-by-layer growth, where one period is the growth of one monolayer ([src:NEAVE1983]). time (s)
// and intensity (any unit) are one trace, sampled at roughly equal steps; NaN points are
// dropped.
//
// Method: the slow background is removed twice, first with a cubic fit over the trace,
// then with a moving average over one period of the first estimate (which averages the
// oscillation away and leaves the background). The upward zero crossings of what remains
// are timed by linear interpolation, with a hysteresis of 0.3 times its rms against noise.
// Each crossing is numbered by rounding its time from the first over the median spacing, so
// that an oscillation too weak to time (late in a damped trace) leaves a gap instead of
// shifting the count, and the period is the slope of a straight line through crossing time
// against number, with its residual-scaled standard uncertainty. At least three crossings
// (two periods) are needed; fewer than five periods give a warning.
func RHEEDPeriod(time, intensity []float64) (*RHEEDResult, error) {
	if len(time) != len(intensity) {
		return nil, fmt.Errorf("RHEED: %d times and %d intensities: %w", len(time), len(intensity), ErrBadArgument)
	}
	type pt struct{ t, y float64 }
	var pts []pt
	for i := range time {
		if !math.IsNaN(time[i]) && !math.IsNaN(intensity[i]) && !math.IsInf(time[i], 0) && !math.IsInf(intensity[i], 0) {
			pts = append(pts, pt{time[i], intensity[i]})
		}
	}
	if len(pts) < 20 {
		return nil, fmt.Errorf("RHEED: %d usable points; a trace needs at least 20 (several per period): %w", len(pts), ErrTooFewPoints)
	}
	sort.SliceStable(pts, func(i, j int) bool { return pts[i].t < pts[j].t })
	t := make([]float64, len(pts))
	y := make([]float64, len(pts))
	for i, p := range pts {
		t[i], y[i] = p.t, p.y
	}
	if t[len(t)-1] == t[0] {
		return nil, fmt.Errorf("RHEED: every point has the same time: %w", ErrBadArgument)
	}
	// Pass 1: cubic background.
	bg, err := FitPoly(t, y, nil, 3)
	if err != nil {
		return nil, fmt.Errorf("RHEED: %w", err)
	}
	r := make([]float64, len(t))
	for i := range t {
		r[i] = y[i] - bg.Eval(t[i])
	}
	c := upCrossings(t, r)
	if len(c) < 3 {
		return nil, fmt.Errorf("RHEED: %d oscillations found; need at least two whole periods: %w", max(len(c)-1, 0), ErrTooFewPoints)
	}
	p0 := medianSpacing(c)
	// Pass 2: moving average over one period as the background.
	dt := (t[len(t)-1] - t[0]) / float64(len(t)-1)
	if w := int(math.Round(p0 / dt)); w >= 3 && w < len(t)/2 {
		ma := movingAverage(y, w)
		for i := range r {
			r[i] = y[i] - ma[i]
		}
		// The average is one-sided within half a window of the ends: leave those crossings out.
		var c2 []float64
		for _, x := range upCrossings(t, r) {
			if x-t[0] >= p0/2 && t[len(t)-1]-x >= p0/2 {
				c2 = append(c2, x)
			}
		}
		if len(c2) >= 3 {
			c = c2
			p0 = medianSpacing(c)
		}
	}
	k := make([]float64, len(c))
	for i := range c {
		k[i] = math.Round((c[i] - c[0]) / p0)
	}
	for i := 1; i < len(k); i++ {
		if k[i] == k[i-1] {
			return nil, fmt.Errorf("RHEED: two crossings %.3g s apart within one period of %.3g s: the trace is too noisy to time: %w", c[i]-c[i-1], p0, ErrBadArgument)
		}
	}
	fit, err := FitPoly(k, c, nil, 1)
	if err != nil {
		return nil, fmt.Errorf("RHEED: %w", err)
	}
	n := int(k[len(k)-1])
	res := &RHEEDResult{Period: fit.CoefEstimate(1), Oscillations: n, Crossings: c, Start: t[0], End: t[len(t)-1]}
	if n < 5 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %d periods timed: five or more give a steadier rate", n)})
	}
	if missed := n + 1 - len(c); missed > 0 {
		res.Warnings = append(res.Warnings, Warning{WarnRHEEDMissed, fmt.Sprintf("%d of %d oscillations were too weak to time (damping or noise); the period comes from the others", missed, n+1)})
	}
	return res, nil
}

// upCrossings returns the times where r rises through zero, with hysteresis h = 0.3 rms(r):
// r must have been below −h since the last crossing and reach +h after it.
func upCrossings(t, r []float64) []float64 {
	var ss float64
	for _, v := range r {
		ss += v * v
	}
	h := 0.3 * math.Sqrt(ss/float64(len(r)))
	var out []float64
	armed := false
	zero := math.NaN()
	for i := 1; i < len(r); i++ {
		if r[i] < -h {
			armed = true
			zero = math.NaN()
		}
		if armed && r[i-1] < 0 && r[i] >= 0 {
			zero = t[i-1] + (t[i]-t[i-1])*(-r[i-1])/(r[i]-r[i-1])
		}
		if armed && r[i] > h && !math.IsNaN(zero) {
			out = append(out, zero)
			armed = false
			zero = math.NaN()
		}
	}
	return out
}

func medianSpacing(c []float64) float64 {
	d := make([]float64, len(c)-1)
	for i := range d {
		d[i] = c[i+1] - c[i]
	}
	slices.Sort(d)
	return d[len(d)/2]
}

// movingAverage is the centred mean over w points (shorter at the ends).
func movingAverage(y []float64, w int) []float64 {
	pre := make([]float64, len(y)+1)
	for i, v := range y {
		pre[i+1] = pre[i] + v
	}
	out := make([]float64, len(y))
	for i := range y {
		lo, hi := max(0, i-w/2), min(len(y), i-w/2+w)
		out[i] = (pre[hi] - pre[lo]) / float64(hi-lo)
	}
	return out
}

// RHEEDTrace reads the time and intensity columns of a data set for [RHEEDPeriod]: time
// must be a time (a header such as "time (s)"; "t" is read as a temperature, so name the
// column time), the intensity any unit.
func RHEEDTrace(d *Dataset, timeCol, intensityCol string) (t, y []float64, err error) {
	tc, err := column(d, timeCol, quantity.Time)
	if err != nil {
		return nil, nil, err
	}
	yc, err := d.Col(intensityCol)
	if err != nil {
		return nil, nil, err
	}
	return tc.Values, yc.Values, nil
}
