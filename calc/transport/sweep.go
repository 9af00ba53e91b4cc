package transport

import (
	"fmt"
	"math"
	"slices"
	"strings"
)

// Warning codes of the sweep checks (CheckSweep, SplitSweep).
const (
	WarnSpike         = "spike"         // a one-point spike in a resistance column
	WarnNonMonotonic  = "non-monotonic" // the field reading steps back inside a sweep branch
	WarnLag           = "field-lag"     // the up and down branches are shifted in field
	WarnHysteresis    = "hysteresis"    // the branches differ by more than a field lag explains
	WarnSaturated     = "saturated"     // a column stuck at its extreme value: an overloaded input
	WarnOneSided      = "one-sided"     // a sweep over one field polarity only
	WarnOneBranch     = "one-direction" // a sweep in one direction only: nothing to split
	minLag            = 0.5e-3          // T: the smallest lag worth a warning (common practice)
	turnFraction      = 0.05            // a reversal by this fraction of the field span is a turn of the sweep
	spikeSigmas       = 10.0            // a spike stands this many robust deviations out
	spikeWindow       = 25              // rows either side a spike must stand out from
	minSaturatedRun   = 3               // consecutive identical readings at the extreme
	derivativeStencil = 2               // points either side for the derivative of a branch
)

// Direction labels a direction column may hold (case-insensitive), besides numbers (the
// sign: > 0 up, < 0 down).
var (
	upLabels   = []string{"up", "+", "increasing", "rising", "forward", "fwd", "ramp up", "upward", "u"}
	downLabels = []string{"down", "-", "decreasing", "falling", "reverse", "backward", "back", "bwd", "ramp down", "downward", "d"}
)

// Directions returns each row's sweep direction (+1 rising, −1 falling, 0 where unknown)
// and what it was read from: the direction column (role RoleDirection: labels such as
// up/down or numbers whose sign tells) when there is one, else the field column itself. From
// the field, the sweep turns where the reading comes back from its latest extreme by more
// than 5 % of the field span (common practice), so noise on the reading and small back-steps
// do not split a branch; rows before the first clear movement take the first direction seen.
func Directions(d *Dataset, field string) ([]int, string, error) {
	xc, err := column(d, field, DimField)
	if err != nil {
		return nil, "", err
	}
	if dc, err := d.Col(RoleDirection); err == nil && dc.Role == RoleDirection {
		dir := make([]int, d.Len())
		for i := range dir {
			switch {
			case dc.IsText():
				l := strings.ToLower(strings.TrimSpace(dc.Text[i]))
				switch {
				case l == "":
				case slices.Contains(upLabels, l):
					dir[i] = 1
				case slices.Contains(downLabels, l):
					dir[i] = -1
				default:
					return nil, "", fmt.Errorf("%s: direction column %q: label %q in row %d: expected up or down (or increasing/decreasing, forward/reverse, +/-): %w",
						d.Name, dc.Name, dc.Text[i], i+1, ErrBadArgument)
				}
			case dc.Values[i] > 0:
				dir[i] = 1
			case dc.Values[i] < 0:
				dir[i] = -1
			}
		}
		return dir, fmt.Sprintf("the direction column %q", dc.Name), nil
	}
	return fieldDirections(xc.Values), "the field's own steps", nil
}

// fieldDirections segments a field trace at its turning points (see Directions).
func fieldDirections(B []float64) []int {
	dir := make([]int, len(B))
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, b := range B {
		if !math.IsNaN(b) {
			lo, hi = math.Min(lo, b), math.Max(hi, b)
		}
	}
	tau := turnFraction * (hi - lo)
	if !(tau > 0) {
		return dir
	}
	cur, start := 0, 0 // current direction and the first row of its segment
	ext, extAt := math.NaN(), -1
	for i, b := range B {
		if math.IsNaN(b) {
			continue
		}
		if math.IsNaN(ext) {
			ext, extAt = b, i
			continue
		}
		switch {
		case cur == 0 && math.Abs(b-ext) > tau:
			cur = 1
			if b < ext {
				cur = -1
			}
			for k := start; k < i; k++ {
				dir[k] = cur
			}
			ext, extAt = b, i
		case cur != 0 && float64(cur)*(b-ext) > 0:
			ext, extAt = b, i
		case cur != 0 && float64(cur)*(ext-b) > tau:
			// Turn at the extreme: rows after it belong to the new direction.
			for k := extAt + 1; k < i; k++ {
				dir[k] = -cur
			}
			cur, start = -cur, extAt+1
			ext, extAt = b, i
		}
		if cur != 0 {
			dir[i] = cur
		}
	}
	if cur == 0 { // a trace that never moves by tau: one direction from end to end
		first, last := math.NaN(), math.NaN()
		for _, b := range B {
			if !math.IsNaN(b) {
				if math.IsNaN(first) {
					first = b
				}
				last = b
			}
		}
		c := 1
		if last < first {
			c = -1
		}
		for i := range dir {
			dir[i] = c
		}
	}
	return dir
}

