package transport

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"
)

// ErrNoOscillation means that SdHDensity found no oscillation it can trust in
// the field window: the spectrum peaks at the edge of the searched range (the
// background, not an oscillation, dominates), or the least-squares refinement
// left the neighbourhood of the spectral peak.
var ErrNoOscillation = errors.New("no SdH oscillation found")

// Spectrum is an amplitude spectrum against the SdH frequency f_B (T).
// Amp is scaled so that a sinusoid of amplitude A under the Hann window peaks
// at about A (Ohm).
type Spectrum struct {
	Freq []float64 // T
	Amp  []float64 // Ohm
}

// SdHResult is the outcome of SdHDensity.
type SdHResult struct {
	Density      Estimate  // n = g_s g_v (e/h) f_B, m^-2
	Frequency    Estimate  // f_B from the least-squares refinement, T
	FFTFrequency float64   // the spectrum's peak (parabolic interpolation), T
	GS, GV       float64   // degeneracies used
	Oscillations float64   // f_B (1/bmin − 1/bmax): periods inside the window
	FMin, FMax   float64   // frequency range searched, T
	Background   []float64 // polynomial subtracted first, in powers of BackgroundIn
	BackgroundIn string    // "B" (coefficients in Ohm/T^k) or "1/B" (Ohm T^k)
	Spectrum     Spectrum
	Method       string

	XCol, YCol string
	BMin, BMax float64
	DataHash   string
	Points     int
	Warnings   []Warning
	// FieldOffset is the field offset the input had applied (Dataset.FieldOffset), T.
	FieldOffset float64
	// Sweep says which field polarities the data cover (SweepSpan).
	Sweep string
}

