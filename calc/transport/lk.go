package transport

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"cleave/calc/quantity"
	"gonum.org/v1/gonum/mat"
)

// LKResult is the outcome of a Lifshitz–Kosevich fit at one field.
type LKResult struct {
	Mass      Estimate // m*, kg
	MassRatio Estimate // m*/m_e
	A0        Estimate // amplitude at T → 0 (units of A)
	B         float64  // field, T
	T, A      []float64
	Sigma     []float64 // standard uncertainties of A; nil when not given
	Fitted    []float64 // A0·X/sinh X at each T
	Chi2      float64   // sum of squared (weighted) residuals
	Method    string
	Warnings  []Warning
}

// MinLKPoints is the fewest temperatures an LK fit accepts.
const MinLKPoints = 3

// LKMassTable fits the oscillation amplitudes A (any unit, > 0) measured at
// temperatures T (K) at one field B (T) with the Lifshitz–Kosevich form
//
//	A(T) = A0 · X/sinh X,  X = 2π² k_B T m*/(ħ e B)
//
// (Lifshitz & Kosevich 1956 [src:LK1956]) by least squares in (A0, m*).
// A0 enters linearly and is solved for at each m*; m* is found by a scan of
// m*/m_e on a log grid from 1e-3 to 10 followed by a golden-section search,
// then polished by Gauss–Newton. The standard uncertainties come from the
// covariance σ̂²(JᵀJ)⁻¹ with σ̂² = χ²/(N − 2).
//
// Warnings: saturation at low temperature (the coldest point lies more than
// 2σ below the curve fitted to the others: the electron temperature exceeds
// the thermometer reading; common practice, needs ≥ 4 points), a mass outside
// WithExpectedMass, and weak damping (X < 0.5 at every T: the mass is poorly
// determined). Mismatched lengths, fewer than MinLKPoints points, T ≤ 0,
// A ≤ 0 or B ≤ 0 are errors wrapping ErrBadArgument or ErrTooFewPoints.
func LKMassTable(T, A []float64, B float64, opts ...Option) (*LKResult, error) {
	if len(T) != len(A) {
		return nil, fmt.Errorf("LK mass: %d temperatures but %d amplitudes: %w", len(T), len(A), ErrBadArgument)
	}
	for i := range T {
		if !(T[i] > 0) || math.IsInf(T[i], 0) {
			return nil, fmt.Errorf("LK mass: temperature %d is %g K: expected > 0: %w", i+1, T[i], ErrBadArgument)
		}
		if !(A[i] > 0) || math.IsInf(A[i], 0) {
			return nil, fmt.Errorf("LK mass: amplitude %d is %g: expected > 0 (give |ΔR|): %w", i+1, A[i], ErrBadArgument)
		}
	}
	return lkFit(T, A, nil, B, newOptions(opts), true)
}

// lkModel evaluates g = X/sinh X and dg/dr at mass ratio r.
func lkModel(T, B, r float64) (g, dg float64) {
	x := lkArgument(T, B, r*mE)
	g = xOverSinh(x)
	if math.Abs(x) < 1e-4 {
		return g, -x * x / 3 / r
	}
	if x > 700 {
		return 0, 0
	}
	// dg/dX = (1 − X coth X)/sinh X; dX/dr = X/r.
	return g, (1 - x/math.Tanh(x)) / math.Sinh(x) * x / r
}

