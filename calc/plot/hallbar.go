package plot

import (
	"fmt"
	"image/color"
	"math"
	"sort"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"cleave/calc"
	"cleave/calc/quantity"
)

// hallProbe is one voltage probe of a Hall bar, in metres along the bar.
type hallProbe struct {
	name      string
	pos, arm  float64
	top       bool
	hasArmLen bool
}

// drawHallBar draws a mask's (or a geometry record's) Hall bar to scale: the channel, the
// probe arms on their sides numbered with their names, the current contacts at the ends,
// and the width and the spacings between neighbouring probes labelled in µm.
func drawHallBar(r *calc.Record, opt Options) (*figure, error) {
	length := func(name string) (float64, bool) {
		v, ok := r.Field(name)
		q, isQ := v.(calc.Quantity)
		if !ok || !isQ || q.Q.Dim() != quantity.Length || !(q.Q.Value() > 0) {
			return 0, false
		}
		return q.Q.Value(), true
	}
	w, ok := length("width")
	if !ok {
		return nil, fmt.Errorf("%w: a record without a width (a mask or geometry record has width, length and probes)", ErrNotPlottable)
	}
	pv, ok := r.Field("probes")
	list, isList := pv.(calc.List)
	if !ok || !isList || len(list) == 0 {
		return nil, fmt.Errorf("%w: a record without probes (a mask or geometry record has width, length and probes)", ErrNotPlottable)
	}
	var probes []hallProbe
	maxPos := 0.0
	for i, it := range list {
		pr, ok := it.(*calc.Record)
		if !ok {
			return nil, fmt.Errorf("probe %d: expected {name, position, arm_width, side}", i+1)
		}
		p := hallProbe{name: text(pr, "name"), top: text(pr, "side") != "bottom"}
		if p.name == "" {
			p.name = fmt.Sprint(i + 1)
		}
		pos, ok := pr.Field("position")
		pq, isQ := pos.(calc.Quantity)
		if !ok || !isQ || pq.Q.Dim() != quantity.Length {
			return nil, fmt.Errorf("probe %q: position must be a length such as 250 um", p.name)
		}
		p.pos = pq.Q.Value()
		if a, ok := pr.Field("arm_width"); ok {
			if aq, ok := a.(calc.Quantity); ok && aq.Q.Dim() == quantity.Length {
				p.arm = aq.Q.Value()
			}
		}
		if !(p.arm > 0) {
			p.arm = w / 10
		}
		maxPos = math.Max(maxPos, p.pos)
		probes = append(probes, p)
	}
	l, ok := length("length")
	if !ok {
		l = maxPos + w
	}
	source, drain := "source", "drain"
	if c, ok := r.Field("contacts"); ok {
		if cr, ok := c.(*calc.Record); ok {
			if s := text(cr, "source"); s != "" {
				source = s
			}
			if s := text(cr, "drain"); s != "" {
				drain = s
			}
		}
	}
	const um = 1e6
	W, L := w*um, l*um
	arm := 0.8 * W
	pad := math.Max(0.6*W, 0.08*L)
	p := newBare("", "", "")
	p.HideAxes()
	p.Title.Text = fmt.Sprintf("Hall bar to scale: W = %s µm, L = %s µm", trimG(W, 4), trimG(L, 4))
	if name := text(r, "id"); name != "" {
		p.Title.Text = name + " — " + p.Title.Text
	}
	fill := color.RGBA{R: 0xc9, G: 0xd8, B: 0xea, A: 0xff}
	edge := color.RGBA{R: 0x1f, G: 0x4e, B: 0x9a, A: 0xff}
	rect := func(x0, y0, x1, y1 float64) {
		poly, err := plotter.NewPolygon(plotter.XYs{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}})
		if err != nil {
			return
		}
		poly.Color = fill
		poly.LineStyle.Color = edge
		poly.LineStyle.Width = vg.Points(0.8)
		p.Add(poly)
	}
	// contacts at the ends, then the channel and the arms
	rect(-pad, -0.9*W, 0, 0.9*W)
	rect(L, -0.9*W, L+pad, 0.9*W)
	rect(0, -W/2, L, W/2)
	for _, pr := range probes {
		x, a := pr.pos*um, pr.arm*um
		if pr.top {
			rect(x-a/2, W/2, x+a/2, W/2+arm)
			label(p, x, W/2+arm, pr.name, color.Black, 10, 0, 3, draw.XCenter)
		} else {
			rect(x-a/2, -W/2-arm, x+a/2, -W/2)
			label(p, x, -W/2-arm, pr.name, color.Black, 10, 0, -13, draw.XCenter)
		}
	}
	label(p, -pad/2, 0, source, color.Black, 10, 0, -4, draw.XCenter)
	label(p, L+pad/2, 0, drain, color.Black, 10, 0, -4, draw.XCenter)
	// the width, inside the channel near the source end
	xw := math.Min(0.04*L, W)
	dimLine(p, plotter.XYs{{X: xw, Y: -W / 2}, {X: xw, Y: W / 2}})
	label(p, xw, 0, fmt.Sprintf("W = %s µm", trimG(W, 4)), grey, 8, 3, -3, draw.XLeft)
	// spacings between neighbouring probes on each side, above (top) and below (bottom)
	for _, top := range []bool{true, false} {
		var xs []float64
		for _, pr := range probes {
			if pr.top == top {
				xs = append(xs, pr.pos*um)
			}
		}
		sort.Float64s(xs)
		y := W/2 + arm + 0.55*W
		dy := 3.0
		if !top {
			y = -(W/2 + arm + 0.55*W)
			dy = -11
		}
		for i := 1; i < len(xs); i++ {
			dimLine(p, plotter.XYs{{X: xs[i-1], Y: y}, {X: xs[i], Y: y}})
			label(p, (xs[i-1]+xs[i])/2, y, fmt.Sprintf("%s µm", trimG(xs[i]-xs[i-1], 4)), grey, 8, 0, dy, draw.XCenter)
		}
	}
	// the extent, with room for the labels; the canvas keeps the aspect ratio (to scale)
	x0, x1 := -pad, L+pad
	y0, y1 := -(W/2 + arm + 1.1*W), W/2+arm+1.1*W
	// The canvas keeps the aspect ratio of the drawing (to scale); a long, narrow bar gets
	// a taller y range rather than a canvas too flat to read.
	f := newFigure("hallbar", p)
	title := vg.Points(22)
	minH := vg.Points(160)
	h := vg.Length(float64(f.width)*(y1-y0)/(x1-x0)) + title
	if h < minH {
		extra := ((x1-x0)*float64(minH-title)/float64(f.width) - (y1 - y0)) / 2
		y0, y1 = y0-extra, y1+extra
		h = minH
	}
	f.height = h
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = x0, x1, y0, y1
	return f, nil
}

// dimLine is a thin dimension line with end ticks.
func dimLine(p *gplot.Plot, xy plotter.XYs) {
	line(p, xy, grey, 0.6)
}

// text is a record field as text: a string as it is, a number as written.
func text(r *calc.Record, name string) string {
	v, ok := r.Field(name)
	if !ok {
		return ""
	}
	return calc.NameText(v)
}
