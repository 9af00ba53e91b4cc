package transport

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"
)

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
	Background   []float64 // polynomial in B subtracted first, Ohm/T^k
	Spectrum     Spectrum
	Method       string

	XCol, YCol string
	BMin, BMax float64
	DataHash   string
	Points     int
	Warnings   []Warning
}

// SdHDensity finds the SdH frequency of R_xx (column "Rxx" against "B" unless
// WithColumns says otherwise) over bmin ≤ |B| ≤ bmax (T, bmin > 0) and returns
// the density n = g_s g_v (e/h) f_B (REFERENCE §2.11). gs is the spin
// degeneracy (2 while spin is unresolved, 1 when resolved); g_v comes from
// WithValleyDegeneracy (default 1).
//
// Method:
//  1. points in the range with no NaN, folded to |B| and sorted by 1/|B|;
//  2. a polynomial background in B (degree 3, WithBackground) is subtracted;
//  3. the residual is interpolated linearly onto a uniform 1/B grid of
//     min(N, 32768) points, multiplied by a Hann window, zero-padded to a power
//     of two ≥ 8× its length (WithPadding) and transformed (gonum dsp/fourier);
//  4. the highest peak between FMin = 2/(1/bmin − 1/bmax) (two periods in the
//     window) and FMax = the Nyquist frequency of the sparsest stretch of the
//     original data, refined by parabolic interpolation, gives FFTFrequency;
//  5. the frequency is then refined by least squares on the original points
//     (averaged in 1/B bins when there are more than 32768) with the model
//     Σ_k t^k [c_k cos(2π f u) + s_k sin(2π f u)] + a_0 + a_1 t, k = 0..3,
//     u = 1/B, t the scaled u: a slowly varying envelope (Dingle and thermal
//     damping) times the oscillation. f is found by a golden-section search of
//     the residual sum of squares S(f) (the linear parameters are solved for at
//     each f), and its standard uncertainty is the profile-likelihood value
//     σ_f = sqrt(2 σ̂² / S”(f)), σ̂² = S/(N − p). The coverage of this
//     uncertainty is tested over 50 seeded synthetic sweeps.
func SdHDensity(d *Dataset, bmin, bmax, gs float64, opts ...Option) (*SdHResult, error) {
	o := newOptions(opts)
	if !(bmin > 0) || !(bmax > bmin) {
		return nil, fmt.Errorf("%s: SdH analysis: field range %g T to %g T: expected 0 < bmin < bmax: %w", d.Name, bmin, bmax, ErrBadArgument)
	}
	if !(gs > 0) || !(o.gv > 0) {
		return nil, fmt.Errorf("%s: SdH analysis: degeneracies g_s = %g, g_v = %g must be > 0: %w", d.Name, gs, o.gv, ErrBadArgument)
	}
	if o.bgDeg < 0 || o.bgDeg > 3 {
		return nil, fmt.Errorf("%s: SdH analysis: background degree %d: expected 0–3: %w", d.Name, o.bgDeg, ErrBadArgument)
	}
	xc, err := column(d, o.field, DimField, "magnetic field")
	if err != nil {
		return nil, err
	}
	yc, err := column(d, o.ycol, DimResistance, "resistance")
	if err != nil {
		return nil, err
	}
	B, R, _ := pairs(xc.Values, yc.Values, nil, bmin, bmax)
	const minPoints = 32
	if len(B) < minPoints {
		return nil, fmt.Errorf("%s: SdH analysis of %s over %g T ≤ |B| ≤ %g T: %d points; need at least %d: %w",
			d.Name, yc.Name, bmin, bmax, len(B), minPoints, ErrTooFewPoints)
	}
	res := &SdHResult{GS: gs, GV: o.gv, XCol: xc.Name, YCol: yc.Name, BMin: bmin, BMax: bmax, DataHash: d.Hash, Points: len(B)}

	// 1–2: fold, background.
	for i := range B {
		B[i] = math.Abs(B[i])
	}
	bg, err := FitPoly(B, R, nil, o.bgDeg)
	if err != nil {
		return nil, fmt.Errorf("%s: SdH background: %w", d.Name, err)
	}
	res.Background = bg.Coef
	type pt struct{ u, y, raw float64 }
	pts := make([]pt, len(B))
	for i := range B {
		pts[i] = pt{1 / B[i], R[i] - bg.Eval(B[i]), R[i]}
	}
	slices.SortFunc(pts, func(a, b pt) int {
		switch {
		case a.u < b.u:
			return -1
		case a.u > b.u:
			return 1
		}
		return 0
	})
	u0, u1 := pts[0].u, pts[len(pts)-1].u
	U := u1 - u0
	maxGap := 0.0
	for i := 1; i < len(pts); i++ {
		maxGap = math.Max(maxGap, pts[i].u-pts[i-1].u)
	}

	// 3: uniform grid, window, pad, FFT.
	m := min(len(pts), o.maxGrid)
	du := U / float64(m-1)
	grid := make([]float64, m)
	j := 0
	for i := range grid {
		u := u0 + float64(i)*du
		for j < len(pts)-2 && pts[j+1].u < u {
			j++
		}
		a, b := pts[j], pts[j+1]
		if b.u == a.u {
			grid[i] = (a.y + b.y) / 2
		} else {
			grid[i] = a.y + (b.y-a.y)*(u-a.u)/(b.u-a.u)
		}
	}
	pad := max(o.pad, 8)
	nfft := 1
	for nfft < pad*m {
		nfft <<= 1
	}
	buf := make([]float64, nfft)
	wsum := 0.0
	for i, v := range grid {
		w := 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(m-1))
		buf[i] = v * w
		wsum += w
	}
	coef := fourier.NewFFT(nfft).Coefficients(nil, buf)
	df := 1 / (float64(nfft) * du)
	res.FMin = 2 / U
	res.FMax = math.Min(1/(2*du), 1/(2*maxGap))
	kmax := min(int(res.FMax/df), len(coef)-1)
	res.Spectrum.Freq = make([]float64, kmax+1)
	res.Spectrum.Amp = make([]float64, kmax+1)
	for k := 0; k <= kmax; k++ {
		res.Spectrum.Freq[k] = float64(k) * df
		res.Spectrum.Amp[k] = 2 * math.Hypot(real(coef[k]), imag(coef[k])) / wsum
	}
	kmin := int(math.Ceil(res.FMin / df))
	if kmin+2 > kmax {
		return nil, fmt.Errorf("%s: SdH analysis of %s over %g–%g T: the window holds too few periods or points to resolve any frequency: %w",
			d.Name, yc.Name, bmin, bmax, ErrTooFewPoints)
	}
	kp := kmin
	for k := kmin; k <= kmax; k++ {
		if res.Spectrum.Amp[k] > res.Spectrum.Amp[kp] {
			kp = k
		}
	}
	fpk := float64(kp) * df
	if kp > 0 && kp < kmax {
		a, b, c := res.Spectrum.Amp[kp-1], res.Spectrum.Amp[kp], res.Spectrum.Amp[kp+1]
		if den := a - 2*b + c; den < 0 {
			fpk += 0.5 * (a - c) / den * df
		}
	}
	res.FFTFrequency = fpk
	if kp == kmin || kp == kmax {
		res.Warnings = append(res.Warnings, Warning{WarnSpectrumLimit, fmt.Sprintf(
			"the spectrum peaks at the edge of the searched range %.3g–%.3g T: widen the field range or check the data", res.FMin, res.FMax)})
	}
	med := median(res.Spectrum.Amp[kmin : kmax+1])
	if res.Spectrum.Amp[kp] < 4*med {
		res.Warnings = append(res.Warnings, Warning{WarnWeakPeak, fmt.Sprintf(
			"the spectral peak is only %.1f× the median amplitude", res.Spectrum.Amp[kp]/med)})
	}

	// 5: least-squares refinement on (binned) original points.
	fu, fy, fw := binned(pts, o.maxGrid, func(p pt) (float64, float64) { return p.u, p.raw })
	sf := &sinefit{u: fu, y: fy, w: fw, uc: (u0 + u1) / 2, us: U / 2, nb: o.bgDeg + 1, bc: (bmin + bmax) / 2, bs: (bmax - bmin) / 2}
	f, fsig, ok := sf.fit(fpk)
	if !ok {
		return nil, fmt.Errorf("%s: SdH analysis of %s: the least-squares refinement failed (singular fit): %w", d.Name, yc.Name, ErrBadArgument)
	}
	res.Frequency = Estimate{f, fsig}
	res.Oscillations = f * U
	res.Density = Estimate{DensityFromSdH(f, gs, o.gv), DensityFromSdH(fsig, gs, o.gv)}
	res.Method = fmt.Sprintf("polynomial background (degree %d) in B; Hann-windowed FFT of R_xx on a uniform 1/B grid (%d points, padded to %d); Gauss–Newton fit of a sinusoid with a log-quadratic envelope to the (binned) points; σ from the fit covariance", o.bgDeg, m, nfft)
	if res.Oscillations < 5 {
		res.Warnings = append(res.Warnings, Warning{WarnFewPoints, fmt.Sprintf("only %.1f periods in the field window", res.Oscillations)})
	}
	if w := outOfPhase(d, xc, yc, bmin, bmax, o.maxYFrac); w != nil {
		res.Warnings = append(res.Warnings, *w)
	}
	return res, nil
}

