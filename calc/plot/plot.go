// Package plot draws the notebook's typed values as SVG with gonum/plot: a sweep's R_xx and
// R_xy against B with the filling factors of a density and the R_K/ν lines, a Hall fit, the
// SdH Fourier spectrum with its peak and harmonics, the Landau fan in the B–n plane, the Dingle
// plot and the thermal-damping (mass) fit with their fitted lines, the band diagram of a
// solved layer stack, a mask's Hall bar to scale, a wafer's scorecard, and the gate and
// mobility fits.
//
// Every figure is deterministic: the same value and options give the same bytes (no time, no
// random identifiers, no map order; fonts are named, not embedded). Quantities are drawn in
// the trade's units (T, Ω or kΩ, 10¹¹ cm⁻², 10⁶ cm²/(V s), meV, nm, µm), and uncertainties
// appear as error bars where a value carries them. Sweeps longer than a few thousand points
// are decimated for drawing by keeping each bucket's first, last, smallest and largest point,
// so no extremum is lost.
//
// [Draw] takes any value; [Func] is the calc function plot(...) that an entry's block calls.
// The package imports calc and calc/library, never the notebook.
package plot

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"image/color"
	"math"
	"strconv"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"cleave/calc"
	"cleave/calc/constants"
	"cleave/calc/library"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// Options tune a figure. Zero values mean "not given".
type Options struct {
	// Density (m^-2) marks the filling factors ν = h n/(e B) and the R_K/ν lines on a sweep,
	// and is the density of a Landau fan drawn from a quantity.
	Density float64
	// Expected (m^-2) is the expected density drawn on a scorecard (dark), and
	// ExpectedIlluminated the one after illumination.
	Expected, ExpectedIlluminated float64
	// Title replaces the figure's own title.
	Title string
	// MaxPoints bounds the points drawn per curve (decimation keeps the extrema); 0 means
	// DefaultMaxPoints.
	MaxPoints int
}

// DefaultMaxPoints is the number of points a curve is decimated to for drawing.
const DefaultMaxPoints = 4000

// Picture is a drawn figure: its kind ("sweep", "hall", "spectrum", "fan", "dingle", "mass",
// "band", "hallbar", "scorecard", "gate", "power_law", "data") and its SVG bytes.
type Picture struct {
	Kind string
	SVG  []byte
}

// Hash is the hex SHA-256 of the SVG bytes.
func (p *Picture) Hash() string {
	s := sha256.Sum256(p.SVG)
	return hex.EncodeToString(s[:])
}

// ErrNotPlottable is returned (wrapped) for a value no figure draws.
var ErrNotPlottable = errors.New("not plottable")

// Draw draws v: a data set (a sweep with B and R_xx or R_xy, a band profile, or any table),
// a fit result (hall_density, sdh_density, quantum_lifetime, lk_mass, landau_fan,
// gate_capacitance, mobility_power_law), a band result (expected_density), a scorecard, a
// density (its Landau fan) or a mask or geometry record (its Hall bar).
func Draw(v calc.Value, opt Options) (*Picture, error) {
	if opt.MaxPoints <= 0 {
		opt.MaxPoints = DefaultMaxPoints
	}
	var f *figure
	var err error
	switch x := v.(type) {
	case *library.DataSet:
		f, err = drawDataSet(x.D, opt)
	case *calc.AnalysisResult:
		f, err = drawResult(x, opt)
	case calc.Quantity:
		if x.Q.Dim() != quantity.Length.Pow(-2) {
			return nil, fmt.Errorf("%w: a %s quantity (a density draws its Landau fan)", ErrNotPlottable, x.Q.Dim())
		}
		f, err = drawFan(nil, x.Q.Value(), x.Q.Uncertainty(), opt)
	case *calc.Record:
		f, err = drawHallBar(x, opt)
	default:
		return nil, fmt.Errorf("%w: a %s", ErrNotPlottable, v.Type())
	}
	if err != nil {
		return nil, err
	}
	if opt.Title != "" {
		f.panels[0].Title.Text = opt.Title
	}
	svg, err := f.render()
	if err != nil {
		return nil, err
	}
	return &Picture{Kind: f.kind, SVG: svg}, nil
}