// SdHDensity finds the SdH frequency of R_xx (column "Rxx" against "B" unless
// WithColumns says otherwise) over bmin ≤ |B| ≤ bmax (T, bmin > 0) and returns
// the density n = g_s g_v (e/h) f_B [src:AFS1982]. gs is the spin
// degeneracy (2 while spin is unresolved, 1 when resolved); g_v comes from
// WithValleyDegeneracy (default 1).
//
// Method:
//  1. points in the range with no NaN, folded to |B|, taken as u = 1/|B|.
//     Up to 8192 points are used as they are (sorted by u). Longer sweeps are
//     averaged in bins of equal width in u (no sorting needed): 4096 bins at
//     first, refined 4× at a time (up to 32768, and while bins keep ≥ 2 points
//     on average) as long as the spectral peak of step 4 has fewer than 16
//     bins per period. A bin mean of W points has noise variance σ²/W, so W is
//     its weight in steps 2 and 5;
//  2. a polynomial background (degree 3, WithBackground) is subtracted, in B
//     or in 1/B, whichever leaves the smaller weighted residual sum of squares
//     (the oscillation is nearly orthogonal to both, so the smaller sum marks
//     the better background). Low-field magnetoresistance (weak localisation,
//     electron–electron interaction) is a series in B; the two-carrier Drude
//     background of a parallel channel, ρ_xx = (a + c B²)/(1 + d B²),
//     saturates at high field and is a smooth function of 1/B, where a cubic
//     follows it tens of times more closely (tested in sdh_edge_test.go);
//  3. the residual is interpolated linearly onto a uniform 1/B grid with as
//     many points as there are samples (at most 32768), multiplied by a Hann
//     window, zero-padded to a power of two ≥ 8× its length (WithPadding) and
//     transformed (gonum dsp/fourier);
//  4. the highest peak between FMin = 2/(1/bmin − 1/bmax) (two periods in the
//     window) and FMax = the Nyquist frequency of the grid or of the sparsest
//     stretch of the data, whichever is lower, refined by parabolic
//     interpolation, gives FFTFrequency. A peak at either end of that range
//     is an error wrapping ErrNoOscillation: the background leaks into the
//     lowest frequencies, or the oscillation is faster than the data resolve;
//  5. the frequency is then refined by a damped Gauss–Newton (Levenberg–
//     Marquardt) weighted least-squares fit to the samples of
//     exp(a_0 + a_1 t + a_2 t²) cos(2π f (u − u_c) + φ) + Σ_k b_k x^k, with t
//     and x the scaled u and B: a slowly varying envelope (Dingle and thermal
//     damping) times the oscillation on the polynomial background (in the
//     variable chosen in step 2). The frequency enters the fit as ln f, so it
//     stays positive, and a refined f more than 1/Δ(1/B) (one bin of the
//     unpadded transform) from FFTFrequency is an error wrapping
//     ErrNoOscillation rather than a number. The
//     standard uncertainty of f is sqrt(σ̂² [(JᵀWJ)⁻¹]_ff), σ̂² = S/(M − p)
//     (S the weighted residual sum of squares, M samples, p parameters), which
//     stays honest under binning because the weights are the bin counts. Its
//     coverage is tested over 50 seeded synthetic sweeps, raw and binned.
func SdHDensity(d *Dataset, bmin, bmax, gs float64, opts ...Option) (*SdHResult, error) {
	o := newOptions(opts)
	if !(bmin > 0) || !(bmax > bmin) {
		return nil, fmt.Errorf("%s: SdH analysis: field range %g T to %g T: expected a range lo .. hi with 0 < lo < hi: %w", d.Name, bmin, bmax, ErrBadArgument)
	}
	if !(gs > 0) || !(o.gv > 0) {
		return nil, fmt.Errorf("%s: SdH analysis: degeneracies g_s = %g, g_v = %g must be > 0: %w", d.Name, gs, o.gv, ErrBadArgument)
	}
	if o.bgDeg < 0 || o.bgDeg > 3 {
		return nil, fmt.Errorf("%s: SdH analysis: background degree %d: expected 0–3: %w", d.Name, o.bgDeg, ErrBadArgument)
	}
	xc, err := column(d, o.field, DimField)
	if err != nil {
		return nil, err
	}
	yc, err := column(d, o.ycol, DimResistance)
	if err != nil {
		return nil, err
	}
	N, u0, u1 := uRange(xc.Values, yc.Values, bmin, bmax)
	const minPoints = 32
	if N < minPoints {
		return nil, fmt.Errorf("%s: SdH analysis of %s over %g T ≤ |B| ≤ %g T: %d points; need at least %d%s: %w",
			d.Name, yc.Name, bmin, bmax, N, minPoints, fieldSpan(xc, bmin, bmax), ErrTooFewPoints)
	}
	res := &SdHResult{GS: gs, GV: o.gv, XCol: xc.Name, YCol: yc.Name, BMin: bmin, BMax: bmax, DataHash: d.Hash, Points: N, FieldOffset: d.FieldOffset}
	res.Sweep, _ = SweepSpan(xc.Values)
	U := u1 - u0

	// 1: the points, or their averages in bins of 1/B. The bins start coarse
	// (sdhBins) and are refined while the spectral peak has fewer than
	// sdhPerPeriod bins per period, so the grid follows the frequency content
	// of the data rather than its raw point count.
	var sm *samples
	var bg *PolyFit
	var bgU bool // background polynomial in u = 1/B rather than in B
	var sp *sdhSpectrum
	bins := min(sdhBins, o.maxGrid)
	for {
		if N <= sdhRawMax || 2*bins > N || !(U > 0) {
			sm = rawSweep(xc.Values, yc.Values, bmin, bmax, N)
		} else {
			sm = binSweep(xc.Values, yc.Values, bmin, bmax, N, bins, u0, u1)
		}
		sm.findHoles()
		// 2: polynomial background in B, weighted by the bin counts.
		Bs := make([]float64, len(sm.u))
		var sig []float64
		if sm.binned {
			sig = make([]float64, len(sm.u))
		}
		for i, u := range sm.u {
			Bs[i] = 1 / u
			if sig != nil {
				sig[i] = 1 / math.Sqrt(sm.w[i])
			}
		}
		var err error
		bg, err = FitPoly(Bs, sm.y, sig, o.bgDeg)
		if err != nil {
			return nil, fmt.Errorf("%s: SdH background: %w", d.Name, err)
		}
		bgU = false
		if bu, err := FitPoly(sm.u, sm.y, sig, o.bgDeg); err == nil && bu.Chi2 < bg.Chi2 {
			bg, bgU = bu, true
		}
		if len(sm.u) < minPoints || !(U > 0) {
			return nil, fmt.Errorf("%s: SdH analysis of %s over %g–%g T: the window holds too few periods or points to resolve any frequency: %w",
				d.Name, yc.Name, bmin, bmax, ErrTooFewPoints)
		}
		resid := make([]float64, len(sm.u))
		for i := range resid {
			x := Bs[i]
			if bgU {
				x = sm.u[i]
			}
			resid[i] = sm.y[i] - bg.Eval(x)
		}
		// 3–4: spectrum and its peak.
		sp = spectrum(sm.u, resid, min(len(sm.u), o.maxGrid), max(o.pad, 8), sm.gap)
		// Refine the bins when the peak has fewer than sdhPerPeriod bins per
		// period (2 fmax/f bins on a grid-limited spectrum) and there is room.
		few := sp.kmin+2 <= sp.kmax && sp.gridLimited && sp.fpk*sdhPerPeriod > 2*sp.fmax
		if !sm.binned || !few || 4*bins > o.maxGrid || 8*bins > N {
			break
		}
		bins *= 4
	}
	res.Background, res.BackgroundIn = bg.Coef, "B"
	bgVar := "B"
	if bgU {
		res.BackgroundIn, bgVar = "1/B", "1/B"
	}
	res.FMin, res.FMax = sp.fmin, sp.fmax
	res.Spectrum = sp.Spectrum
	m, nfft := sp.m, sp.nfft
	if sp.kmin+2 > sp.kmax {
		return nil, fmt.Errorf("%s: SdH analysis of %s over %g–%g T: the window holds too few periods or points to resolve any frequency: %w",
			d.Name, yc.Name, bmin, bmax, ErrTooFewPoints)
	}
	fpk := sp.fpk
	res.FFTFrequency = fpk
	if sp.kp == sp.kmin || sp.kp == sp.kmax {
		return nil, fmt.Errorf("%s: SdH analysis of %s over %g–%g T: the spectrum peaks at the edge of the searched range %.3g–%.3g T, so no oscillation stands out from the background (%s); start the field range where the oscillations are visible (a higher lower end), widen it if it holds few periods, or change the degree of the background polynomial (background = 0 to 3 in sdh_density, 3 by default): %w",
			d.Name, yc.Name, bmin, bmax, res.FMin, res.FMax, edgeHint(sp), ErrNoOscillation)
	}
	med := median(res.Spectrum.Amp[sp.kmin : sp.kmax+1])
	if res.Spectrum.Amp[sp.kp] < 4*med {
		res.Warnings = append(res.Warnings, Warning{WarnWeakPeak, fmt.Sprintf(
			"the spectral peak is only %.1f× the median amplitude", res.Spectrum.Amp[sp.kp]/med)})
	}

	harmonic := harmonicWarning(sp, U, med, gs)

	// 5: least-squares refinement on (binned) original points.
	sf := &sinefit{u: sm.u, y: sm.y, w: sm.w, uc: (u0 + u1) / 2, us: U / 2, nb: o.bgDeg + 1, bc: (bmin + bmax) / 2, bs: (bmax - bmin) / 2, inU: bgU}
	f, fsig, ok := sf.fit(fpk)
	if !ok {
		return nil, fmt.Errorf("%s: SdH analysis of %s: the least-squares refinement failed (singular fit): %w", d.Name, yc.Name, ErrBadArgument)
	}
	if !(f > 0) || math.Abs(f-fpk) > 1/U {
		if harmonic != nil {
			return nil, fmt.Errorf("%s: SdH analysis of %s over %g–%g T: the least-squares refinement moved from the spectral peak at %.4g T to %.4g T, and %s: %w",
				d.Name, yc.Name, bmin, bmax, fpk, f, harmonic.Msg, ErrNoOscillation)
		}
		return nil, fmt.Errorf("%s: SdH analysis of %s over %g–%g T: the least-squares refinement moved from the spectral peak at %.4g T to %.4g T, more than the spectral resolution 1/Δ(1/B) = %.3g T: the background or a second frequency dominates the fit; narrow the field window to where one oscillation is clear, or change the degree of the background polynomial (background = 0 to 3 in sdh_density): %w",
			d.Name, yc.Name, bmin, bmax, fpk, f, 1/U, ErrNoOscillation)
	}
	res.Frequency = Estimate{f, fsig}
	res.Oscillations = f * U
	res.Density = Estimate{DensityFromSdH(f, gs, o.gv), DensityFromSdH(fsig, gs, o.gv)}
	pts := fmt.Sprintf("the %d points", N)
	if sm.binned {
		pts = fmt.Sprintf("the means of %d points in %d bins of 1/B (weighted by count)", N, len(sm.u))
	}
	res.Method = fmt.Sprintf("polynomial background (degree %d) in %s; Hann-windowed FFT of R_xx on a uniform 1/B grid (%d points, padded to %d); Gauss–Newton fit of a sinusoid with a log-quadratic envelope to %s; σ from the fit covariance", o.bgDeg, bgVar, m, nfft, pts)
	if harmonic != nil {
		res.Warnings = append(res.Warnings, *harmonic)
	}
	for _, h := range sm.holes {
		if periods := f * (h[1] - h[0]); periods > 0.5 {
			res.Warnings = append(res.Warnings, Warning{WarnGap, fmt.Sprintf(
				"no data for %.4g T < |B| < %.4g T (%.1f periods of f_B): the spectrum interpolates across the hole and the fit uses the measured points only; check the NaN rows or the interrupted sweep there",
				1/h[1], 1/h[0], periods)})
		}
	}
	if res.Oscillations < 5 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %.1f periods in the field window", res.Oscillations)})
	}
	if w := outOfPhase(d, xc, yc, bmin, bmax, o.maxYFrac); w != nil {
		res.Warnings = append(res.Warnings, *w)
	}
	return res, nil
}

