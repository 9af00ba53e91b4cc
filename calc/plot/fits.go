package plot

import (
	"fmt"
	"math"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg/draw"

	"cleave/calc/library"
	"cleave/calc/transport"
)

// drawSpectrum draws the SdH Fourier spectrum (amplitude against frequency in 1/B) with the
// fitted frequency f_B marked with its density, and its harmonics 2f_B, 3f_B … inside the
// range searched.
func drawSpectrum(s *transport.SdHResult, opt Options) (*figure, error) {
	if len(s.Spectrum.Freq) == 0 {
		return nil, fmt.Errorf("%w: this sdh_density result has no spectrum", ErrNotPlottable)
	}
	k, unit := resistanceUnit(maxAbs(s.Spectrum.Amp))
	p := newPanel(fmt.Sprintf("SdH spectrum: f_B = %s T, n = %s × 10¹¹ cm⁻²", fmtEst(s.Frequency.Value, s.Frequency.Uncertainty),
		fmtEst(s.Density.Value*1e-15, s.Density.Uncertainty*1e-15)), "frequency in 1/B (T)", fmt.Sprintf("amplitude (%s)", unit))
	amp := scaled(s.Spectrum.Amp, k)
	line(p, Decimate(s.Spectrum.Freq, amp, opt.MaxPoints), colour(0), 1)
	_, top := extent(amp)
	flo, fhi := extent(s.Spectrum.Freq)
	f := s.Frequency.Value
	vline(p, f, 0, top, colour(1), dash...)
	label(p, f, top, "f_B (n)", colour(1), 8, 3, -10, draw.XLeft)
	for h := 2; h <= 6; h++ {
		x := float64(h) * f
		if x > fhi || x < flo {
			break
		}
		vline(p, x, 0, top*0.6, grey, dot...)
		label(p, x, top*0.6, fmt.Sprintf("%df_B", h), grey, 7.5, 0, 2, draw.XCenter)
	}
	if half := f / 2; half >= flo && half <= fhi {
		vline(p, half, 0, top*0.4, grey, dot...)
		label(p, half, top*0.4, "f_B/2 (spin)", grey, 7.5, 0, 2, draw.XCenter)
	}
	p.Y.Min = 0
	return newFigure("spectrum", p), nil
}

// drawDingle draws the Dingle plot, ln[ΔR sinh X/(4 R₀ X)] against 1/B, with error bars and
// the fitted line whose slope gives τ_q.
func drawDingle(d *transport.DingleResult, opt Options) (*figure, error) {
	if len(d.InvB) == 0 || d.Fit == nil {
		return nil, fmt.Errorf("%w: this quantum_lifetime result has no Dingle points", ErrNotPlottable)
	}
	p := newPanel(fmt.Sprintf("Dingle plot: τ_q = %s ps, T_D = %s K", fmtEst(d.QuantumLifetime.Value*1e12, d.QuantumLifetime.Uncertainty*1e12),
		fmtEst(d.DingleTemperature.Value, d.DingleTemperature.Uncertainty)), "1/B (1/T)", "ln[ΔR sinh X / (4 R₀ X)]")
	xy := make(plotter.XYs, len(d.InvB))
	for i := range d.InvB {
		xy[i] = plotter.XY{X: d.InvB[i], Y: d.Y[i]}
	}
	sig := d.Sigma
	if len(sig) != len(xy) {
		sig = nil
	}
	s := points(p, xy, sig, colour(0), nil)
	lo, hi := extent(d.InvB)
	lo, hi = lo-0.05*(hi-lo), hi+0.05*(hi-lo)
	l := line(p, plotter.XYs{{X: lo, Y: d.Fit.Eval(lo)}, {X: hi, Y: d.Fit.Eval(hi)}}, colour(1), 1.2)
	if s != nil {
		p.Legend.Add(fmt.Sprintf("%d extrema", len(xy)), s)
	}
	if l != nil {
		p.Legend.Add(fmt.Sprintf("slope %s T", fmtEst(d.Slope.Value, d.Slope.Uncertainty)), l)
	}
	return newFigure("dingle", p), nil
}

// lkCurve is A0 X/sinh X against T (K) at field B (T) for mass m (kg).
func lkCurve(a0, b, m, tmax float64) plotter.XYs {
	const n = 120
	xy := make(plotter.XYs, 0, n+1)
	for i := 0; i <= n; i++ {
		t := tmax * float64(i) / n
		x := 2 * math.Pi * math.Pi * kB * t * m / (hbar * charge * b)
		g := 1.0
		if x > 1e-9 {
			g = x / math.Sinh(x)
		}
		xy = append(xy, plotter.XY{X: t, Y: a0 * g})
	}
	return xy
}