// SweepSplit is the outcome of SplitSweep.
type SweepSplit struct {
	Up, Down *Dataset // the rising and the falling branch, all columns
	Source   string   // what the directions were read from
	// Lag is the field lag δ (T): the field reading trails the true field by δ while
	// sweeping, so the rising branch reads B_true − δ and the falling one B_true + δ, and
	// R_up(B) = R_down(B + 2δ). Estimated by least squares over the branches' common field
	// range from the columns in LagColumns; Match is the fraction of the up–down difference
	// the shift explains (0–1), Residual the RMS difference left (Ohm, of the first column).
	Lag        Estimate
	Match      float64
	Residual   float64
	LagColumns []string
	BMin, BMax float64 // the common field range of the branches, T
	Warnings   []Warning
}

// SplitSweep splits a back-and-forth sweep into its rising and falling branches (Directions)
// and estimates the field lag between them from the resistance columns Rxx and Rxy (those
// present), each weighted by the inverse variance of its own residual. Rows of unknown
// direction go to neither branch. A sweep in one direction only is an error wrapping
// ErrNoField.
//
// The lag follows from a Gauss–Newton fit of the shift Δ = 2δ minimising Σ [y_up(b) −
// y_down(b + Δ)]², with y_down interpolated linearly and its slope taken by central
// differences over ±2 points; σ_Δ = sqrt(1/Σ w g²) with w the inverse residual variance of
// each column. Warnings: a lag above 3σ and 0.5 mT (common practice: a ramp too fast for the
// magnet's readback, or a sweep logged against the set point), and a difference the lag
// does not explain (residual above three times what the branches' own scatter allows):
// hysteresis, heating during the sweep or drift.
func SplitSweep(d *Dataset, opts ...Option) (*SweepSplit, error) {
	o := newOptions(opts)
	dir, src, err := Directions(d, o.field)
	if err != nil {
		return nil, err
	}
	var up, down []int
	for i, s := range dir {
		switch s {
		case 1:
			up = append(up, i)
		case -1:
			down = append(down, i)
		}
	}
	if len(up) == 0 || len(down) == 0 {
		way := "rises"
		if len(up) == 0 {
			way = "falls"
		}
		return nil, fmt.Errorf("%s: the sweep only %s (directions from %s): there is no second branch to split off: %w", d.Name, way, src, ErrNoField)
	}
	res := &SweepSplit{Up: d.rows(up, "rising branch"), Down: d.rows(down, "falling branch"), Source: src}
	xc, _ := column(d, o.field, DimField)
	var cols []*Column
	for _, name := range []string{RoleRxy, RoleRxx} {
		if c, err := column(d, name, DimResistance); err == nil {
			cols = append(cols, c)
		}
	}
	if len(cols) == 0 {
		return res, nil // nothing to compare: the branches alone
	}
	lag, err := fitLag(xc.Values, cols, up, down)
	if err != nil {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("no field lag estimated: %v", err)})
		return res, nil
	}
	res.Lag, res.Match, res.Residual, res.BMin, res.BMax = lag.lag, lag.match, lag.residual, lag.lo, lag.hi
	for _, c := range cols {
		res.LagColumns = append(res.LagColumns, c.Name)
	}
	if l := res.Lag; math.Abs(l.Value) > 3*l.Uncertainty && math.Abs(l.Value) > minLag {
		res.Warnings = append(res.Warnings, Warning{WarnLag, fmt.Sprintf(
			"the field reading lags the field by %.3g mT (± %.1g mT) over %.3g to %.3g T: the falling branch reads %.3g mT above the rising one at the same resistance; analyse one branch, or average both (a lag cancels to first order)",
			1e3*l.Value, 1e3*l.Uncertainty, res.BMin, res.BMax, 2e3*l.Value)})
	}
	for c, ex := range lag.excess {
		if ex > 3 {
			res.Warnings = append(res.Warnings, Warning{WarnHysteresis, fmt.Sprintf(
				"the branches differ by %.3g Ohm RMS in %s beyond what a field lag explains (%.1f times their own scatter) over %.3g to %.3g T: hysteresis, heating during the sweep, or drift",
				lag.residuals[c], cols[c].Name, ex, res.BMin, res.BMax)})
		}
	}
	return res, nil
}