// lkFit fits A = A0 g(T; m). sigma may be nil (unweighted, residual-scaled
// covariance) or hold standard uncertainties (weighted; the covariance is
// scaled by max(1, χ²/DoF)). A may contain values ≤ 0 here (noisy amplitudes
// at high T).
func lkFit(T, A, sigma []float64, B float64, o options, checkSat bool) (*LKResult, error) {
	n := len(T)
	if !(B > 0) || math.IsInf(B, 0) {
		return nil, fmt.Errorf("LK mass: field %g T: expected > 0: %w", B, ErrBadArgument)
	}
	if n < MinLKPoints {
		return nil, fmt.Errorf("LK mass at %g T: %d temperatures; need at least %d: %w", B, n, MinLKPoints, ErrTooFewPoints)
	}
	w := make([]float64, n)
	for i := range w {
		w[i] = 1
		if sigma != nil {
			if !(sigma[i] > 0) {
				return nil, fmt.Errorf("LK mass: uncertainty %d is %g: expected > 0: %w", i+1, sigma[i], ErrBadArgument)
			}
			w[i] = 1 / (sigma[i] * sigma[i])
		}
	}
	distinct := map[float64]bool{}
	for _, t := range T {
		distinct[t] = true
	}
	if len(distinct) < 2 {
		return nil, fmt.Errorf("LK mass at %g T: all amplitudes at one temperature: %w", B, ErrBadArgument)
	}
	// profile: for mass ratio r, the best A0 and the χ².
	profile := func(r float64) (a0, chi2 float64) {
		var sgg, sga float64
		for i := range T {
			g, _ := lkModel(T[i], B, r)
			sgg += w[i] * g * g
			sga += w[i] * g * A[i]
		}
		if sgg == 0 {
			a0 = 0
		} else {
			a0 = sga / sgg
		}
		for i := range T {
			g, _ := lkModel(T[i], B, r)
			d := A[i] - a0*g
			chi2 += w[i] * d * d
		}
		return a0, chi2
	}
	// Scan ln r on a grid, then golden section around the best grid point.
	const steps = 400
	lo, hi := math.Log(1e-3), math.Log(10)
	best, bestC := 0, math.Inf(1)
	for k := 0; k <= steps; k++ {
		if _, c := profile(math.Exp(lo + (hi-lo)*float64(k)/steps)); c < bestC {
			best, bestC = k, c
		}
	}
	a := lo + (hi-lo)*float64(max(best-1, 0))/steps
	b := lo + (hi-lo)*float64(min(best+1, steps))/steps
	gr := (math.Sqrt(5) - 1) / 2
	c1, c2 := b-gr*(b-a), a+gr*(b-a)
	_, f1 := profile(math.Exp(c1))
	_, f2 := profile(math.Exp(c2))
	for it := 0; it < 100 && b-a > 1e-12; it++ {
		if f1 < f2 {
			b, c2, f2 = c2, c1, f1
			c1 = b - gr*(b-a)
			_, f1 = profile(math.Exp(c1))
		} else {
			a, c1, f1 = c1, c2, f2
			c2 = a + gr*(b-a)
			_, f2 = profile(math.Exp(c2))
		}
	}
	r := math.Exp((a + b) / 2)
	a0, chi2 := profile(r)
	if a0 <= 0 {
		return nil, fmt.Errorf("LK mass at %g T: the fitted zero-temperature amplitude is not positive: %w", B, ErrBadArgument)
	}
	// Gauss–Newton polish in (A0, r) and the covariance.
	p := []float64{a0, r}
	jtj := func(p []float64) (*mat.SymDense, *mat.VecDense, float64) {
		G := mat.NewSymDense(2, nil)
		v := mat.NewVecDense(2, nil)
		c := 0.0
		for i := range T {
			g, dg := lkModel(T[i], B, p[1])
			j0, j1 := g, p[0]*dg
			d := A[i] - p[0]*g
			c += w[i] * d * d
			G.SetSym(0, 0, G.At(0, 0)+w[i]*j0*j0)
			G.SetSym(0, 1, G.At(0, 1)+w[i]*j0*j1)
			G.SetSym(1, 1, G.At(1, 1)+w[i]*j1*j1)
			v.SetVec(0, v.AtVec(0)+w[i]*j0*d)
			v.SetVec(1, v.AtVec(1)+w[i]*j1*d)
		}
		return G, v, c
	}
	for it := 0; it < 5; it++ {
		G, v, c := jtj(p)
		var ch mat.Cholesky
		if !ch.Factorize(G) {
			break
		}
		var step mat.VecDense
		if ch.SolveVecTo(&step, v) != nil {
			break
		}
		q := []float64{p[0] + step.AtVec(0), p[1] + step.AtVec(1)}
		if q[1] <= 0 {
			break
		}
		if _, _, cq := jtj(q); cq <= c {
			p = q
		} else {
			break
		}
	}
	G, _, chi2 := jtj(p)
	var ch mat.Cholesky
	if !ch.Factorize(G) {
		return nil, fmt.Errorf("LK mass at %g T: singular fit (does the amplitude change with T?): %w", B, ErrBadArgument)
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return nil, fmt.Errorf("LK mass at %g T: %v: %w", B, err, ErrBadArgument)
	}
	dof := float64(n - 2)
	scale := 1.0
	if dof > 0 {
		if sigma == nil {
			scale = chi2 / dof
		} else {
			scale = math.Max(1, chi2/dof)
		}
	}
	res := &LKResult{B: B, T: slices.Clone(T), A: slices.Clone(A), Sigma: slices.Clone(sigma), Chi2: chi2,
		A0:        Estimate{p[0], math.Sqrt(scale * cov.At(0, 0))},
		MassRatio: Estimate{p[1], math.Sqrt(scale * cov.At(1, 1))},
	}
	res.Mass = Estimate{res.MassRatio.Value * mE, res.MassRatio.Uncertainty * mE}
	res.Fitted = make([]float64, n)
	xmax := 0.0
	for i := range T {
		g, _ := lkModel(T[i], B, p[1])
		res.Fitted[i] = p[0] * g
		xmax = math.Max(xmax, lkArgument(T[i], B, p[1]*mE))
	}
	res.Method = "least squares in (A0, m*) of A0·X/sinh X: profile scan and golden section in m*, Gauss–Newton polish; σ from the fit covariance"
	if sigma == nil {
		res.Method += " scaled by χ²/(N−2)"
	} else {
		res.Method += " (weights 1/σ², scaled by max(1, χ²/(N−2)))"
	}

	// Saturation: refit without the coldest point and compare.
	if checkSat && n >= 4 {
		ic := 0
		for i := range T {
			if T[i] < T[ic] {
				ic = i
			}
		}
		var t2, a2, s2 []float64
		for i := range T {
			if i != ic {
				t2, a2 = append(t2, T[i]), append(a2, A[i])
				if sigma != nil {
					s2 = append(s2, sigma[i])
				}
			}
		}
		o2 := o
		o2.ext.massLo, o2.ext.massHi = 0, 0
		if r2, err := lkFit(t2, a2, s2, B, o2, false); err == nil {
			g, dg := lkModel(T[ic], B, r2.MassRatio.Value)
			pred := r2.A0.Value * g
			sp := math.Hypot(g*r2.A0.Uncertainty, r2.A0.Value*dg*r2.MassRatio.Uncertainty)
			spt := math.Sqrt(chi2 / math.Max(dof, 1) / w[ic])
			if sigma != nil {
				spt = sigma[ic] * math.Sqrt(scale)
			}
			diff := A[ic] - pred
			if diff < -2*math.Hypot(sp, spt) && diff < -0.01*pred {
				res.Warnings = append(res.Warnings, Warning{WarnSaturation, fmt.Sprintf(
					"at %g K the amplitude %.4g is %.1f %% below the LK curve through the warmer points: electron temperature above the thermometer reading?",
					T[ic], A[ic], -100*diff/pred)})
			}
		}
	}
	if lo, hi := o.ext.massLo, o.ext.massHi; hi > 0 && (res.MassRatio.Value < lo || res.MassRatio.Value > hi) {
		res.Warnings = append(res.Warnings, Warning{WarnMass, fmt.Sprintf(
			"m*/m_e = %.4f ± %.4f is outside the expected %.3g–%.3g", res.MassRatio.Value, res.MassRatio.Uncertainty, lo, hi)})
	}
	if xmax < 0.5 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf(
			"X ≤ %.2f at every temperature: the amplitude barely changes, the mass is poorly determined; use higher T or lower B", xmax)})
	}
	return res, nil
}

