package transport

import (
	"fmt"
	"math"
	"slices"
)

// ZeroFieldResult is the outcome of ZeroField.
type ZeroFieldResult struct {
	Value    Estimate // the column's value at B = 0 (SI units of the column)
	Fit      *PolyFit // the local fit against B
	XCol     string
	YCol     string
	BMax     float64 // largest |B| among the points used, T
	Points   int
	DataHash string
	Warnings []Warning
}

// MinZeroFieldPoints is the fewest points ZeroField accepts.
const MinZeroFieldPoints = 4

// ZeroField returns the value of column col at B = 0 (field column "B" unless
// WithField says otherwise) by a local least-squares fit to the k points
// nearest B = 0 (WithPoints, default 20), with the standard uncertainty of the
// fitted value at 0 from the fit covariance ([PolyFit.EvalEstimate]).
//
// The fit is a parabola when the points lie on both sides of B = 0 (so that an
// even magnetoresistance and an odd Hall pick-up are both absorbed) and a
// straight line when they lie on one side only; the latter is an
// extrapolation and raises WarnExtrapolated when the nearest point is farther
// from 0 than a quarter of the span used. Fewer than MinZeroFieldPoints usable
// points is an error wrapping ErrTooFewPoints. WithSigma weights the fit.
func ZeroField(d *Dataset, col string, opts ...Option) (*ZeroFieldResult, error) {
	o := newOptions(opts)
	xc, err := column(d, o.field, DimField)
	if err != nil {
		return nil, err
	}
	yc, err := d.Col(col)
	if err != nil {
		return nil, err
	}
	var sig []float64
	if o.sigma != "" {
		sc, err := d.Col(o.sigma)
		if err != nil {
			return nil, err
		}
		sig = sc.Values
	}
	B, Y, S := selectPairs(xc.Values, yc.Values, sig, 0, math.Inf(1))
	k := max(o.points, MinZeroFieldPoints)
	if len(B) < MinZeroFieldPoints {
		return nil, fmt.Errorf("%s: value of %s at B = 0: %d usable points; need at least %d: %w",
			d.Name, yc.Name, len(B), MinZeroFieldPoints, ErrTooFewPoints)
	}
	idx := make([]int, len(B))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		x, y := math.Abs(B[a]), math.Abs(B[b])
		switch {
		case x < y:
			return -1
		case x > y:
			return 1
		}
		return 0
	})
	idx = idx[:min(k, len(idx))]
	bs, ys := make([]float64, len(idx)), make([]float64, len(idx))
	var ss []float64
	if S != nil {
		ss = make([]float64, len(idx))
	}
	neg, pos := false, false
	near := math.Abs(B[idx[0]])
	res := &ZeroFieldResult{XCol: xc.Name, YCol: yc.Name, Points: len(idx), DataHash: d.Hash}
	for i, j := range idx {
		bs[i], ys[i] = B[j], Y[j]
		if ss != nil {
			ss[i] = S[j]
		}
		neg = neg || B[j] < 0
		pos = pos || B[j] > 0
		res.BMax = math.Max(res.BMax, math.Abs(B[j]))
	}
	deg := 1
	if neg && pos && len(idx) >= 5 {
		deg = 2
	}
	fit, err := FitPoly(bs, ys, ss, deg)
	if err != nil {
		return nil, fmt.Errorf("%s: value of %s at B = 0: %w", d.Name, yc.Name, err)
	}
	res.Fit = fit
	res.Value = fit.EvalEstimate(0)
	if !(neg && pos) && near > 0.25*res.BMax {
		res.Warnings = append(res.Warnings, Warning{WarnExtrapolated, fmt.Sprintf(
			"value at B = 0 extrapolated from |B| ≥ %.3g T", near)})
	}
	return res, nil
}