// binned returns the points as (u, y, weight) slices; with more than maxN
// points it averages them in maxN equal bins of u, the weight being the count.
func binned[P any](pts []P, maxN int, get func(P) (float64, float64)) (u, y, w []float64) {
	if len(pts) <= maxN {
		u, y, w = make([]float64, len(pts)), make([]float64, len(pts)), make([]float64, len(pts))
		for i, p := range pts {
			u[i], y[i] = get(p)
			w[i] = 1
		}
		return u, y, w
	}
	lo, _ := get(pts[0])
	hi, _ := get(pts[len(pts)-1])
	width := (hi - lo) / float64(maxN)
	su, sy, n := 0.0, 0.0, 0
	bin := 0
	flush := func() {
		if n > 0 {
			u = append(u, su/float64(n))
			y = append(y, sy/float64(n))
			w = append(w, float64(n))
		}
		su, sy, n = 0, 0, 0
	}
	for _, p := range pts {
		pu, py := get(p)
		b := min(int((pu-lo)/width), maxN-1)
		if b != bin {
			flush()
			bin = b
		}
		su += pu
		sy += py
		n++
	}
	flush()
	return u, y, w
}

// sinefit fits y ≈ A(t) cos(2π f (u − uc) + φ) + Σ_k b_k x^k with
// A(t) = exp(a_0 + a_1 t + a_2 t²) and t = (u − uc)/us, plus a polynomial
// background in the scaled field x, by damped Gauss–Newton.
// The parameter vector is (a_0..a_2, f, φ, b_0..b_{nb−1}).
type sinefit struct {
	u, y, w []float64
	uc, us  float64
	nb      int     // background terms: polynomial of degree nb−1 in the scaled field
	bc, bs  float64 // field scaling: x = (1/u − bc)/bs
}