// LKExtremum is the LK fit at one extremum of LKMassSweeps.
type LKExtremum struct {
	Extremum           // position and value in the coldest sweep
	Fit      *LKResult // the fit of |amplitude| against T
}

// LKSweepsResult is the outcome of LKMassSweeps.
type LKSweepsResult struct {
	Mass, MassRatio Estimate // weighted mean over the extrema
	Extrema         []LKExtremum
	Temperatures    []float64
	Frequency       float64 // SdH frequency used to place the extrema, T
	Chi2            float64 // of the weighted mean, over len(Extrema) − 1 degrees of freedom
	BMin, BMax      float64
	DataHashes      []string
	Method          string
	Warnings        []Warning
}

// sweepTemperature reads a sweep's temperature from its metadata ("T",
// "temperature", "temp"; a number with an optional unit of temperature) or,
// failing that, the median of its temperature column.
func sweepTemperature(d *Dataset) (float64, error) {
	for _, k := range []string{"T", "temperature", "temp"} {
		v, ok := d.MetaValue(k)
		if !ok {
			continue
		}
		v = strings.TrimSpace(v)
		if x, err := strconv.ParseFloat(v, 64); err == nil && x > 0 && !math.IsInf(x, 0) {
			return x, nil
		}
		q, err := quantity.ParseQuantity(v)
		if err != nil || q.Dim() != quantity.Temperature || !(q.Value() > 0) || math.IsInf(q.Value(), 0) {
			return 0, fmt.Errorf("%s: metadata %q = %q: expected a temperature such as \"1.5 K\": %w", d.Name, k, v, ErrBadArgument)
		}
		return q.Value(), nil
	}
	for _, name := range []string{"T", "Temp", "Temperature", "Tsample"} {
		if c, err := d.Col(name); err == nil {
			var v []float64
			for _, x := range c.Values {
				if x > 0 && !math.IsInf(x, 0) {
					v = append(v, x)
				}
			}
			if len(v) > 0 {
				return median(v), nil
			}
		}
	}
	return 0, fmt.Errorf("%s: no temperature: add a \"# T: 1.5 K\" line or a T column, or pass the temperatures: %w", d.Name, ErrBadArgument)
}