func drawResult(r *calc.AnalysisResult, opt Options) (*figure, error) {
	switch d := r.Detail.(type) {
	case *transport.HallResult:
		return drawHall(d, opt)
	case *transport.SdHResult:
		return drawSpectrum(d, opt)
	case *transport.DingleResult:
		return drawDingle(d, opt)
	case *transport.LKResult:
		return drawMassTable(d, opt)
	case *transport.LKSweepsResult:
		return drawMassSweeps(d, opt)
	case *library.FanDetail:
		return drawFan(d, d.Density.Value, d.Density.Uncertainty, opt)
	case *library.GateDetail:
		return drawGate(d, opt)
	case *library.PowerLawDetail:
		return drawPowerLaw(d, opt)
	case *library.BandDetail:
		return drawBand(d, opt)
	}
	if r.Kind == "scorecard" {
		return drawScorecard(r, opt)
	}
	return nil, fmt.Errorf("%w: a %s (plottable results: hall_density, sdh_density, quantum_lifetime, lk_mass, landau_fan, gate_capacitance, mobility_power_law, expected_density, scorecard)", ErrNotPlottable, r.Type())
}

// figure is one or more panels stacked vertically with a common x axis, drawn on a canvas of
// the given size.
type figure struct {
	kind   string
	panels []*gplot.Plot
	width  vg.Length
	height vg.Length
}

const (
	figWidth    = 6 * vg.Inch
	panelHeight = 3.2 * vg.Inch
)

func newFigure(kind string, panels ...*gplot.Plot) *figure {
	return &figure{kind: kind, panels: panels, width: figWidth, height: panelHeight*vg.Length(len(panels)) + vg.Length(0.3*vg.Inch)*vg.Length(len(panels)-1)}
}