// harmonicFrac is the fraction of the main spectral peak above which a peak
// at twice or half its frequency is reported (common practice).
const harmonicFrac = 0.25

// harmonicWarning looks for a strong peak at twice or half the main peak's
// frequency, within the spectral resolution 1/U. Once Zeeman splitting is
// resolved the minima of R_xx fall at every integer filling factor rather than
// at even ones, so a window that reaches into the spin-split regime holds the
// spin-degenerate frequency f_B and the doubled one 2f_B [src:CSF1989]; a
// large, non-sinusoidal oscillation also has a second harmonic. Either way the
// density g_s g_v (e/h) f_B is only right if g_s matches the peak taken.
func harmonicWarning(sp *sdhSpectrum, U, med, gs float64) *Warning {
	a0 := sp.Amp[sp.kp]
	df := sp.Freq[1] - sp.Freq[0]
	peak := func(f float64) (float64, float64) {
		lo := max(sp.kmin, int(math.Ceil((f-1/U)/df)))
		hi := min(sp.kmax, int(math.Floor((f+1/U)/df)))
		best, at := 0.0, 0.0
		for k := lo; k <= hi; k++ {
			if sp.Amp[k] > best {
				best, at = sp.Amp[k], sp.Freq[k]
			}
		}
		return best, at
	}
	strong := func(a float64) bool { return a > harmonicFrac*a0 && a > 4*med }
	if a, at := peak(2 * sp.fpk); strong(a) {
		return &Warning{WarnHarmonic, fmt.Sprintf(
			"the spectrum also peaks at %.4g T, twice f_B = %.4g T (%.0f %% of its amplitude): spin splitting resolved at the high-field end, or a second harmonic; with g_s = %g the density assumes %.4g T is the spin-degenerate frequency, so end the window below the field where the minima split",
			at, sp.fpk, 100*a/a0, gs, sp.fpk)}
	}
	if a, at := peak(sp.fpk / 2); strong(a) {
		return &Warning{WarnHarmonic, fmt.Sprintf(
			"the spectrum also peaks at %.4g T, half of f_B = %.4g T (%.0f %% of its amplitude): the chosen peak may be the spin-resolved frequency, in which case the density is that of g_s = 1 at %.4g T; with g_s = %g it comes out twice too high; end the window below the field where the minima split",
			at, sp.fpk, 100*a/a0, sp.fpk, gs)}
	}
	return nil
}

