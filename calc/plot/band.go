package plot

import (
	"fmt"
	"image/color"
	"math"
	"strings"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"cleave/calc/band"
	"cleave/calc/library"
	"cleave/calc/transport"
)

// bandCurve is one subband to draw: its energy (eV from E_F) and |ψ|² on the grid (m^-1).
type bandCurve struct {
	name string
	e    float64
	psi2 []float64
}

// drawBand draws the dark solution of an expected_density result: the conduction-band edge,
// the Fermi level, each subband's energy with its |ψ|² drawn on that level, and the layers
// shaded and named.
func drawBand(d *library.BandDetail, opt Options) (*figure, error) {
	sol := d.Dark
	if sol == nil || len(sol.Z) == 0 {
		return nil, fmt.Errorf("%w: this expected_density result has no solution", ErrNotPlottable)
	}
	var curves []bandCurve
	for k, s := range sol.Subbands {
		if k == 4 {
			break
		}
		p2 := make([]float64, len(s.Psi))
		for i, v := range s.Psi {
			p2[i] = v * v
		}
		curves = append(curves, bandCurve{name: fmt.Sprintf("E%d (%s) = %.1f meV", k, s.Valley, s.E*1e3), e: s.E, psi2: p2})
	}
	f := bandFigure(sol.Z, sol.Ec, curves, d.Stack.Layers, true)
	f.panels[0].Title.Text = fmt.Sprintf("band diagram (dark, %.3g K): n = %.3g × 10¹¹ cm⁻² in the channel", sol.TemperatureK, sol.ChannelN2D*1e-15)
	return f, nil
}

// drawBandProfile draws a band profile data set (z in m, Ec in J, psi2_k in m^-1): the band
// edge, the Fermi level and |ψ|² of each subband column drawn from E_F (the data set does not
// carry the subband energies).
func drawBandProfile(d *transport.Dataset, z, ecJ []float64, _ []band.Layer, opt Options) *figure {
	ec := scaled(ecJ, 1/charge)
	var curves []bandCurve
	for _, c := range d.Columns {
		if strings.HasPrefix(c.Name, "psi2_") {
			curves = append(curves, bandCurve{name: "|ψ|² " + strings.TrimPrefix(c.Name, "psi2_"), e: math.NaN(), psi2: c.Values})
		}
	}
	f := bandFigure(z, ec, curves, nil, false)
	f.panels[0].Title.Text = d.Name
	return f
}