// drawMassTable draws an lk_mass fit of amplitudes against temperature at one field: the
// points with their error bars and A0 X/sinh X at the fitted mass.
func drawMassTable(r *transport.LKResult, opt Options) (*figure, error) {
	p := newPanel(fmt.Sprintf("thermal damping at %s T: m* = %s m_e", trimG(r.B, 4), fmtEst(r.MassRatio.Value, r.MassRatio.Uncertainty)),
		"T (K)", "oscillation amplitude")
	xy := make(plotter.XYs, len(r.T))
	for i := range r.T {
		xy[i] = plotter.XY{X: r.T[i], Y: r.A[i]}
	}
	var sig []float64
	if len(r.Sigma) == len(r.T) {
		sig = r.Sigma
	}
	points(p, xy, sig, colour(0), nil)
	_, tmax := extent(r.T)
	l := line(p, lkCurve(r.A0.Value, r.B, r.Mass.Value, tmax*1.1), colour(1), 1.2)
	if l != nil {
		p.Legend.Add("A₀ X/sinh X", l)
	}
	p.X.Min, p.Y.Min = 0, 0
	return newFigure("mass", p), nil
}

// drawMassSweeps draws the thermal damping at each extremum of an lk_mass fit over sweeps:
// each extremum's amplitudes divided by its fitted A0 against T, with its fitted curve
// (up to eight extrema; each has its own field, so its own curve).
func drawMassSweeps(r *transport.LKSweepsResult, opt Options) (*figure, error) {
	p := newPanel(fmt.Sprintf("thermal damping: m* = %s m_e (%d extrema)", fmtEst(r.MassRatio.Value, r.MassRatio.Uncertainty), len(r.Extrema)),
		"T (K)", "amplitude / A₀")
	_, tmax := extent(r.Temperatures)
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.RingGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}}
	shown := 0
	for _, e := range r.Extrema {
		f := e.Fit
		if f == nil || !(f.A0.Value != 0) || shown == 8 {
			continue
		}
		a0 := f.A0.Value
		xy := make(plotter.XYs, len(f.T))
		var sig []float64
		for i := range f.T {
			xy[i] = plotter.XY{X: f.T[i], Y: f.A[i] / a0}
		}
		if len(f.Sigma) == len(f.T) {
			sig = scaled(f.Sigma, 1/math.Abs(a0))
		}
		c := colour(shown)
		s := points(p, xy, sig, c, shapes[shown%len(shapes)])
		line(p, lkCurve(1, f.B, f.Mass.Value, tmax*1.1), c, 0.9)
		if s != nil {
			p.Legend.Add(fmt.Sprintf("%s T: %s m_e", trimG(e.B, 3), fmtEst(f.MassRatio.Value, f.MassRatio.Uncertainty)), s)
		}
		shown++
	}
	if shown == 0 {
		return nil, fmt.Errorf("%w: this lk_mass result has no fitted extrema", ErrNotPlottable)
	}
	p.X.Min, p.Y.Min = 0, 0
	return newFigure("mass", p), nil
}

