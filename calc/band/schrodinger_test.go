package band

import (
	"cleave/internal/testutil"
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// testGrid builds a bare grid of n intervals of width h with per-interval masses (m*/m_e)
// and per-node potential energies (eV) from the given functions of position.
func testGrid(n int, h float64, mass func(z float64) float64, pot func(j int, z float64) float64) *grid {
	g := &grid{h: h, n: n, kT: kB * 4.2 / qe, maxSub: 10, cut: 0.5}
	// One Γ valley; the others lie far above the cut, so the solver skips them.
	for v := range g.val {
		vg := vgrid{name: valleyNames[v], gv: 1, mInv: make([]float64, n), v0: make([]float64, n+1), md: make([]float64, n+1)}
		for k := 0; k < n; k++ {
			vg.mInv[k] = 1 / mass((float64(k)+0.5)*h)
		}
		for j := 0; j <= n; j++ {
			z := float64(j) * h
			vg.v0[j] = pot(j, z) + 1e3*float64(v)
			vg.md[j] = mass(z)
		}
		g.val[v] = vg
	}
	g.v0 = g.val[0].v0
	return g
}

func stateEnergies(g *grid, cut float64) []float64 {
	tri := tridiag{d: make([]float64, g.n-1), e: make([]float64, g.n-2)}
	t := hbar * hbar / (2 * me * g.h * g.h) / qe
	for j := 1; j < g.n; j++ {
		tri.d[j-1] = t*(g.val[0].mInv[j-1]+g.val[0].mInv[j]) + g.v0[j]
		if j < g.n-1 {
			tri.e[j-1] = -t * g.val[0].mInv[j]
		}
	}
	vals, _ := tri.lowest(cut, 10, nil, -1)
	return vals
}

// TestInfiniteWell: E_n = n²π²ħ²/(2m*L²) (closed form), with CODATA 2018 constants:
// L = 10 nm, m* = 0.067: E1 = 56.124 meV, E2 = 224.50 meV.
func TestInfiniteWell(t *testing.T) {
	g := testGrid(1000, 10e-9/1000, func(float64) float64 { return 0.067 }, func(int, float64) float64 { return 0 })
	st := g.schrodinger(make([]float64, g.n+1), nil)
	want := []float64{56.124, 224.50}
	for i, w := range want {
		if testutil.RelDiff(st.e[i]*1e3, w) > 1e-4 {
			t.Errorf("E%d = %.5f meV, want %.3f (closed form)", i+1, st.e[i]*1e3, w)
		}
		closed := float64((i+1)*(i+1)) * math.Pi * math.Pi * hbar * hbar / (2 * 0.067 * me * 1e-16) / qe
		if testutil.RelDiff(st.e[i], closed) > 1e-5 {
			t.Errorf("E%d = %.8g eV, closed form %.8g", i+1, st.e[i], closed)
		}
		// normalisation ∫|ψ|² dz = 1
		s := 0.0
		for _, p := range st.psi[i] {
			s += p * p * g.h
		}
		if math.Abs(s-1) > 1e-12 {
			t.Errorf("ψ%d norm %g", i+1, s)
		}
	}
}

// finiteWellRoot solves the BenDaniel–Duke matching conditions (BenDaniel & Duke, Phys. Rev.
// 152, 683 (1966): ψ and ψ'/m continuous) by
// bisection: even states (k/m_w) tan(kL/2) = κ/m_b, odd states −(k/m_w) cot(kL/2) = κ/m_b.
func finiteWellRoot(v0, l, mw, mb float64, odd bool) float64 {
	f := func(e float64) float64 {
		k := math.Sqrt(2*mw*me*e*qe) / hbar
		kap := math.Sqrt(2*mb*me*(v0-e)*qe) / hbar
		s, c := math.Sincos(k * l / 2)
		if odd {
			return -k/mw*c - kap/mb*s
		}
		return k/mw*s - kap/mb*c
	}
	// bracket inside the branch where the root lies (first even, first odd state)
	lo, hi := 1e-9, v0-1e-9
	kMax := func(ang float64) float64 { return math.Pow(ang/(l/2)*hbar, 2) / (2 * mw * me) / qe }
	if odd {
		lo, hi = kMax(math.Pi/2)+1e-12, math.Min(v0-1e-12, kMax(math.Pi)-1e-12)
	} else {
		hi = math.Min(hi, kMax(math.Pi/2)-1e-12)
	}
	for i := 0; i < 200; i++ {
		mid := 0.5 * (lo + hi)
		if (f(lo) < 0) == (f(mid) < 0) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

// TestFiniteWell: V0 = 0.25 eV, L = 10 nm, GaAs well m* = 0.067; roots of the matching
// conditions evaluated independently with CODATA 2018 constants:
// equal masses E1 = 32.772, E2 = 125.90 meV; BenDaniel–Duke with barrier mass 0.0919
// E1 = 30.547, E2 = 120.04 meV (BenDaniel & Duke, Phys. Rev. 152, 683 (1966)).
func TestFiniteWell(t *testing.T) {
	tests := []struct {
		name   string
		mb     float64
		e1, e2 float64 // meV, independent evaluation
	}{
		{"equal masses", 0.067, 32.772, 125.90},
		{"BenDaniel-Duke", 0.0919, 30.547, 120.04},
	}
	const (
		l, side, h, v0 = 10e-9, 30e-9, 0.01e-9, 0.25
	)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := int(math.Round((l + 2*side) / h))
			jl, jr := int(math.Round(side/h)), int(math.Round((side+l)/h))
			in := func(z float64) bool { return z > side && z < side+l }
			g := testGrid(n, h,
				func(z float64) float64 {
					if in(z) {
						return 0.067
					}
					return tc.mb
				},
				func(j int, z float64) float64 {
					switch {
					case j == jl || j == jr:
						return v0 / 2 // interface node: control-volume average
					case in(z):
						return 0
					}
					return v0
				})
			e := stateEnergies(g, v0)
			if len(e) < 2 {
				t.Fatalf("found %d bound states, want ≥ 2", len(e))
			}
			for i, want := range []float64{tc.e1, tc.e2} {
				if testutil.RelDiff(e[i]*1e3, want) > 3e-4 {
					t.Errorf("E%d = %.4f meV, want %.3f (independent evaluation)", i+1, e[i]*1e3, want)
				}
				exact := finiteWellRoot(v0, l, 0.067, tc.mb, i == 1)
				if testutil.RelDiff(e[i], exact) > 3e-4 {
					t.Errorf("E%d = %.6g eV, matching-condition root %.6g eV", i+1, e[i], exact)
				}
			}
		})
	}
}