// LKMassSweeps extracts the effective mass from R_xx sweeps taken at several
// temperatures (K; when temps is nil each sweep's "T"/"temperature" metadata
// or the median of its T column is used) over the same window bmin ≤ |B| ≤ bmax.
//
// Method: each sweep's R_xx (WithColumns; default "B", "Rxx") has its
// polynomial background in B removed as in SdHDensity (WithBackground). The
// SdH frequency of the coldest sweep (SdHDensity) places the extrema, which
// are located in the coldest sweep; at each of them the oscillatory part of
// every sweep is measured by a local least-squares sinusoid over one period
// centred on it (value ± σ). Each extremum whose coldest amplitude exceeds 5σ is fitted with
// the LK form (weighted by 1/σ²; see LKMassTable), and the masses are combined
// by the inverse-variance weighted mean, whose uncertainty is scaled by
// sqrt(χ²/(K−1)) when that exceeds 1. It warns when an extremum of the coldest sweep has
// |ΔR|/R_0 above 0.5 (outside the low-field form; see largeAmplitude).
func LKMassSweeps(sweeps []*Dataset, temps []float64, bmin, bmax float64, opts ...Option) (*LKSweepsResult, error) {
	o := newOptions(opts)
	if len(sweeps) < MinLKPoints {
		return nil, fmt.Errorf("LK mass: %d sweeps; need at least %d temperatures: %w", len(sweeps), MinLKPoints, ErrTooFewPoints)
	}
	if !(bmin > 0) || !(bmax > bmin) {
		return nil, fmt.Errorf("LK mass: field range %g T to %g T: expected a range lo .. hi with 0 < lo < hi: %w", bmin, bmax, ErrBadArgument)
	}
	if temps == nil {
		temps = make([]float64, len(sweeps))
		for i, d := range sweeps {
			t, err := sweepTemperature(d)
			if err != nil {
				return nil, fmt.Errorf("LK mass, sweep %d: %w", i+1, err)
			}
			temps[i] = t
		}
	} else if len(temps) != len(sweeps) {
		return nil, fmt.Errorf("LK mass: %d sweeps but %d temperatures: %w", len(sweeps), len(temps), ErrBadArgument)
	}
	for i, t := range temps {
		if !(t > 0) || math.IsInf(t, 0) {
			return nil, fmt.Errorf("LK mass: temperature of sweep %d (%s) is %g K: expected > 0: %w", i+1, sweeps[i].Name, t, ErrBadArgument)
		}
	}
	osc := make([]*oscData, len(sweeps))
	res := &LKSweepsResult{Temperatures: slices.Clone(temps), BMin: bmin, BMax: bmax}
	cold := 0
	for i, d := range sweeps {
		if temps[i] < temps[cold] {
			cold = i
		}
		xc, err := column(d, o.field, DimField)
		if err != nil {
			return nil, err
		}
		yc, err := column(d, o.ycol, DimResistance)
		if err != nil {
			return nil, err
		}
		B, R, _ := selectPairs(xc.Values, yc.Values, nil, bmin, bmax)
		if len(B) < 32 {
			return nil, fmt.Errorf("%s: LK mass: %d points in %g T ≤ |B| ≤ %g T; need at least 32: %w", d.Name, len(B), bmin, bmax, ErrTooFewPoints)
		}
		if osc[i], err = newOscData(B, R, o.bgDeg); err != nil {
			return nil, fmt.Errorf("%s: LK mass background: %w", d.Name, err)
		}
		res.DataHashes = append(res.DataHashes, d.Hash)
	}
	f, _, err := oscFrequency(sweeps[cold], bmin, bmax, 0, opts)
	if err != nil {
		return nil, fmt.Errorf("LK mass: %w", err)
	}
	res.Frequency = f
	var sw, swm float64
	skipped := 0
	for _, e := range osc[cold].extrema(f) {
		if math.Abs(e.Value.Value) < 5*e.Value.Uncertainty {
			skipped++
			continue
		}
		sgn := math.Copysign(1, e.Value.Value)
		A := make([]float64, len(sweeps))
		S := make([]float64, len(sweeps))
		ok := true
		for j := range sweeps {
			ej, good := osc[j].at(f, 1/e.B)
			if !good {
				ok = false
				break
			}
			A[j], S[j] = sgn*ej.Value.Value, ej.Value.Uncertainty
		}
		if !ok {
			continue
		}
		fit, err := lkFit(temps, A, S, e.B, o, true)
		if err != nil || !(fit.MassRatio.Uncertainty > 0) {
			skipped++
			continue
		}
		res.Extrema = append(res.Extrema, LKExtremum{e, fit})
		wk := 1 / (fit.MassRatio.Uncertainty * fit.MassRatio.Uncertainty)
		sw += wk
		swm += wk * fit.MassRatio.Value
	}
	if len(res.Extrema) == 0 {
		return nil, fmt.Errorf("LK mass: no extremum in %g–%g T with an amplitude above 5σ in the coldest sweep: %w", bmin, bmax, ErrTooFewPoints)
	}
	mean := swm / sw
	for _, e := range res.Extrema {
		d := (e.Fit.MassRatio.Value - mean) / e.Fit.MassRatio.Uncertainty
		res.Chi2 += d * d
	}
	sig := 1 / math.Sqrt(sw)
	if k := len(res.Extrema); k > 1 {
		sig *= math.Sqrt(math.Max(1, res.Chi2/float64(k-1)))
	}
	res.MassRatio = Estimate{mean, sig}
	res.Mass = Estimate{mean * mE, sig * mE}
	res.Method = fmt.Sprintf("background polynomial of degree %d in B; extrema placed with the SdH frequency %.4g T of the coldest sweep; local half-period sinusoid fits; LK fit per extremum; inverse-variance weighted mean", o.bgDeg, f)
	nsat := 0
	for _, e := range res.Extrema {
		for _, w := range e.Fit.Warnings {
			if w.Code == WarnSaturation {
				nsat++
			}
		}
	}
	if nsat > 0 {
		res.Warnings = append(res.Warnings, Warning{WarnSaturation, fmt.Sprintf(
			"at %d of %d extrema the coldest amplitude lies below the LK curve of the warmer sweeps: electron temperature above the thermometer reading?", nsat, len(res.Extrema))})
	}
	coldest := make([]Extremum, len(res.Extrema))
	for i, e := range res.Extrema {
		coldest[i] = e.Extremum
	}
	if w := largeAmplitude(coldest); w != nil {
		res.Warnings = append(res.Warnings, *w)
	}
	if skipped > 0 {
		res.Warnings = append(res.Warnings, Warning{WarnInsignificant, fmt.Sprintf("%d extrema skipped (amplitude below 5σ or fit failed)", skipped)})
	}
	if lo, hi := o.ext.massLo, o.ext.massHi; hi > 0 && (mean < lo || mean > hi) {
		res.Warnings = append(res.Warnings, Warning{WarnMass, fmt.Sprintf(
			"m*/m_e = %.4f ± %.4f is outside the expected %.3g–%.3g", mean, sig, lo, hi)})
	}
	return res, nil
}