const envTerms = 3

func (s *sinefit) np() int { return envTerms + 2 + s.nb }

func (s *sinefit) model(p []float64, u float64, jac []float64) float64 {
	t := (u - s.uc) / s.us
	th := 2*math.Pi*p[envTerms]*(u-s.uc) + p[envTerms+1]
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
		jac[envTerms] = -2 * math.Pi * (u - s.uc) * A * sn
		jac[envTerms+1] = -A * sn
	}
	x := (1/u - s.bc) / s.bs
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

// fit refines the frequency starting from f0 and returns f and σ_f from the
// residual-scaled covariance σ̂² (JᵀWJ)⁻¹.
func (s *sinefit) fit(f0 float64) (float64, float64, bool) {
	n := s.np()
	// Start: constant amplitude and phase from a linear fit at f0.
	var c0, s0, cc, ss, csum float64
	// Initial background: a polynomial fit in the scaled field.
	xs := make([]float64, len(s.u))
	for i, u := range s.u {
		xs[i] = (1/u - s.bc) / s.bs
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
	p[envTerms] = f0
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
	dof := float64(len(s.u) - n)
	if dof <= 0 {
		return p[envTerms], math.NaN(), true
	}
	return p[envTerms], math.Sqrt(cur / dof * inv.At(envTerms, envTerms)), true
}

func median(x []float64) float64 {
	s := slices.Clone(x)
	slices.Sort(s)
	return s[len(s)/2]
}