// rows returns a data set of d's rows idx, all columns, named after the part.
func (d *Dataset) rows(idx []int, part string) *Dataset {
	out := &Dataset{Name: d.Name + " (" + part + ")", Hash: d.Hash, Meta: d.Meta, HeaderLine: d.HeaderLine,
		Layout: d.Layout, FieldOffset: d.FieldOffset, Columns: make([]Column, len(d.Columns))}
	for c, col := range d.Columns {
		nc := col
		nc.Values = make([]float64, len(idx))
		for k, i := range idx {
			nc.Values[k] = col.Values[i]
		}
		if col.Text != nil {
			nc.Text = make([]string, len(idx))
			for k, i := range idx {
				nc.Text[k] = col.Text[i]
			}
		}
		out.Columns[c] = nc
	}
	return out
}

type lagFit struct {
	lag             Estimate
	match, residual float64   // of the first column
	residuals       []float64 // per column: the RMS difference left after the shift
	excess          []float64 // per column: that over the scatter the branches' noise explains
	lo, hi          float64
}

// series is one branch of one column, sorted by field, repeats averaged.
type series struct{ b, y []float64 }

func branchSeries(B, Y []float64, idx []int) series {
	var pts []fieldPoint
	for _, i := range idx {
		if !math.IsNaN(B[i]) && !math.IsNaN(Y[i]) {
			pts = append(pts, fieldPoint{B[i], Y[i]})
		}
	}
	var s series
	s.b, s.y = sortedMeans(pts)
	return s
}

// walk evaluates the series (linear interpolation, and its slope by central differences over
// ±derivativeStencil points) at b+shift for each b of bs (sorted
// ascending) inside [lo, hi] and the series' range, with a cursor instead of a search.
func (s series) walk(bs []float64, shift, lo, hi float64, fn func(k int, y, g float64)) {
	n := len(s.b)
	if n < 2 {
		return
	}
	j := 1
	for k, b0 := range bs {
		if b0 < lo || b0 > hi {
			continue
		}
		b := b0 + shift
		if b < s.b[0] || b > s.b[n-1] {
			continue
		}
		for j < n-1 && s.b[j] < b {
			j++
		}
		t := (b - s.b[j-1]) / (s.b[j] - s.b[j-1])
		y := s.y[j-1] + t*(s.y[j]-s.y[j-1])
		l, h := max(j-1-derivativeStencil, 0), min(j+derivativeStencil, n-1)
		fn(k, y, (s.y[h]-s.y[l])/(s.b[h]-s.b[l]))
	}
}

// scatter is the noise standard deviation of a series from its second differences:
// for white noise of variance σ², (y₋ − 2y + y₊) has variance 6σ².
func (s series) scatter() float64 {
	var sum float64
	n := 0
	for i := 1; i+1 < len(s.y); i++ {
		d := s.y[i-1] - 2*s.y[i] + s.y[i+1]
		sum += d * d
		n++
	}
	if n == 0 {
		return 0
	}
	return math.Sqrt(sum / float64(n) / 6)
}