// drawFan draws the Landau fan in the B–n plane: the lines n = ν e B/h of the integer filling
// factors, the measured density with its uncertainty as a band, and (for a landau_fan result)
// the fields of the R_xx minima at that density, labelled with their ν.
func drawFan(d *library.FanDetail, n, sigma float64, opt Options) (*figure, error) {
	if !(n > 0) {
		return nil, fmt.Errorf("%w: a Landau fan needs a positive density", ErrNotPlottable)
	}
	const unit = 1e15                  // 10^11 cm^-2 in m^-2
	bmax := 1.15 * n * planck / charge // past ν = 1
	if d != nil {
		_, hi := extent(d.B)
		bmax = math.Max(1.2*math.Abs(hi), math.Min(bmax, 3*math.Abs(hi)))
	}
	nmax := 1.6 * n / unit
	p := newPanel(fmt.Sprintf("Landau fan: n = %s × 10¹¹ cm⁻²", fmtEst(n/unit, sigma/unit)), "B (T)", "n (10¹¹ cm⁻²)")
	lastTop, lastSide := math.Inf(1), math.Inf(-1)
	for nu := 1; nu <= 40; nu++ {
		slope := float64(nu) * charge / planck / unit // per T
		bEnd := math.Min(bmax, nmax/slope)
		line(p, plotter.XYs{{X: 0, Y: 0}, {X: bEnd, Y: slope * bEnd}}, lightGrey, 0.7)
		switch {
		case bEnd < bmax && lastTop-bEnd > 0.05*bmax:
			label(p, bEnd, nmax, fmt.Sprintf("%d", nu), grey, 7, 0, 2, draw.XCenter)
			lastTop = bEnd
		case bEnd >= bmax && slope*bmax-lastSide > 0.06*nmax:
			label(p, bmax, slope*bmax, fmt.Sprintf("ν=%d", nu), grey, 7, -2, 2, draw.XRight)
			lastSide = slope * bmax
		}
	}
	if sigma > 0 {
		band, err := plotter.NewPolygon(plotter.XYs{{X: 0, Y: (n - sigma) / unit}, {X: bmax, Y: (n - sigma) / unit}, {X: bmax, Y: (n + sigma) / unit}, {X: 0, Y: (n + sigma) / unit}})
		if err == nil {
			band.Color = fade(colour(1))
			band.LineStyle.Width = 0
			p.Add(band)
		}
	}
	l := line(p, plotter.XYs{{X: 0, Y: n / unit}, {X: bmax, Y: n / unit}}, colour(1), 1.2)
	if l != nil {
		p.Legend.Add("measured n", l)
	}
	if d != nil {
		xy := make(plotter.XYs, len(d.B))
		labels := make([]string, len(d.B))
		for i, b := range d.B {
			xy[i] = plotter.XY{X: math.Abs(b), Y: n / unit}
			labels[i] = fmt.Sprintf("ν=%g", d.Nu[i])
		}
		s := points(p, xy, nil, colour(0), nil)
		if d.SigmaB != nil && len(d.SigmaB) == len(d.B) {
			xe := make(plotter.XErrors, len(d.B))
			for i, sb := range d.SigmaB {
				xe[i].Low, xe[i].High = sb, sb
			}
			if eb, err := plotter.NewXErrorBars(struct {
				plotter.XYs
				plotter.XErrors
			}{xy, xe}); err == nil {
				eb.LineStyle.Color = colour(0)
				p.Add(eb)
			}
		}
		if s != nil {
			p.Legend.Add("fields of the R_xx minima", s)
		}
		for i := range xy {
			label(p, xy[i].X, xy[i].Y, labels[i], colour(0), 7, 0, -12, draw.XCenter)
		}
	}
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, bmax, 0, nmax
	p.Legend.Left = true
	return newFigure("fan", p), nil
}

// drawGate draws a gate series, n against V_g with error bars, and the fitted line.
func drawGate(d *library.GateDetail, opt Options) (*figure, error) {
	const unit = 1e15
	p := newPanel(fmt.Sprintf("gate series: C = %s µF/cm², V_th = %s V", fmtEst(d.Capacitance.Value*100, d.Capacitance.Uncertainty*100),
		fmtEst(d.Threshold.Value, d.Threshold.Uncertainty)), "V_g (V)", "n (10¹¹ cm⁻²)")
	xy := make(plotter.XYs, len(d.Vg))
	for i := range d.Vg {
		xy[i] = plotter.XY{X: d.Vg[i], Y: d.N[i] / unit}
	}
	var sig []float64
	if len(d.SigmaN) == len(d.Vg) {
		sig = scaled(d.SigmaN, 1/unit)
	}
	points(p, xy, sig, colour(0), nil)
	lo, hi := extent(d.Vg, []float64{d.Threshold.Value})
	line(p, plotter.XYs{{X: lo, Y: d.Fit.Eval(lo) / unit}, {X: hi, Y: d.Fit.Eval(hi) / unit}}, colour(1), 1.2)
	return newFigure("gate", p), nil
}

// drawPowerLaw draws mobility against density on logarithmic axes with the fitted μ ∝ n^α.
func drawPowerLaw(d *library.PowerLawDetail, opt Options) (*figure, error) {
	p := newPanel(fmt.Sprintf("mobility: μ ∝ n^α, α = %s", fmtEst(d.Alpha.Value, d.Alpha.Uncertainty)), "n (10¹¹ cm⁻²)", "μ (10⁶ cm²/(V s))")
	p.X.Scale, p.Y.Scale = gplot.LogScale{}, gplot.LogScale{}
	p.X.Tick.Marker, p.Y.Tick.Marker = gplot.LogTicks{Prec: -1}, gplot.LogTicks{Prec: -1}
	xy := make(plotter.XYs, 0, len(d.N))
	for i := range d.N {
		if d.N[i] > 0 && d.Mu[i] > 0 {
			xy = append(xy, plotter.XY{X: d.N[i] / 1e15, Y: d.Mu[i] / 100})
		}
	}
	points(p, xy, nil, colour(0), nil)
	lo, hi := extent(d.N)
	if lo > 0 {
		var fit plotter.XYs
		for i := 0; i <= 40; i++ {
			n := lo * math.Pow(hi/lo, float64(i)/40)
			fit = append(fit, plotter.XY{X: n / 1e15, Y: d.Prefactor.Value * math.Pow(n/d.NRef, d.Alpha.Value) / 100})
		}
		line(p, fit, colour(1), 1.2)
	}
	return newFigure("power_law", p), nil
}