// render draws the figure as SVG without embedded fonts (the text names Liberation Sans, a
// browser draws it with the closest sans-serif font).
func (f *figure) render() ([]byte, error) {
	c := vgsvg.NewWith(vgsvg.UseWH(f.width, f.height), vgsvg.EmbedFonts(false))
	dc := draw.New(c)
	if len(f.panels) == 1 {
		f.panels[0].Draw(dc)
	} else {
		rows := make([][]*gplot.Plot, len(f.panels))
		for i, p := range f.panels {
			rows[i] = []*gplot.Plot{p}
		}
		tiles := draw.Tiles{Rows: len(f.panels), Cols: 1, PadY: vg.Points(14), PadTop: vg.Points(2), PadBottom: vg.Points(2), PadLeft: vg.Points(2), PadRight: vg.Points(8)}
		canvases := gplot.Align(rows, tiles, dc)
		for i, p := range f.panels {
			p.Draw(canvases[i][0])
		}
	}
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// newPanel is a plot with sans-serif text, a light grid and the given labels.
func newPanel(title, xlabel, ylabel string) *gplot.Plot {
	p := newBare(title, xlabel, ylabel)
	g := plotter.NewGrid()
	g.Vertical.Color = color.Gray{Y: 225}
	g.Horizontal.Color = color.Gray{Y: 225}
	g.Vertical.Width = vg.Points(0.4)
	g.Horizontal.Width = vg.Points(0.4)
	p.Add(g)
	return p
}

// newBare is a plot with sans-serif text and the given labels, without a grid.
func newBare(title, xlabel, ylabel string) *gplot.Plot {
	p := gplot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	for _, f := range []*font.Font{&p.Title.TextStyle.Font, &p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font,
		&p.X.Tick.Label.Font, &p.Y.Tick.Label.Font, &p.Legend.TextStyle.Font} {
		f.Variant = "Sans"
	}
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.TextStyle.Font.Size = vg.Points(10)
	p.Y.Label.TextStyle.Font.Size = vg.Points(10)
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.Legend.Top = true
	return p
}

// Colours of the curves, in order (a palette readable when printed in grey).
var palette = []color.Color{
	color.RGBA{R: 0x1f, G: 0x4e, B: 0x9a, A: 0xff},
	color.RGBA{R: 0xc0, G: 0x39, B: 0x2b, A: 0xff},
	color.RGBA{R: 0x2e, G: 0x7d, B: 0x32, A: 0xff},
	color.RGBA{R: 0x8e, G: 0x44, B: 0xad, A: 0xff},
	color.RGBA{R: 0xd6, G: 0x7d, B: 0x00, A: 0xff},
	color.RGBA{R: 0x00, G: 0x83, B: 0x8f, A: 0xff},
	color.RGBA{R: 0x6d, G: 0x4c, B: 0x41, A: 0xff},
	color.RGBA{R: 0x55, G: 0x55, B: 0x55, A: 0xff},
}

func colour(i int) color.Color { return palette[i%len(palette)] }

var (
	grey      = color.Gray{Y: 120}
	lightGrey = color.Gray{Y: 200}
)

// line adds a polyline of the points (NaN points are dropped) in colour c.
func line(p *gplot.Plot, xys plotter.XYs, c color.Color, width float64, dashes ...vg.Length) *plotter.Line {
	xys = finite(xys)
	if len(xys) == 0 {
		return nil
	}
	l, err := plotter.NewLine(xys)
	if err != nil {
		return nil
	}
	l.Color = c
	l.Width = vg.Points(width)
	l.Dashes = dashes
	p.Add(l)
	return l
}

// points adds markers with optional symmetric y error bars (yerr nil: none).
func points(p *gplot.Plot, xys plotter.XYs, yerr []float64, c color.Color, shape draw.GlyphDrawer) *plotter.Scatter {
	var keep plotter.XYs
	var errs plotter.YErrors
	for i, pt := range xys {
		if !isFinite(pt.X) || !isFinite(pt.Y) {
			continue
		}
		keep = append(keep, pt)
		e := 0.0
		if yerr != nil && i < len(yerr) && isFinite(yerr[i]) {
			e = math.Abs(yerr[i])
		}
		errs = append(errs, struct{ Low, High float64 }{e, e})
	}
	if len(keep) == 0 {
		return nil
	}
	if yerr != nil {
		eb, err := plotter.NewYErrorBars(struct {
			plotter.XYs
			plotter.YErrors
		}{keep, errs})
		if err == nil {
			eb.LineStyle.Color = c
			eb.LineStyle.Width = vg.Points(0.8)
			p.Add(eb)
		}
	}
	s, err := plotter.NewScatter(keep)
	if err != nil {
		return nil
	}
	s.GlyphStyle.Color = c
	s.GlyphStyle.Radius = vg.Points(2.6)
	if shape != nil {
		s.GlyphStyle.Shape = shape
	} else {
		s.GlyphStyle.Shape = draw.CircleGlyph{}
	}
	p.Add(s)
	return s
}

// vline and hline are straight reference lines across the given range.
func vline(p *gplot.Plot, x, y0, y1 float64, c color.Color, dashes ...vg.Length) {
	line(p, plotter.XYs{{X: x, Y: y0}, {X: x, Y: y1}}, c, 0.7, dashes...)
}

func hline(p *gplot.Plot, y, x0, x1 float64, c color.Color, dashes ...vg.Length) {
	line(p, plotter.XYs{{X: x0, Y: y}, {X: x1, Y: y}}, c, 0.7, dashes...)
}

// label adds text at data coordinates with an offset in points.
func label(p *gplot.Plot, x, y float64, text string, c color.Color, size float64, dx, dy float64, xalign draw.XAlignment) {
	if !isFinite(x) || !isFinite(y) {
		return
	}
	l, err := plotter.NewLabels(plotter.XYLabels{XYs: plotter.XYs{{X: x, Y: y}}, Labels: []string{text}})
	if err != nil {
		return
	}
	for i := range l.TextStyle {
		l.TextStyle[i].Font.Variant = "Sans"
		l.TextStyle[i].Font.Size = vg.Points(size)
		l.TextStyle[i].Color = c
		l.TextStyle[i].XAlign = xalign
	}
	l.Offset = vg.Point{X: vg.Points(dx), Y: vg.Points(dy)}
	p.Add(l)
}

var dash = []vg.Length{vg.Points(4), vg.Points(3)}
var dot = []vg.Length{vg.Points(1.5), vg.Points(2)}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func finite(xys plotter.XYs) plotter.XYs {
	out := xys[:0:0]
	for _, p := range xys {
		if isFinite(p.X) && isFinite(p.Y) {
			out = append(out, p)
		}
	}
	return out
}

// Decimate returns at most about max points of the curve (x[i], y[i]) for drawing: the points
// are cut into consecutive buckets and each bucket keeps its first and last point and those
// with the smallest and largest y, in their original order, so every extremum survives.
// NaN points are dropped. A curve with no more than max points is returned as it is.
func Decimate(x, y []float64, max int) plotter.XYs {
	n := min(len(x), len(y))
	if max < 8 {
		max = 8
	}
	if n <= max {
		out := make(plotter.XYs, 0, n)
		for i := range n {
			if isFinite(x[i]) && isFinite(y[i]) {
				out = append(out, plotter.XY{X: x[i], Y: y[i]})
			}
		}
		return out
	}
	buckets := max / 4
	out := make(plotter.XYs, 0, 4*buckets)
	for b := range buckets {
		lo, hi := b*n/buckets, (b+1)*n/buckets
		first, last, imin, imax := -1, -1, -1, -1
		for i := lo; i < hi; i++ {
			if !isFinite(x[i]) || !isFinite(y[i]) {
				continue
			}
			if first < 0 {
				first = i
			}
			last = i
			if imin < 0 || y[i] < y[imin] {
				imin = i
			}
			if imax < 0 || y[i] > y[imax] {
				imax = i
			}
		}
		if first < 0 {
			continue
		}
		idx := []int{first, imin, imax, last}
		// keep index order, without repeats
		for i := 1; i < len(idx); i++ {
			for j := i; j > 0 && idx[j] < idx[j-1]; j-- {
				idx[j], idx[j-1] = idx[j-1], idx[j]
			}
		}
		prev := -1
		for _, i := range idx {
			if i != prev {
				out = append(out, plotter.XY{X: x[i], Y: y[i]})
				prev = i
			}
		}
	}
	return out
}

// scaled multiplies values by k.
func scaled(v []float64, k float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * k
	}
	return out
}

