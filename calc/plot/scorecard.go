package plot

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg/draw"

	"cleave/calc"
)

// drawScorecard draws a wafer's scorecard: the density (top) and the mobility (bottom) each
// cooldown measured, dark and illuminated apart, with their uncertainties, beside the
// expected densities when given.
func drawScorecard(r *calc.AnalysisResult, opt Options) (*figure, error) {
	rv, _ := r.Field("rows")
	rows, _ := rv.(calc.List)
	if len(rows) == 0 {
		return nil, fmt.Errorf("%w: a scorecard without rows", ErrNotPlottable)
	}
	const nUnit, muUnit = 1e15, 100.0 // 10^11 cm^-2 and 10^6 cm^2/(V s), in SI
	pn := newPanel("scorecard: measured beside expected", "", "n (10¹¹ cm⁻²)")
	pm := newPanel("", "cooldown", "μ (10⁶ cm²/(V s))")
	var ids []string
	type series struct {
		xy  plotter.XYs
		err []float64
	}
	ys := func(s series) []float64 {
		out := make([]float64, len(s.xy))
		for i, p := range s.xy {
			out[i] = p.Y + s.err[i]
		}
		return out
	}
	var nDark, nIll, muDark, muIll series
	for i, it := range rows {
		rec, ok := it.(*calc.Record)
		if !ok {
			continue
		}
		id := text(rec, "cooldown")
		ill := text(rec, "illuminated") == "true"
		if ill {
			id += " (ill.)"
		}
		ids = append(ids, id)
		add := func(s *series, name string, unit float64) {
			v, ok := rec.Field(name)
			q, isQ := v.(calc.Quantity)
			if !ok || !isQ {
				return
			}
			s.xy = append(s.xy, plotter.XY{X: float64(i), Y: q.Q.Value() / unit})
			s.err = append(s.err, q.Q.Uncertainty()/unit)
		}
		if ill {
			add(&nIll, "n", nUnit)
			add(&muIll, "mu", muUnit)
		} else {
			add(&nDark, "n", nUnit)
			add(&muDark, "mu", muUnit)
		}
	}
	x0, x1 := -0.5, float64(len(ids))-0.5
	for i, s := range []struct{ dark, ill series }{{nDark, nIll}, {muDark, muIll}} {
		p := pn
		if i == 1 {
			p = pm
		}
		_, top := extent(ys(s.dark), ys(s.ill), []float64{opt.Expected / nUnit, opt.ExpectedIlluminated / nUnit})
		p.Y.Max = 1.15 * top
		if d := points(p, s.dark.xy, s.dark.err, colour(0), draw.CircleGlyph{}); d != nil {
			p.Legend.Add("dark", d)
		}
		if l := points(p, s.ill.xy, s.ill.err, colour(1), draw.RingGlyph{}); l != nil {
			p.Legend.Add("illuminated", l)
		}
	}
	if opt.Expected > 0 {
		hline(pn, opt.Expected/nUnit, x0, x1, colour(0), dash...)
		label(pn, x1, opt.Expected/nUnit, "expected (dark)", colour(0), 7.5, -2, 3, draw.XRight)
	}
	if opt.ExpectedIlluminated > 0 && opt.ExpectedIlluminated != opt.Expected {
		hline(pn, opt.ExpectedIlluminated/nUnit, x0, x1, colour(1), dot...)
		label(pn, x1, opt.ExpectedIlluminated/nUnit, "expected (illuminated)", colour(1), 7.5, -2, 3, draw.XRight)
	}
	for _, p := range []interface{ NominalX(...string) }{pn, pm} {
		p.NominalX(ids...)
	}
	pn.X.Min, pn.X.Max, pm.X.Min, pm.X.Max = x0, x1, x0, x1
	pn.Y.Min, pm.Y.Min = 0, 0
	pn.Y.Max = math.Max(pn.Y.Max, 1.15*opt.Expected/nUnit)
	pn.Legend.Left, pm.Legend.Left = true, true
	pn.Legend.Top, pm.Legend.Top = false, false
	return newFigure("scorecard", pn, pm), nil
}
