package transport

import (
	"cmp"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Extremum is one maximum or minimum of the oscillatory part of R_xx.
type Extremum struct {
	B          float64  // field of the extremum, T (> 0)
	Value      Estimate // signed oscillatory part ΔR at the extremum, Ohm
	Background float64  // the smooth background R at B, Ohm (stands for R_0 in ΔR/R_0)
	Points     int      // points in the local fit
}

// WarnLargeAmplitude: the window reaches fields where the oscillation is no longer small
// against the background, outside the low-field form the Dingle and LK analyses rest on.
const WarnLargeAmplitude = "large-amplitude"

// largeAmplitudeBound is the |ΔR|/R_0 above which an extremum counts as large. The low-field
// form Δρ/ρ_0 = 4 (X/sinh X) exp(−π/(ω_c τ_q)) cos(…) is the first term of an expansion in the
// Dingle factor and holds for Δρ ≪ ρ_0 [src:CSF1989]; beyond it the minima flatten towards
// zero, harmonics grow and the fundamental's amplitude no longer follows the form. The bound
// 0.5 is common practice.
const largeAmplitudeBound = 0.5

// largeAmplitude warns when an extremum of es has |ΔR|/R_0 above largeAmplitudeBound, naming
// the largest and the highest field below which every extremum stays under the bound.
func largeAmplitude(es []Extremum) *Warning {
	worst, wB := 0.0, 0.0
	for _, e := range es {
		if r := math.Abs(e.Value.Value) / e.Background; e.Background > 0 && r > worst {
			worst, wB = r, e.B
		}
	}
	if !(worst > largeAmplitudeBound) {
		return nil
	}
	below := 0.0 // the highest field up to which every extremum is small
	for _, e := range sortedByField(es) {
		if !(e.Background > 0) || math.Abs(e.Value.Value)/e.Background > largeAmplitudeBound {
			break
		}
		below = e.B
	}
	advice := "start the window lower"
	if below > 0 {
		advice = fmt.Sprintf("every extremum up to %.3g T stays below %.1f: end the window there", below, largeAmplitudeBound)
	}
	return &Warning{WarnLargeAmplitude, fmt.Sprintf(
		"|ΔR|/R_0 reaches %.2g at %.3g T, where the low-field form (ΔR ≪ R_0) no longer holds; %s", worst, wB, advice)}
}

// sortedByField is es ordered by rising field.
func sortedByField(es []Extremum) []Extremum {
	s := slices.Clone(es)
	slices.SortFunc(s, func(a, b Extremum) int { return cmp.Compare(a.B, b.B) })
	return s
}

// oscData is R_xx over a field window, folded to |B|, with its smooth
// background removed exactly as SdHDensity does it: a least-squares polynomial
// in B of degree bgDeg over the window.
type oscData struct {
	u, r []float64 // 1/|B| increasing, residual R − background
	bg   *PolyFit
}

func newOscData(B, R []float64, bgDeg int) (*oscData, error) {
	b := make([]float64, len(B))
	for i := range B {
		b[i] = math.Abs(B[i])
	}
	bg, err := FitPoly(b, R, nil, bgDeg)
	if err != nil {
		return nil, err
	}
	idx := make([]int, len(b))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(x, y int) int {
		switch {
		case b[x] > b[y]:
			return -1
		case b[x] < b[y]:
			return 1
		}
		return 0
	})
	o := &oscData{bg: bg, u: make([]float64, len(b)), r: make([]float64, len(b))}
	for k, i := range idx {
		o.u[k] = 1 / b[i]
		o.r[k] = R[i] - bg.Eval(b[i])
	}
	return o, nil
}

// phase returns φ such that the residual ≈ A cos(2π f u + φ), from the
// complex demodulation Σ r exp(−2πi f u) (dominated by the largest amplitudes).
func (o *oscData) phase(f float64) float64 {
	var s complex128
	for i, u := range o.u {
		s += complex(o.r[i], 0) * cmplx.Exp(complex(0, -2*math.Pi*f*u))
	}
	return cmplx.Phase(s)
}

