package transport

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Estimate is a value with its standard uncertainty, both in SI units. An
// Uncertainty of 0 means unknown or not computed, never "exact".
type Estimate struct {
	Value       float64
	Uncertainty float64
}

func (e Estimate) String() string { return fmt.Sprintf("%.6g ± %.2g", e.Value, e.Uncertainty) }

// PolyFit is a least-squares polynomial y = Σ_k Coef[k] x^k with the covariance
// of its coefficients.
//
// The fit is done on the centred and scaled abscissa t = (x − Center)/Scale,
// which lies in [−1, 1], by the normal equations (a Cholesky factorisation of a
// (Deg+1)² Gram matrix); with t in [−1, 1] and Deg ≤ 5 the Gram matrix stays well
// conditioned, and one pass over the data suffices, so fits over 10^6 points do
// not allocate a design matrix.
//
// The covariance is residual-based: Cov = (AᵀWA)⁻¹ · χ²/DoF, where χ² is the
// weighted sum of squared residuals. This is the usual choice when the noise
// level is not known in advance (it equals scipy.optimize.curve_fit with
// absolute_sigma=False); with sigma given, only the relative weights matter.
type PolyFit struct {
	Deg           int
	Coef          []float64   // in powers of x (original units)
	Cov           [][]float64 // covariance of Coef
	N             int         // points used
	DoF           int         // N − (Deg+1)
	Chi2          float64     // weighted sum of squared residuals
	Sigma         float64     // residual standard deviation sqrt(Chi2/DoF) (unweighted fits: in y units)
	Center, Scale float64     // the abscissa transform t = (x − Center)/Scale

	a    []float64 // coefficients in powers of t
	covA *mat.SymDense
}