func fitLag(B []float64, cols []*Column, up, down []int) (*lagFit, error) {
	type pair struct{ up, down series }
	var ps []pair
	lo, hi := math.Inf(-1), math.Inf(1)
	for _, c := range cols {
		p := pair{branchSeries(B, c.Values, up), branchSeries(B, c.Values, down)}
		if len(p.up.b) < 5 || len(p.down.b) < 5 {
			return nil, fmt.Errorf("fewer than 5 points on a branch of %s", c.Name)
		}
		lo = math.Max(lo, math.Max(p.up.b[0], p.down.b[0]))
		hi = math.Min(hi, math.Min(p.up.b[len(p.up.b)-1], p.down.b[len(p.down.b)-1]))
		ps = append(ps, p)
	}
	if !(hi > lo) {
		return nil, fmt.Errorf("the branches do not overlap in field")
	}
	// Keep a margin for the shift.
	margin := 0.05 * (hi - lo)
	delta := 0.0
	w := make([]float64, len(ps))
	for i := range w {
		w[i] = 1
	}
	// Before the shift: the plain up − down difference, per column.
	s0 := make([]float64, len(ps))
	for c, p := range ps {
		p.down.walk(p.up.b, 0, lo+margin, hi-margin, func(k int, y, _ float64) {
			r := p.up.y[k] - y
			s0[c] += r * r
		})
	}
	var s1 []float64 // per column: the residual sum after the shift
	var cnt []int
	var sg float64 // Σ w g² at the last shift
	for iter := 0; iter < 30; iter++ {
		var num, den float64
		s1, cnt = make([]float64, len(ps)), make([]int, len(ps))
		for c, p := range ps {
			p.down.walk(p.up.b, delta, lo+margin, hi-margin, func(k int, y, g float64) {
				r := p.up.y[k] - y
				num += w[c] * r * g
				den += w[c] * g * g
				s1[c] += r * r
				cnt[c]++
			})
		}
		if !(den > 0) {
			return nil, fmt.Errorf("the resistance does not change with field over the common range")
		}
		step := num / den
		delta += step
		if math.Abs(delta) > margin {
			return nil, fmt.Errorf("the shift between the branches exceeds 5 %% of their common field range")
		}
		// Weights: the inverse residual variance of each column; σ_Δ² = 1/Σ w g² with them.
		sg = 0
		for c, p := range ps {
			if cnt[c] > 1 && s1[c] > 0 {
				w[c] = float64(cnt[c]-1) / s1[c]
			}
			p.down.walk(p.up.b, delta, lo+margin, hi-margin, func(_ int, _, g float64) { sg += w[c] * g * g })
		}
		if math.Abs(step) < 1e-9*(hi-lo) && iter > 0 {
			break
		}
	}
	f := &lagFit{lag: Estimate{delta / 2, math.Sqrt(1/sg) / 2}, lo: lo, hi: hi}
	if s0[0] > 0 {
		f.match = math.Max(0, 1-s1[0]/s0[0])
	}
	f.residuals, f.excess = make([]float64, len(ps)), make([]float64, len(ps))
	for c, p := range ps {
		if cnt[c] == 0 {
			continue
		}
		f.residuals[c] = math.Sqrt(s1[c] / float64(cnt[c]))
		if noise := math.Hypot(p.up.scatter(), p.down.scatter()); noise > 0 {
			f.excess[c] = f.residuals[c] / noise
		}
	}
	f.residual = f.residuals[0]
	return f, nil
}

// SweepSpan describes which field polarities a sweep covers: "±B" when it has both, "+B
// only" or "−B only" (a one-sided sweep), with the range of |B|.
func SweepSpan(B []float64) (label string, oneSided bool) {
	pos, neg := false, false
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, b := range B {
		if math.IsNaN(b) {
			continue
		}
		pos = pos || b > 0
		neg = neg || b < 0
		lo, hi = math.Min(lo, b), math.Max(hi, b)
	}
	switch {
	case pos && neg:
		return fmt.Sprintf("±B, %.3g to %.3g T", lo, hi), false
	case pos:
		return fmt.Sprintf("one-sided, %.3g to %.3g T", lo, hi), true
	case neg:
		return fmt.Sprintf("one-sided, %.3g to %.3g T", lo, hi), true
	}
	return "no field", true
}