// Zeros of Ai: Abramowitz & Stegun Table 10.13 and NIST DLMF §9.9 (values
// computed with mpmath airyaizero).
var airyZeros = []float64{2.33810741046, 4.08794944413, 5.52055982810, 6.78670809007, 7.94413358712}

// triangularEnergies solves the triangular well V = eFz (F = 1e7 V/m, GaAs m* = 0.067) with
// an infinite wall at z = 0 on a grid of step h.
func triangularEnergies(h float64) ([]float64, *grid, *states) {
	const f, depth = 1e7, 80e-9
	n := int(math.Round(depth / h))
	g := testGrid(n, h, func(float64) float64 { return 0.067 }, func(_ int, z float64) float64 { return f * z })
	st := g.schrodinger(make([]float64, n+1), nil)
	return st.e, g, st
}

// TestTriangularWell: E_n = (ħ²/2m*)^{1/3}(eF)^{2/3}|a_{n+1}| (Airy solution of the
// triangular well; Ando, Fowler & Stern, Rev. Mod. Phys. 54, 437 (1982)), scale 38.4547 meV
// at F = 1e7 V/m with CODATA 2018 constants: E0 = 89.911, E1 = 157.20, E2 = 212.29 meV, ⟨z⟩0 = 5.9941 nm.
func TestTriangularWell(t *testing.T) {
	e, g, st := triangularEnergies(0.01e-9)
	scale := math.Cbrt(hbar*hbar/(2*0.067*me)) * math.Pow(qe*1e7, 2.0/3) / qe
	if testutil.RelDiff(scale*1e3, 38.4547) > 1e-5 {
		t.Errorf("scale %.6f meV, want 38.4547 (closed form)", scale*1e3)
	}
	for i, a := range airyZeros {
		if testutil.RelDiff(e[i], scale*a) > 1e-4 {
			t.Errorf("E%d = %.5f meV, Airy %.5f meV", i, e[i]*1e3, scale*a*1e3)
		}
	}
	for i, want := range []float64{89.911, 157.20, 212.29} {
		if testutil.RelDiff(e[i]*1e3, want) > 1e-4 {
			t.Errorf("E%d = %.4f meV, want %.3f (Airy zeros × scale)", i, e[i]*1e3, want)
		}
	}
	mz := 0.0
	for j, p := range st.psi[0] {
		mz += p * p * float64(j) * g.h * g.h
	}
	if testutil.RelDiff(mz*1e9, 5.9941) > 1e-4 {
		t.Errorf("<z>0 = %.5f nm, want 5.9941 ((2/3)E0/(eF))", mz*1e9)
	}
}