// FitPoly fits a polynomial of degree deg to the points (x[i], y[i]). sigma,
// if not nil, gives the standard uncertainty of each y; the weights are 1/sigma².
// Points where x, y or sigma is NaN are skipped. It returns an error wrapping
// ErrTooFewPoints when fewer than deg+2 usable points remain (a residual-based
// covariance needs at least one degree of freedom) and ErrBadArgument when the
// normal equations are singular (fewer than deg+1 distinct x values).
//
// The slices must have equal lengths; FitPoly panics otherwise (a programming error).
func FitPoly(x, y, sigma []float64, deg int) (*PolyFit, error) {
	if len(x) != len(y) || (sigma != nil && len(sigma) != len(x)) {
		panic("transport: FitPoly slice length mismatch")
	}
	if deg < 0 {
		return nil, fmt.Errorf("transport: polynomial degree %d: %w", deg, ErrBadArgument)
	}
	p := deg + 1
	// Range of usable x.
	lo, hi := math.Inf(1), math.Inf(-1)
	n := 0
	for i := range x {
		if !usable(x, y, sigma, i) {
			continue
		}
		n++
		lo = math.Min(lo, x[i])
		hi = math.Max(hi, x[i])
	}
	if n < p+1 {
		return nil, fmt.Errorf("polynomial fit of degree %d needs at least %d points, got %d: %w", deg, p+1, n, ErrTooFewPoints)
	}
	f := &PolyFit{Deg: deg, N: n, DoF: n - p, Center: (lo + hi) / 2, Scale: (hi - lo) / 2}
	if f.Scale == 0 {
		f.Scale = 1
	}
	gram := mat.NewSymDense(p, nil)
	rhs := mat.NewVecDense(p, nil)
	phi := make([]float64, p)
	g := make([]float64, p*p)
	r := make([]float64, p)
	for i := range x {
		if !usable(x, y, sigma, i) {
			continue
		}
		w := 1.0
		if sigma != nil {
			w = 1 / (sigma[i] * sigma[i])
		}
		t := (x[i] - f.Center) / f.Scale
		powers(phi, t)
		for j := 0; j < p; j++ {
			wj := w * phi[j]
			r[j] += wj * y[i]
			for k := j; k < p; k++ {
				g[j*p+k] += wj * phi[k]
			}
		}
	}
	for j := 0; j < p; j++ {
		rhs.SetVec(j, r[j])
		for k := j; k < p; k++ {
			gram.SetSym(j, k, g[j*p+k])
		}
	}
	var chol mat.Cholesky
	if ok := chol.Factorize(gram); !ok {
		return nil, fmt.Errorf("polynomial fit of degree %d: singular normal equations (too few distinct x values): %w", deg, ErrBadArgument)
	}
	var av mat.VecDense
	if err := chol.SolveVecTo(&av, rhs); err != nil {
		return nil, fmt.Errorf("polynomial fit of degree %d: %v: %w", deg, err, ErrBadArgument)
	}
	f.a = make([]float64, p)
	for j := range f.a {
		f.a[j] = av.AtVec(j)
	}
	// Residuals in a second pass (more accurate than the normal-equation identity).
	for i := range x {
		if !usable(x, y, sigma, i) {
			continue
		}
		res := y[i] - evalT(f.a, (x[i]-f.Center)/f.Scale)
		if sigma != nil {
			res /= sigma[i]
		}
		f.Chi2 += res * res
	}
	if f.DoF > 0 {
		f.Sigma = math.Sqrt(f.Chi2 / float64(f.DoF))
	}
	var inv mat.SymDense
	if err := chol.InverseTo(&inv); err != nil {
		return nil, fmt.Errorf("polynomial fit of degree %d: %v: %w", deg, err, ErrBadArgument)
	}
	inv.ScaleSym(f.Sigma*f.Sigma, &inv)
	f.covA = &inv

	// Transform to powers of x: t^k = Scale^-k Σ_j C(k,j) x^j (−Center)^(k−j).
	T := mat.NewDense(p, p, nil)
	for k := 0; k < p; k++ {
		sk := math.Pow(f.Scale, -float64(k))
		for j := 0; j <= k; j++ {
			T.Set(j, k, binom(k, j)*math.Pow(-f.Center, float64(k-j))*sk)
		}
	}
	f.Coef = make([]float64, p)
	for j := 0; j < p; j++ {
		for k := 0; k < p; k++ {
			f.Coef[j] += T.At(j, k) * f.a[k]
		}
	}
	var tc, cov mat.Dense
	tc.Mul(T, f.covA)
	cov.Mul(&tc, T.T())
	f.Cov = make([][]float64, p)
	for j := range f.Cov {
		f.Cov[j] = make([]float64, p)
		for k := range f.Cov[j] {
			f.Cov[j][k] = cov.At(j, k)
		}
	}
	return f, nil
}

// CoefEstimate returns coefficient k with its standard uncertainty.
func (f *PolyFit) CoefEstimate(k int) Estimate {
	return Estimate{f.Coef[k], math.Sqrt(math.Max(f.Cov[k][k], 0))}
}

// Eval returns the fitted polynomial at x.
func (f *PolyFit) Eval(x float64) float64 { return evalT(f.a, (x-f.Center)/f.Scale) }

// EvalEstimate returns the fitted value at x with its standard uncertainty
// sqrt(gᵀ Cov g), g being the vector of powers (propagated in the scaled basis).
func (f *PolyFit) EvalEstimate(x float64) Estimate {
	p := f.Deg + 1
	g := make([]float64, p)
	powers(g, (x-f.Center)/f.Scale)
	gv := mat.NewVecDense(p, g)
	v := mat.Inner(gv, f.covA, gv)
	return Estimate{f.Eval(x), math.Sqrt(math.Max(v, 0))}
}

func usable(x, y, sigma []float64, i int) bool {
	if math.IsNaN(x[i]) || math.IsNaN(y[i]) {
		return false
	}
	return sigma == nil || (sigma[i] > 0 && !math.IsInf(sigma[i], 0))
}

func powers(dst []float64, t float64) {
	v := 1.0
	for k := range dst {
		dst[k] = v
		v *= t
	}
}

func evalT(a []float64, t float64) float64 {
	v := 0.0
	for k := len(a) - 1; k >= 0; k-- {
		v = v*t + a[k]
	}
	return v
}

func binom(n, k int) float64 {
	r := 1.0
	for i := 1; i <= k; i++ {
		r = r * float64(n-k+i) / float64(i)
	}
	return r
}