// bandFigure draws energies in meV against depth in nm.
func bandFigure(zM, ecEV []float64, curves []bandCurve, layers []band.Layer, haveE bool) *figure {
	z := scaled(zM, 1e9)
	ec := scaled(ecEV, 1e3)
	p := newPanel("", "depth from the surface (nm)", "energy (meV), E_F = 0")
	lo, hi := extent(ec)
	lo = math.Min(lo, 0)
	for _, c := range curves {
		if haveE {
			lo = math.Min(lo, c.e*1e3)
		}
	}
	span := hi - lo
	if span <= 0 {
		span = 1
	}
	ymin, ymax := lo-0.08*span, hi+0.12*span
	zmin, zmax := extent(z)
	// Layers: shaded bands, one tint per material, named at the top.
	if len(layers) > 0 {
		tints := map[string]int{}
		var order []string
		top := 0.0
		for _, l := range layers {
			t := l.ThicknessM * 1e9
			if _, ok := tints[l.Material]; !ok {
				tints[l.Material] = len(order)
				order = append(order, l.Material)
			}
			x0, x1 := top, math.Min(top+t, zmax)
			if x0 >= zmax {
				break
			}
			c := layerTint(tints[l.Material])
			if t > 0 {
				if poly, err := plotter.NewPolygon(plotter.XYs{{X: x0, Y: ymin}, {X: x1, Y: ymin}, {X: x1, Y: ymax}, {X: x0, Y: ymax}}); err == nil {
					poly.Color = c
					poly.LineStyle.Width = 0
					p.Add(poly)
				}
			} else {
				vline(p, x0, ymin, ymax, colour(4), dash...) // a delta layer
			}
			name := l.Material
			if l.Name != "" {
				name = l.Name + ": " + l.Material
			}
			if l.Doping.Density > 0 {
				name += " (doped)"
			}
			rotatedLabel(p, (x0+x1)/2, ymax, name)
			top += t
		}
	}
	hline(p, 0, zmin, zmax, grey, dash...)
	label(p, zmax, 0, "E_F", grey, 8, -2, 3, draw.XRight)
	lEc := line(p, Decimate(z, ec, 4000), color.Black, 1.3)
	if lEc != nil {
		p.Legend.Add("conduction-band edge", lEc)
	}
	// |ψ|² scaled so that the largest peak spans 12 % of the energy range.
	pmax := 0.0
	for _, c := range curves {
		_, h := extent(c.psi2)
		pmax = math.Max(pmax, h)
	}
	for i, c := range curves {
		if pmax <= 0 {
			break
		}
		base := 0.0
		if haveE && isFinite(c.e) {
			base = c.e * 1e3
		}
		k := 0.12 * span / pmax
		var xy plotter.XYs
		var x0, x1 = math.Inf(1), math.Inf(-1)
		for j := range z {
			if j >= len(c.psi2) {
				break
			}
			if c.psi2[j] > 0.01*pmax {
				x0, x1 = math.Min(x0, z[j]), math.Max(x1, z[j])
			}
			xy = append(xy, plotter.XY{X: z[j], Y: base + k*c.psi2[j]})
		}
		col := colour(i)
		l := line(p, Decimate(z, func() []float64 {
			ys := make([]float64, len(xy))
			for j := range xy {
				ys[j] = xy[j].Y
			}
			return ys
		}(), 4000), col, 0.9)
		if haveE && x0 < x1 {
			line(p, plotter.XYs{{X: x0, Y: base}, {X: x1, Y: base}}, col, 0.8, dot...)
		}
		if l != nil {
			p.Legend.Add(c.name, l)
		}
	}
	p.X.Min, p.X.Max = zmin, zmax
	p.Y.Min, p.Y.Max = ymin, ymax
	p.Legend.Top = false
	return newFigure("band", p)
}

// layerTint is a light fill for the k-th material.
func layerTint(k int) color.Color {
	tints := []color.Color{
		color.RGBA{R: 0xee, G: 0xf2, B: 0xf7, A: 0xff},
		color.RGBA{R: 0xdc, G: 0xe6, B: 0xd5, A: 0xff},
		color.RGBA{R: 0xf5, G: 0xe9, B: 0xd0, A: 0xff},
		color.RGBA{R: 0xe8, G: 0xdc, B: 0xee, A: 0xff},
		color.RGBA{R: 0xd8, G: 0xee, B: 0xee, A: 0xff},
	}
	return tints[k%len(tints)]
}

// fade is a light, opaque version of c (a band behind a line).
func fade(c color.Color) color.Color {
	r, g, b, _ := c.RGBA()
	mix := func(v uint32) uint8 { return uint8(255 - (255-v>>8)*25/100) }
	return color.RGBA{R: mix(r), G: mix(g), B: mix(b), A: 0xff}
}

// rotatedLabel writes text upright along the top of a layer.
func rotatedLabel(p *gplot.Plot, x, y float64, text string) {
	l, err := plotter.NewLabels(plotter.XYLabels{XYs: plotter.XYs{{X: x, Y: y}}, Labels: []string{text}})
	if err != nil {
		return
	}
	for i := range l.TextStyle {
		l.TextStyle[i].Font.Variant = "Sans"
		l.TextStyle[i].Font.Size = vg.Points(7)
		l.TextStyle[i].Color = color.Gray{Y: 90}
		l.TextStyle[i].Rotation = -math.Pi / 2
		l.TextStyle[i].XAlign = draw.XLeft
		l.TextStyle[i].YAlign = draw.YCenter
	}
	l.Offset = vg.Point{Y: vg.Points(-3)}
	p.Add(l)
}
