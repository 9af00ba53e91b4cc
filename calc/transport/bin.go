package transport

import (
	"math"
	"slices"
)

// selectPairs returns the (x, y) points, and sigma when s is not nil, with no
// NaN, lo ≤ |x| ≤ hi and (with s) 0 < s < ∞: the pair-wise dropping of
// missing values that every analysis applies. A counting pass comes first, so
// that a selection of 10^6 points costs one allocation per slice instead of
// the repeated copies of append growth. No points gives nil slices.
func selectPairs(x, y, s []float64, lo, hi float64) (xs, ys, ss []float64) {
	keep := func(i int) bool {
		xv, yv := x[i], y[i]
		if math.IsNaN(xv) || math.IsNaN(yv) {
			return false
		}
		if a := math.Abs(xv); a < lo || a > hi {
			return false
		}
		return s == nil || (s[i] > 0 && !math.IsInf(s[i], 0))
	}
	n := 0
	for i := range x {
		if keep(i) {
			n++
		}
	}
	if n == 0 {
		return nil, nil, nil
	}
	xs, ys = make([]float64, 0, n), make([]float64, 0, n)
	if s != nil {
		ss = make([]float64, 0, n)
	}
	for i := range x {
		if !keep(i) {
			continue
		}
		xs = append(xs, x[i])
		ys = append(ys, y[i])
		if s != nil {
			ss = append(ss, s[i])
		}
	}
	return xs, ys, ss
}

// samples are points in u = 1/|B| sorted by u, each the mean of W raw points
// (W = 1 for raw points). With independent noise of variance σ² per raw point,
// the mean of W points has variance σ²/W, so W is the weight that keeps a
// weighted least-squares fit, and its residual-scaled covariance, honest.
type samples struct {
	u, y, w []float64
	n       int     // raw points behind the samples
	u0, u1  float64 // extent of the raw u values
	gap     float64 // largest spacing in u of the raw data (see binSweep), holes excluded
	binned  bool
	jump    []bool       // binned: sample i follows one or more empty bins
	holes   [][2]float64 // isolated holes in u (see findHoles), excluded from gap
}

// uRange returns the number of usable points (no NaN, bmin ≤ |B| ≤ bmax) and
// the extent of u = 1/|B| over them.
func uRange(B, R []float64, bmin, bmax float64) (n int, u0, u1 float64) {
	u0, u1 = math.Inf(1), math.Inf(-1)
	for i, b := range B {
		a := math.Abs(b)
		if math.IsNaN(b) || math.IsNaN(R[i]) || a < bmin || a > bmax {
			continue
		}
		u := 1 / a
		n++
		u0 = math.Min(u0, u)
		u1 = math.Max(u1, u)
	}
	return n, u0, u1
}

// rawSweep returns the usable points themselves, sorted by u.
func rawSweep(B, R []float64, bmin, bmax float64, n int) *samples {
	type pt struct{ u, y float64 }
	pts := make([]pt, 0, n)
	for i, b := range B {
		a := math.Abs(b)
		if math.IsNaN(b) || math.IsNaN(R[i]) || a < bmin || a > bmax {
			continue
		}
		pts = append(pts, pt{1 / a, R[i]})
	}
	slices.SortStableFunc(pts, func(a, b pt) int {
		switch {
		case a.u < b.u:
			return -1
		case a.u > b.u:
			return 1
		}
		return 0
	})
	s := &samples{n: len(pts), u: make([]float64, len(pts)), y: make([]float64, len(pts)), w: make([]float64, len(pts))}
	for i, p := range pts {
		s.u[i], s.y[i], s.w[i] = p.u, p.y, 1
		if i > 0 {
			s.gap = math.Max(s.gap, p.u-pts[i-1].u)
		}
	}
	if len(pts) > 0 {
		s.u0, s.u1 = pts[0].u, pts[len(pts)-1].u
	}
	return s
}

// binSweep averages the usable points in m bins of equal width in u over
// [u0, u1], in one pass and without sorting (the input may be an up-down or a
// ±B sweep). Empty bins are dropped. Each sample holds the mean u and the mean
// R of its bin and the count as weight.
//
// Averaging over a bin of width h multiplies an oscillation of frequency f by
// sinc(π f h) ≈ 1 − (π f h)²/6 (a boxcar filter); with many bins per period
// this is a slowly varying factor that the fitted envelope absorbs.
//
// gap estimates the largest spacing of the raw data: the largest distance
// between the means of two non-empty bins separated by empty ones (exact when
// those bins hold one point each), else 0 (the data are denser than the bins).
func binSweep(B, R []float64, bmin, bmax float64, n, m int, u0, u1 float64) *samples {
	su := make([]float64, m)
	sy := make([]float64, m)
	cnt := make([]float64, m)
	scale := float64(m) / (u1 - u0)
	for i, b := range B {
		a := math.Abs(b)
		if math.IsNaN(b) || math.IsNaN(R[i]) || a < bmin || a > bmax {
			continue
		}
		u := 1 / a
		k := int((u - u0) * scale)
		if k >= m {
			k = m - 1
		} else if k < 0 {
			k = 0
		}
		su[k] += u
		sy[k] += R[i]
		cnt[k]++
	}
	s := &samples{n: n, u0: u0, u1: u1, binned: true}
	last := -1
	for k := range m {
		if cnt[k] == 0 {
			continue
		}
		u := su[k] / cnt[k]
		jumped := last >= 0 && k > last+1
		if jumped {
			s.gap = math.Max(s.gap, u-s.u[len(s.u)-1])
		}
		s.jump = append(s.jump, jumped)
		s.u = append(s.u, u)
		s.y = append(s.y, sy[k]/cnt[k])
		s.w = append(s.w, cnt[k])
		last = k
	}
	return s
}

// holeRatio is how many times wider than the local point spacing a spacing in
// u must be to count as an isolated hole (missing rows, a dropped stretch of a
// sweep) rather than the data's own sparseness (common practice).
const holeRatio = 5

// holeWindow is how many spacings on each side define the local spacing.
const holeWindow = 8

// findHoles separates isolated holes in the samples from their ordinary
// spacing. A spacing counts as a hole when it exceeds holeRatio times the
// median of the nonzero spacings within holeWindow on either side (repeats at
// the same |B| give zero spacings and are ignored). The holes are recorded in
// s.holes, and s.gap, which caps the searched frequency at the Nyquist
// frequency of the sparsest stretch, is recomputed without them: a few missing
// rows must not hide an oscillation that the rest of the sweep resolves. The
// spectrum interpolates across a hole; the least-squares refinement uses the
// measured samples only.
func (s *samples) findHoles() {
	n := len(s.u)
	if n < 3 {
		return
	}
	d := make([]float64, n-1)
	for i := range d {
		d[i] = s.u[i+1] - s.u[i]
	}
	gap := 0.0
	loc := make([]float64, 0, 2*holeWindow)
	for i, di := range d {
		// For binned samples only jumps over empty bins say anything about
		// the sparseness of the raw data (see binSweep).
		if s.binned && !s.jump[i+1] {
			continue
		}
		loc = loc[:0]
		for j := max(0, i-holeWindow); j <= min(len(d)-1, i+holeWindow); j++ {
			if j != i && d[j] > 0 {
				loc = append(loc, d[j])
			}
		}
		if len(loc) >= 2 && di > holeRatio*median(loc) {
			s.holes = append(s.holes, [2]float64{s.u[i], s.u[i+1]})
			continue
		}
		gap = math.Max(gap, di)
	}
	s.gap = gap
}