// edgeHint says what a spectral peak at an edge of the searched range means.
func edgeHint(sp *sdhSpectrum) string {
	if sp.kp == sp.kmin {
		return "a background the polynomial does not follow leaks into the lowest frequencies"
	}
	return "the peak is at the Nyquist limit of the data: the oscillation may be faster than the point spacing resolves"
}

// sinefit fits y ≈ A(t) cos(2π f (u − uc) + φ) + Σ_k b_k x^k with
// A(t) = exp(a_0 + a_1 t + a_2 t²) and t = (u − uc)/us, plus a polynomial
// background in x, by damped Gauss–Newton: x is the scaled field
// (1/u − bc)/bs, or t with inU.
// The parameter vector is (a_0..a_2, ln f, φ, b_0..b_{nb−1}): fitting ln f
// keeps the frequency positive whatever step the damping lets through.
type sinefit struct {
	u, y, w []float64
	uc, us  float64
	nb      int     // background terms: polynomial of degree nb−1 in x
	bc, bs  float64 // field scaling: x = (1/u − bc)/bs
	inU     bool    // background in t = (u − uc)/us instead
}

func (s *sinefit) x(u float64) float64 {
	if s.inU {
		return (u - s.uc) / s.us
	}
	return (1/u - s.bc) / s.bs
}