// TestGridConvergence: the error of the triangular-well energies against the Airy zeros
// falls as h² (second-order finite differences).
func TestGridConvergence(t *testing.T) {
	scale := math.Cbrt(hbar*hbar/(2*0.067*me)) * math.Pow(qe*1e7, 2.0/3) / qe
	var errs []float64
	for _, h := range []float64{0.4e-9, 0.2e-9, 0.1e-9} {
		e, _, _ := triangularEnergies(h)
		errs = append(errs, math.Abs(e[0]-scale*airyZeros[0]))
	}
	for i := 1; i < len(errs); i++ {
		ratio := errs[i-1] / errs[i]
		if ratio < 3.6 || ratio > 4.4 {
			t.Errorf("error ratio on halving h = %.3f, want ≈ 4 (errors %v)", ratio, errs)
		}
	}
}

// TestLowestAgainstGonum compares the bisection/inverse-iteration eigensolver with gonum's
// Dsterf (all eigenvalues) and EigenSym (eigenvectors) on seeded random tridiagonals.
func TestLowestAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 20; trial++ {
		n := 20 + rng.IntN(60)
		tri := tridiag{d: make([]float64, n), e: make([]float64, n-1)}
		for i := range tri.d {
			tri.d[i] = rng.NormFloat64()
		}
		for i := range tri.e {
			tri.e[i] = rng.NormFloat64()
		}
		all := append([]float64(nil), tri.d...)
		ee := append([]float64(nil), tri.e...)
		if !(gonum.Implementation{}).Dsterf(n, all, ee) {
			t.Fatal("Dsterf failed")
		}
		sort.Float64s(all)
		k := n / 3
		cut := 0.5 * (all[k-1] + all[k])
		vals, vecs := tri.lowest(cut, n, nil, -1)
		if len(vals) != k {
			t.Fatalf("trial %d: %d eigenvalues below cut, want %d", trial, len(vals), k)
		}
		dense := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			dense.SetSym(i, i, tri.d[i])
			if i < n-1 {
				dense.SetSym(i, i+1, tri.e[i])
			}
		}
		var es mat.EigenSym
		if !es.Factorize(dense, true) {
			t.Fatal("EigenSym failed")
		}
		var ev mat.Dense
		es.VectorsTo(&ev)
		for i := 0; i < k; i++ {
			if math.Abs(vals[i]-all[i]) > 1e-12 {
				t.Errorf("trial %d λ%d = %.15g, Dsterf %.15g", trial, i, vals[i], all[i])
			}
			// |⟨v, v_gonum⟩| = 1 for simple eigenvalues
			p := 0.0
			for j := 0; j < n; j++ {
				p += vecs[i][j] * ev.At(j, i)
			}
			if math.Abs(math.Abs(p)-1) > 1e-8 {
				t.Errorf("trial %d vector %d overlap %g", trial, i, p)
			}
		}
	}
}
