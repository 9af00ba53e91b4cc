package library

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"cleave/calc/quantity"
)

// correlated returns fitted parameters as quantities that carry the fit's covariance: with
// cov = V Λ Vᵀ, the parameters are v + V √Λ z for new independent inputs z of unit standard
// uncertainty, so that every quantity computed from them (a contact resistance and a
// transfer length from one line, a prediction from an Arrhenius fit) has the right
// uncertainty and correlations. A zero (or non-finite) covariance gives exact quantities.
func correlated(v []float64, cov [][]float64, ds []quantity.Dim) []quantity.Quantity {
	n := len(v)
	out := make([]quantity.Quantity, n)
	sym := mat.NewSymDense(n, nil)
	nonzero := false
	for i := range n {
		for j := i; j < n; j++ {
			c := (cov[i][j] + cov[j][i]) / 2
			if math.IsNaN(c) || math.IsInf(c, 0) {
				c = 0
			}
			sym.SetSym(i, j, c)
			nonzero = nonzero || c != 0
		}
	}
	var eig mat.EigenSym
	if !nonzero || !eig.Factorize(sym, true) {
		for i := range n {
			out[i] = quantity.New(v[i], ds[i])
		}
		return out
	}
	vals := eig.Values(nil)
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	z := make([]quantity.Quantity, n)
	for k := range n {
		z[k] = quantity.Uncertain(0, 1, quantity.Dimensionless)
	}
	for i := range n {
		partials := make([]float64, n)
		for k := range n {
			partials[k] = vecs.At(i, k) * math.Sqrt(math.Max(vals[k], 0))
		}
		out[i] = quantity.Derived(v[i], ds[i], z, partials)
	}
	return out
}