// resistanceUnit picks Ω or kΩ for resistances up to maxAbs (Ω): the scale to multiply by
// and the unit's name.
func resistanceUnit(maxAbs float64) (float64, string) {
	switch {
	case maxAbs >= 1e6:
		return 1e-6, "MΩ"
	case maxAbs >= 2e3:
		return 1e-3, "kΩ"
	}
	return 1, "Ω"
}

// maxAbs is the largest |x| over finite values (0 when none).
func maxAbs(v ...[]float64) float64 {
	m := 0.0
	for _, s := range v {
		for _, x := range s {
			if isFinite(x) {
				m = math.Max(m, math.Abs(x))
			}
		}
	}
	return m
}

// extent is the finite minimum and maximum of values (0, 0 when none).
func extent(v ...[]float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, s := range v {
		for _, x := range s {
			if isFinite(x) {
				lo, hi = math.Min(lo, x), math.Max(hi, x)
			}
		}
	}
	if lo > hi {
		return 0, 0
	}
	return lo, hi
}

// Physical constants (CODATA 2018, exact in the SI since 2019).
var (
	planck = constants.Value("h")
	charge = constants.Value("e")
	kB     = constants.Value("k_B")
	hbar   = constants.Value("hbar")
	mE     = constants.Value("m_e")
	rK     = constants.Value("R_K") // h/e²
)

// fmtEst formats value ± uncertainty with the precision the uncertainty allows (two
// significant figures of it), or with four significant figures when it has none.
func fmtEst(v, u float64) string {
	if !(u > 0) || !isFinite(u) {
		return trimG(v, 4)
	}
	d := int(math.Floor(math.Log10(u))) - 1
	dec := max(0, -d)
	return fmt.Sprintf("%.*f ± %.*f", dec, v, dec, u)
}

// trimG formats v with at most sig significant figures.
func trimG(v float64, sig int) string { return strconv.FormatFloat(v, 'g', sig, 64) }