const envTerms = 3

func (s *sinefit) np() int { return envTerms + 2 + s.nb }

func (s *sinefit) model(p []float64, u float64, jac []float64) float64 {
	t := (u - s.uc) / s.us
	f := math.Exp(math.Min(p[envTerms], 700))
	th := 2*math.Pi*f*(u-s.uc) + p[envTerms+1]
	sn, cs := math.Sincos(th)
	la, tk := 0.0, 1.0
	for k := 0; k < envTerms; k++ {
		la += p[k] * tk
		tk *= t
	}
	A := math.Exp(math.Min(la, 700))
	if jac != nil {
		tk = 1
		for k := 0; k < envTerms; k++ {
			jac[k] = tk * A * cs
			tk *= t
		}
	}
	if jac != nil {
		jac[envTerms] = -2 * math.Pi * f * (u - s.uc) * A * sn
		jac[envTerms+1] = -A * sn
	}
	x := s.x(u)
	bg, xk := 0.0, 1.0
	for k := 0; k < s.nb; k++ {
		bg += p[envTerms+2+k] * xk
		if jac != nil {
			jac[envTerms+2+k] = xk
		}
		xk *= x
	}
	return A*cs + bg
}

func (s *sinefit) rss(p []float64) float64 {
	r := 0.0
	for i, u := range s.u {
		d := s.y[i] - s.model(p, u, nil)
		r += s.w[i] * d * d
	}
	return r
}

// normal builds JᵀWJ and JᵀW r at p.
func (s *sinefit) normal(p []float64) (*mat.SymDense, *mat.VecDense) {
	n := s.np()
	g := make([]float64, n*n)
	rv := make([]float64, n)
	jac := make([]float64, n)
	for i, u := range s.u {
		d := s.y[i] - s.model(p, u, jac)
		wi := s.w[i]
		for j := 0; j < n; j++ {
			wj := wi * jac[j]
			rv[j] += wj * d
			for k := j; k < n; k++ {
				g[j*n+k] += wj * jac[k]
			}
		}
	}
	G := mat.NewSymDense(n, nil)
	for j := 0; j < n; j++ {
		for k := j; k < n; k++ {
			G.SetSym(j, k, g[j*n+k])
		}
	}
	return G, mat.NewVecDense(n, rv)
}

