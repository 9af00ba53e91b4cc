package band

import (
	"math"

	"gonum.org/v1/gonum/lapack/gonum"
)

// tridiag is a symmetric tridiagonal matrix: diagonal d (length n) and off-diagonal e
// (length n−1).
type tridiag struct {
	d, e []float64
}

// sturm returns the number of eigenvalues of t strictly below x (Sturm sequence count of
// the LDLᵀ pivots of t − xI; Golub & Van Loan, Matrix Computations, §8.4).
func (t tridiag) sturm(x float64) int {
	count := 0
	q := t.d[0] - x
	if q < 0 {
		count++
	}
	for k := 1; k < len(t.d); k++ {
		if q == 0 {
			q = 1e-300
		}
		q = t.d[k] - x - t.e[k-1]*t.e[k-1]/q
		if q < 0 {
			count++
		}
	}
	return count
}

// gershgorin returns bounds that enclose every eigenvalue.
func (t tridiag) gershgorin() (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	n := len(t.d)
	for k := 0; k < n; k++ {
		r := 0.0
		if k > 0 {
			r += math.Abs(t.e[k-1])
		}
		if k < n-1 {
			r += math.Abs(t.e[k])
		}
		lo = math.Min(lo, t.d[k]-r)
		hi = math.Max(hi, t.d[k]+r)
	}
	return lo, hi
}

// lowest returns the eigenvalues of t below cut (at most maxN of them, the lowest first) and
// their eigenvectors, normalised to unit Euclidean norm with the largest component positive.
//
// gonum has no routine for selected eigenpairs of a tridiagonal matrix (LAPACK dstebz/dstein),
// so eigenvalues come from Sturm-count bisection with shared brackets and eigenvectors from
// inverse iteration with gonum's pivoted tridiagonal solver Dgtsv, re-orthogonalised within
// clusters of close eigenvalues. Tests check the result against gonum's Dsterf and EigenSym.
//
// hint, when non-nil, holds the ordered eigenvalues of a matrix that differs from t by a
// diagonal perturbation of at most spread in absolute value; by Weyl's inequality the i-th
// eigenvalue of t then lies within spread of hint[i], which narrows the bisection brackets.
func (t tridiag) lowest(cut float64, maxN int, hint []float64, spread float64) (vals []float64, vecs [][]float64) {
	n := len(t.d)
	glo, ghi := t.gershgorin()
	if cut <= glo {
		return nil, nil
	}
	cut = math.Min(cut, ghi+1)
	k := t.sturm(cut)
	if k > maxN {
		k = maxN
	}
	if k == 0 {
		return nil, nil
	}
	scale := math.Max(math.Abs(glo), math.Abs(ghi))
	// Bisection stops at 1e-8 of the matrix scale; the Rayleigh quotient of the inverse-
	// iteration vector then refines each eigenvalue to rounding level.
	tol := 1e-8 * scale
	lo := make([]float64, k)
	hi := make([]float64, k)
	for i := range lo {
		lo[i], hi[i] = glo, cut
		if i < len(hint) && spread >= 0 {
			// widen a little for rounding in the matrix assembly
			pad := spread + 1e-12*scale
			lo[i] = math.Max(lo[i], hint[i]-pad)
			hi[i] = math.Min(hi[i], hint[i]+pad)
			if lo[i] >= hi[i] {
				lo[i], hi[i] = glo, cut
			}
		}
	}
	for i := 0; i < k; i++ {
		for hi[i]-lo[i] > tol {
			mid := 0.5 * (lo[i] + hi[i])
			if mid <= lo[i] || mid >= hi[i] {
				break
			}
			c := t.sturm(mid)
			// eigenvalues with index < c lie below mid
			for j := i; j < k; j++ {
				if j < c {
					if mid < hi[j] {
						hi[j] = mid
					}
				} else if mid > lo[j] {
					lo[j] = mid
				}
			}
		}
	}
	vals = make([]float64, k)
	for i := range vals {
		vals[i] = 0.5 * (lo[i] + hi[i])
	}
	vecs = make([][]float64, k)
	dl := make([]float64, n-1)
	dd := make([]float64, n)
	du := make([]float64, n-1)
	impl := gonum.Implementation{}
	clusterStart := 0
	for i := 0; i < k; i++ {
		if i > 0 && vals[i]-vals[i-1] > 1e-7*scale {
			clusterStart = i
		}
		x := make([]float64, n)
		for j := range x {
			x[j] = 1 + 0.37*math.Sin(0.7*float64(j)+float64(i))
		}
		shift := vals[i]
		nudges := 0
		// Inverse iteration until the Rayleigh quotient settles (at least two steps, at
		// most six): the shift is only within tol of the eigenvalue.
		rq, prevRQ := math.NaN(), math.NaN()
		for iter := 0; iter < 6; iter++ {
			copy(dl, t.e)
			copy(du, t.e)
			for j := range dd {
				dd[j] = t.d[j] - shift
			}
			if !impl.Dgtsv(n, 1, dl, dd, du, x, 1) {
				// exactly singular: nudge the shift and retry
				shift += tol * float64(1+nudges)
				if nudges++; nudges < 50 {
					iter--
				}
				continue
			}
			for c := clusterStart; c < i; c++ {
				p := dot(x, vecs[c])
				for j := range x {
					x[j] -= p * vecs[c][j]
				}
			}
			normalise(x)
			prevRQ, rq = rq, t.rayleigh(x)
			if iter >= 1 && math.Abs(rq-prevRQ) <= 1e-13*scale {
				break
			}
		}
		// sign convention: largest component positive
		imax := 0
		for j := range x {
			if math.Abs(x[j]) > math.Abs(x[imax]) {
				imax = j
			}
		}
		if x[imax] < 0 {
			for j := range x {
				x[j] = -x[j]
			}
		}
		vecs[i] = x
		if math.Abs(rq-vals[i]) <= 2*tol {
			vals[i] = rq
		}
	}
	return vals, vecs
}

// rayleigh is the Rayleigh quotient xᵀTx of a unit vector x.
func (t tridiag) rayleigh(x []float64) float64 {
	n := len(t.d)
	rq := 0.0
	for j := 0; j < n; j++ {
		tx := t.d[j] * x[j]
		if j > 0 {
			tx += t.e[j-1] * x[j-1]
		}
		if j < n-1 {
			tx += t.e[j] * x[j+1]
		}
		rq += x[j] * tx
	}
	return rq
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

func normalise(x []float64) {
	s := math.Sqrt(dot(x, x))
	for i := range x {
		x[i] /= s
	}
}
