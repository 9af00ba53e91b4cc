package plot

import (
	"fmt"
	"math"
	"strings"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg/draw"

	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// drawDataSet draws a sweep (B with R_xx and/or R_xy), a band profile (z with Ec), or any
// other table (its first column against up to four others, one panel each).
func drawDataSet(d *transport.Dataset, opt Options) (*figure, error) {
	if d.Len() == 0 || len(d.Columns) < 2 {
		return nil, fmt.Errorf("%w: the data set %s has %d rows and %d columns", ErrNotPlottable, d.Name, d.Len(), len(d.Columns))
	}
	b, errB := d.Col("B")
	rxx, errXX := d.Col("Rxx")
	rxy, errXY := d.Col("Rxy")
	if errB == nil && (errXX == nil || errXY == nil) {
		if errXX != nil {
			rxx = nil
		}
		if errXY != nil {
			rxy = nil
		}
		return drawSweep(d, b.Values, rxx, rxy, opt), nil
	}
	z, errZ := d.Col("z")
	ec, errEc := d.Col("Ec")
	if errZ == nil && errEc == nil {
		return drawBandProfile(d, z.Values, ec.Values, nil, opt), nil
	}
	return drawTable(d, opt), nil
}

// drawSweep draws R_xx (top) and R_xy (bottom) against B. With a density, each integer
// filling factor ν = h n/(e B) inside the field range is marked by a dotted line, labelled
// where the marks are far enough apart, and the R_xy panel shows R_K/ν for the same ν.
func drawSweep(d *transport.Dataset, b []float64, rxx, rxy *transport.Column, opt Options) *figure {
	title := "R_xx and R_xy: " + shorten(d.Name, 48)
	bmin, bmax := extent(b)
	var panels []*gplot.Plot
	type panel struct {
		p      *gplot.Plot
		lo, hi float64 // y extent, display units
		k      float64
		isXY   bool
	}
	var ps []panel
	for _, c := range []*transport.Column{rxx, rxy} {
		if c == nil {
			continue
		}
		k, unit := resistanceUnit(maxAbs(c.Values))
		name := "R_xx"
		if c == rxy {
			name = "R_xy"
		}
		p := newPanel("", "B (T)", fmt.Sprintf("%s (%s)", name, unit))
		line(p, Decimate(b, scaled(c.Values, k), opt.MaxPoints), colour(len(ps)), 0.9)
		lo, hi := extent(c.Values)
		ps = append(ps, panel{p: p, lo: lo * k, hi: hi * k, k: k, isXY: c == rxy})
		panels = append(panels, p)
	}
	if n := opt.Density; n > 0 {
		title += fmt.Sprintf("\nfilling factors ν = h n/(e B) of n = %s × 10¹¹ cm⁻², R_K/ν near each", trimG(n*1e-15, 4))
		bmaxAbs := math.Max(math.Abs(bmin), math.Abs(bmax))
		bminAbs := 0.0
		if bmin > 0 {
			bminAbs = bmin
		} else if bmax < 0 {
			bminAbs = -bmax
		}
		span := bmax - bmin
		// ν from the highest field down, while the marks stay 2.5 % of the field range apart
		// (labels: 6 %).
		lastLabel := math.Inf(1)
		for nu := 1; nu <= 60; nu++ {
			bnu := n * planck / (charge * float64(nu))
			if bnu > bmaxAbs {
				continue
			}
			next := n * planck / (charge * float64(nu+1))
			if bnu < bminAbs || bnu-next < 0.025*span/2 {
				break
			}
			labelIt := lastLabel-bnu > 0.06*span
			if labelIt {
				lastLabel = bnu
			}
			for _, sign := range []float64{1, -1} {
				x := sign * bnu
				if x < bmin || x > bmax {
					continue
				}
				for i, pn := range ps {
					vline(pn.p, x, pn.lo, pn.hi, lightGrey, dot...)
					if i == 0 && labelIt {
						label(pn.p, x, pn.hi, fmt.Sprintf("ν=%d", nu), grey, 7.5, 0, 2, draw.XCenter)
					}
					if !pn.isXY || !labelIt {
						continue
					}
					// R_K/ν as a short segment around B_ν, on the side the data lie.
					y := math.Copysign(rK/float64(nu)*pn.k, interp(b, scaled(rxy.Values, pn.k), x))
					if y < pn.lo-0.1*(pn.hi-pn.lo) || y > pn.hi+0.1*(pn.hi-pn.lo) {
						continue
					}
					line(pn.p, plotter.XYs{{X: x - 0.12*sign*bnu, Y: y}, {X: x + 0.12*sign*bnu, Y: y}}, grey, 0.9, dash...)
					label(pn.p, x, y, fmt.Sprintf("R_K/%d", nu), grey, 7, 0, -10, draw.XCenter)
				}
			}
		}
	}
	panels[0].Title.Text = title
	return newFigure("sweep", panels...)
}

// drawHall draws the points of a Hall fit and the fitted line.
func drawHall(h *transport.HallResult, opt Options) (*figure, error) {
	k, unit := resistanceUnit(maxAbs(h.R))
	p := newPanel(fmt.Sprintf("Hall fit: n = %s × 10¹¹ cm⁻² (%s)", fmtEst(h.Density.Value*1e-15, h.Density.Uncertainty*1e-15), h.Carriers),
		"B (T)", fmt.Sprintf("%s (%s)", axisName(h.YCol), unit))
	pts := Decimate(h.B, scaled(h.R, k), opt.MaxPoints)
	if s := points(p, pts, nil, colour(0), nil); s != nil && len(pts) > 100 {
		s.GlyphStyle.Radius = 1
	}
	lo, hi := extent(h.B)
	fit := plotter.XYs{{X: lo, Y: h.Fit.Eval(lo) * k}, {X: hi, Y: h.Fit.Eval(hi) * k}}
	l := line(p, fit, colour(1), 1.2)
	if l != nil {
		p.Legend.Add(fmt.Sprintf("slope %s Ω/T", fmtEst(h.Slope.Value, h.Slope.Uncertainty)), l)
	}
	return newFigure("hall", p), nil
}

// axisName writes a column name with the usual subscript: Rxx → R_xx.
func axisName(col string) string {
	switch strings.ToLower(col) {
	case "rxx":
		return "R_xx"
	case "rxy":
		return "R_xy"
	}
	return col
}

// drawTable draws the first column of a data set against up to four others.
func drawTable(d *transport.Dataset, opt Options) *figure {
	x := d.Columns[0]
	var panels []*gplot.Plot
	for i, c := range d.Columns[1:] {
		if i == 4 {
			break
		}
		xs, xu := displayScale(x)
		ys, yu := displayScale(c)
		p := newPanel("", withUnit(x.Name, xu), withUnit(c.Name, yu))
		line(p, Decimate(scaled(x.Values, xs), scaled(c.Values, ys), opt.MaxPoints), colour(i), 0.9)
		panels = append(panels, p)
	}
	panels[0].Title.Text = shorten(d.Name, 80)
	return newFigure("data", panels...)
}

func withUnit(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " (" + unit + ")"
}

// displayScale gives the factor from a column's SI values to its header unit, and the unit.
func displayScale(c transport.Column) (float64, string) {
	if c.Unit == "" {
		return 1, ""
	}
	u, err := quantity.ParseUnit(c.Unit)
	if err != nil || u.Scale == 0 {
		return 1, ""
	}
	return 1 / u.Scale, c.Unit
}

// shorten cuts s to at most n runes with an ellipsis.
func shorten(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}

// interp is y at x by linear interpolation between the nearest points of the curve (x need
// not be sorted: the nearest points on either side are taken); NaN when none.
func interp(xs, ys []float64, x float64) float64 {
	lo, hi := -1, -1
	for i, v := range xs {
		if !isFinite(v) || !isFinite(ys[i]) {
			continue
		}
		if v <= x && (lo < 0 || v > xs[lo]) {
			lo = i
		}
		if v >= x && (hi < 0 || v < xs[hi]) {
			hi = i
		}
	}
	switch {
	case lo < 0 && hi < 0:
		return math.NaN()
	case lo < 0:
		return ys[hi]
	case hi < 0 || xs[hi] == xs[lo]:
		return ys[lo]
	}
	t := (x - xs[lo]) / (xs[hi] - xs[lo])
	return ys[lo] + t*(ys[hi]-ys[lo])
}