// fit refines the frequency starting from f0 (> 0) and returns f and σ_f from
// the residual-scaled covariance σ̂² (JᵀWJ)⁻¹.
func (s *sinefit) fit(f0 float64) (float64, float64, bool) {
	n := s.np()
	if !(f0 > 0) {
		return 0, 0, false
	}
	// Start: constant amplitude and phase from a linear fit at f0.
	var c0, s0, cc, ss, csum float64
	// Initial background: a polynomial fit in the scaled field.
	xs := make([]float64, len(s.u))
	for i, u := range s.u {
		xs[i] = s.x(u)
	}
	sig := make([]float64, len(s.w))
	for i, w := range s.w {
		sig[i] = 1 / math.Sqrt(w)
	}
	bgf, err := FitPoly(xs, s.y, sig, s.nb-1)
	if err != nil {
		return 0, 0, false
	}
	for i, u := range s.u {
		yi := s.y[i] - bgf.Eval(xs[i])
		sn, cs := math.Sincos(2 * math.Pi * f0 * (u - s.uc))
		c0 += s.w[i] * yi * cs
		s0 += s.w[i] * yi * sn
		cc += s.w[i] * cs * cs
		ss += s.w[i] * sn * sn
		csum += s.w[i] * cs * sn
	}
	det := cc*ss - csum*csum
	if det <= 0 {
		return 0, 0, false
	}
	a := (c0*ss - s0*csum) / det
	b := (s0*cc - c0*csum) / det
	p := make([]float64, n)
	p[0] = math.Log(math.Max(math.Hypot(a, b), 1e-300))
	p[envTerms] = math.Log(f0)
	p[envTerms+1] = math.Atan2(-b, a)
	// bgf is in powers of x; store it in the same basis.
	for k := 0; k < s.nb; k++ {
		p[envTerms+2+k] = bgf.Coef[k]
	}
	cur := s.rss(p)
	lambda := 1e-3
	trial := make([]float64, n)
	for it := 0; it < 50; it++ {
		G, r := s.normal(p)
		improved := false
		for try := 0; try < 20; try++ {
			D := mat.NewSymDense(n, nil)
			D.CopySym(G)
			for j := 0; j < n; j++ {
				D.SetSym(j, j, G.At(j, j)*(1+lambda))
			}
			var ch mat.Cholesky
			if !ch.Factorize(D) {
				lambda *= 10
				continue
			}
			var step mat.VecDense
			if err := ch.SolveVecTo(&step, r); err != nil {
				lambda *= 10
				continue
			}
			for j := range p {
				trial[j] = p[j] + step.AtVec(j)
			}
			if t := s.rss(trial); t <= cur {
				rel := (cur - t) / math.Max(cur, 1e-300)
				copy(p, trial)
				cur = t
				lambda = math.Max(lambda/10, 1e-12)
				improved = true
				if rel < 1e-12 {
					it = 1 << 30
				}
				break
			}
			lambda *= 10
		}
		if !improved {
			break
		}
	}
	G, _ := s.normal(p)
	var ch mat.Cholesky
	if !ch.Factorize(G) {
		return 0, 0, false
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return 0, 0, false
	}
	f := math.Exp(p[envTerms])
	dof := float64(len(s.u) - n)
	if dof <= 0 {
		return f, math.NaN(), true
	}
	// σ_f = f σ_{ln f} (first order).
	return f, f * math.Sqrt(cur/dof*inv.At(envTerms, envTerms)), true
}