// localFit fits r ≈ c0 + c1 s + α cos(2π f t) + β sin(2π f t) + γ s cos(2π f t)
// + δ s² cos(2π f t), t = u − uc, s = t/h, h = 1/(2f), to the points within
// half a period of uc (one full period in all), by linear least squares with a
// residual-based covariance. The local constant and slope absorb what the
// global background polynomial leaves (a large oscillation pulls that
// polynomial); the s cos and s² cos terms take up a change of the envelope
// across the window, so α is the amplitude at uc. ok is false when the window
// is not inside the data or holds fewer than 8 points.
func (o *oscData) localFit(f, uc float64) (alpha, beta, sigA, c0 float64, n int, ok bool) {
	h := 1 / (2 * f)
	if uc-h < o.u[0] || uc+h > o.u[len(o.u)-1] {
		return 0, 0, 0, 0, 0, false
	}
	lo, _ := slices.BinarySearch(o.u, uc-h)
	hi := lo
	for hi < len(o.u) && o.u[hi] <= uc+h {
		hi++
	}
	n = hi - lo
	if n < 8 {
		return 0, 0, 0, 0, n, false
	}
	const np = 6
	G := mat.NewSymDense(np, nil)
	v := mat.NewVecDense(np, nil)
	phi := func(u float64) [np]float64 {
		t := u - uc
		sn, c := math.Sincos(2 * math.Pi * f * t)
		s := t / h
		return [np]float64{1, s, c, sn, s * c, s * s * c}
	}
	for i := lo; i < hi; i++ {
		p := phi(o.u[i])
		for j := 0; j < np; j++ {
			v.SetVec(j, v.AtVec(j)+p[j]*o.r[i])
			for k := j; k < np; k++ {
				G.SetSym(j, k, G.At(j, k)+p[j]*p[k])
			}
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(G) {
		return 0, 0, 0, 0, n, false
	}
	var x mat.VecDense
	if ch.SolveVecTo(&x, v) != nil {
		return 0, 0, 0, 0, n, false
	}
	rss := 0.0
	for i := lo; i < hi; i++ {
		p := phi(o.u[i])
		d := o.r[i]
		for j := 0; j < np; j++ {
			d -= p[j] * x.AtVec(j)
		}
		rss += d * d
	}
	var inv mat.SymDense
	if ch.InverseTo(&inv) != nil {
		return 0, 0, 0, 0, n, false
	}
	sigA = math.Sqrt(rss / float64(n-np) * inv.At(2, 2))
	return x.AtVec(2), x.AtVec(3), sigA, x.AtVec(0), n, true
}

// extrema locates the extrema of the residual for an oscillation of
// frequency f (T): first guesses from the global phase, each refined twice by
// moving to the maximum of the locally fitted sinusoid; the value is the
// local fit's cosine coefficient α (unbiased by a linear change of the
// envelope across the window, which only feeds the sine term).
func (o *oscData) extrema(f float64) []Extremum {
	phi := o.phase(f)
	u0, u1 := o.u[0], o.u[len(o.u)-1]
	m0 := int(math.Ceil((2*math.Pi*f*u0 + phi) / math.Pi))
	m1 := int(math.Floor((2*math.Pi*f*u1 + phi) / math.Pi))
	var out []Extremum
	for m := m0; m <= m1; m++ {
		uc := (float64(m)*math.Pi - phi) / (2 * math.Pi * f)
		ok := true
		for it := 0; it < 2 && ok; it++ {
			var a, b float64
			a, b, _, _, _, ok = o.localFit(f, uc)
			if ok && a != 0 {
				uc += math.Atan(b/a) / (2 * math.Pi * f)
			}
		}
		if !ok {
			continue
		}
		if e, ok := o.at(f, uc); ok {
			if len(out) > 0 && math.Abs(1/out[len(out)-1].B-uc) < 1/(4*f) {
				continue // two guesses converged on the same extremum
			}
			out = append(out, e)
		}
	}
	return out
}

// at evaluates the extremum at a fixed position uc = 1/B.
func (o *oscData) at(f, uc float64) (Extremum, bool) {
	a, _, s, c0, n, ok := o.localFit(f, uc)
	if !ok {
		return Extremum{}, false
	}
	return Extremum{B: 1 / uc, Value: Estimate{a, s}, Background: o.bg.Eval(1/uc) + c0, Points: n}, true
}

// oscFrequency returns the SdH frequency of the R_xx window: from SdHDensity
// when it succeeds, else from the hint (T, ≤ 0 for none). The string says
// where the frequency came from.
func oscFrequency(d *Dataset, bmin, bmax, hint float64, opts []Option) (float64, string, error) {
	r, err := SdHDensity(d, bmin, bmax, 2, opts...)
	if err == nil && r.Frequency.Value > 0 {
		return r.Frequency.Value, "SdH analysis of the data", nil
	}
	if hint > 0 {
		return hint, "from the given density", nil
	}
	if err == nil {
		err = fmt.Errorf("%s: SdH analysis gave no positive frequency: %w", d.Name, ErrNoOscillation)
	}
	return 0, "", fmt.Errorf("no oscillation frequency: %w", err) // err starts with the file name
}

// xOverSinh is X/sinh X, with its series near 0.
func xOverSinh(x float64) float64 {
	if math.Abs(x) < 1e-4 {
		return 1 - x*x/6
	}
	if x > 700 {
		return 0
	}
	return x / math.Sinh(x)
}

// lkArgument returns X = 2π² k_B T m/(ħ e B) [src:LK1956], m in kg.
func lkArgument(T, B, m float64) float64 {
	return 2 * math.Pi * math.Pi * kB * T * m / (hbar * qe * B)
}

// ThermalDamping returns the Lifshitz–Kosevich factor X/sinh X with
// X = 2π² k_B T m/(ħ e B) for temperature T (K), field B (T) and effective
// mass m (kg) [src:LK1956].
func ThermalDamping(T, B, m float64) float64 { return xOverSinh(lkArgument(T, B, m)) }

// DingleFactor returns exp(−π m/(e B τ_q)) for field B (T), effective mass m
// (kg) and quantum lifetime τ_q (s) (Dingle 1952 [src:DINGLE1952]).
func DingleFactor(B, m, tauQ float64) float64 { return math.Exp(-math.Pi * m / (qe * B * tauQ)) }