// median returns the element at position len(x)/2 of x sorted (the upper median), by
// quickselect on a copy: linear time on average, x untouched.
func median(x []float64) float64 {
	s := slices.Clone(x)
	k := len(s) / 2
	lo, hi := 0, len(s)-1
	for lo < hi {
		// Median of three as the pivot, then a Hoare partition.
		mid := lo + (hi-lo)/2
		if s[mid] < s[lo] {
			s[mid], s[lo] = s[lo], s[mid]
		}
		if s[hi] < s[lo] {
			s[hi], s[lo] = s[lo], s[hi]
		}
		if s[hi] < s[mid] {
			s[hi], s[mid] = s[mid], s[hi]
		}
		pivot := s[mid]
		i, j := lo, hi
		for i <= j {
			for s[i] < pivot {
				i++
			}
			for s[j] > pivot {
				j--
			}
			if i <= j {
				s[i], s[j] = s[j], s[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return s[k]
		}
	}
	return s[k]
}

// Binning of long sweeps in SdHDensity (see binSweep).
const (
	sdhRawMax    = 8192 // up to this many points the raw points are used
	sdhBins      = 4096 // the first number of 1/B bins for longer sweeps
	sdhPerPeriod = 16   // fewest bins per period of the spectral peak
)

// sdhSpectrum is the Fourier analysis of the background-free signal against u = 1/B.
type sdhSpectrum struct {
	Spectrum
	m, nfft        int     // grid points and transform length
	fmin, fmax     float64 // searched range, T
	kmin, kmax, kp int     // searched bins and the peak bin
	fpk            float64 // peak frequency (parabolic interpolation), T
	gridLimited    bool    // fmax is set by the grid, not by gaps in the data
}

// spectrum interpolates (u, y), sorted by u, linearly onto a uniform grid of m
// points, applies a Hann window, zero-pads to a power of two ≥ pad·m and
// returns the amplitude spectrum up to the Nyquist frequency of the grid or
// of the sparsest stretch of the data (gap), whichever is lower, and the
// highest peak from fmin = 2/(u_max − u_min) (two periods) up to there.
func spectrum(u, y []float64, m, pad int, gap float64) *sdhSpectrum {
	u0, u1 := u[0], u[len(u)-1]
	U := u1 - u0
	du := U / float64(m-1)
	nfft := 1
	for nfft < pad*m {
		nfft <<= 1
	}
	buf := make([]float64, nfft)
	wsum := 0.0
	j := 0
	for i := range m {
		x := u0 + float64(i)*du
		for j < len(u)-2 && u[j+1] < x {
			j++
		}
		var v float64
		if ua, ub := u[j], u[j+1]; ub == ua {
			v = (y[j] + y[j+1]) / 2
		} else {
			v = y[j] + (y[j+1]-y[j])*(x-ua)/(ub-ua)
		}
		w := 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(m-1))
		buf[i] = v * w
		wsum += w
	}
	coef := fourier.NewFFT(nfft).Coefficients(nil, buf)
	s := &sdhSpectrum{m: m, nfft: nfft, fmin: 2 / U}
	df := 1 / (float64(nfft) * du)
	s.fmax = 1 / (2 * du)
	if gap > du {
		s.fmax = 1 / (2 * gap)
	} else {
		s.gridLimited = true
	}
	s.kmax = min(int(s.fmax/df), len(coef)-1)
	s.Freq = make([]float64, s.kmax+1)
	s.Amp = make([]float64, s.kmax+1)
	for k := 0; k <= s.kmax; k++ {
		s.Freq[k] = float64(k) * df
		s.Amp[k] = 2 * math.Hypot(real(coef[k]), imag(coef[k])) / wsum
	}
	s.kmin = int(math.Ceil(s.fmin / df))
	if s.kmin+2 > s.kmax {
		return s
	}
	kp := s.kmin
	for k := s.kmin; k <= s.kmax; k++ {
		if s.Amp[k] > s.Amp[kp] {
			kp = k
		}
	}
	s.kp = kp
	s.fpk = float64(kp) * df
	// Parabolic interpolation through the peak bin and its neighbours, only
	// when the peak bin is a local maximum: then the vertex lies within half a
	// bin. (At the lower edge of the range a rising background leak has
	// a > b, and the vertex of that parabola can lie anywhere, even below 0.)
	if kp > 0 && kp < s.kmax {
		a, b, c := s.Amp[kp-1], s.Amp[kp], s.Amp[kp+1]
		if den := a - 2*b + c; den < 0 && a <= b && c <= b {
			s.fpk += math.Max(-0.5, math.Min(0.5, 0.5*(a-c)/den)) * df
		}
	}
	return s
}
