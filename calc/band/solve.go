package band

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/lapack/gonum"
)

// ErrNotConverged is wrapped by the *ConvergenceError that [Solve] returns when the
// self-consistent loop reaches its iteration cap.
var ErrNotConverged = errors.New("self-consistent loop did not converge")

// ConvergenceError reports the state of a self-consistent loop that hit its cap.
type ConvergenceError struct {
	Iterations int
	MaxDeltaV  float64 // last max|Δφ| between iterations, volts
	RelDeltaN  float64 // last relative change of the total 2D density
}

func (e *ConvergenceError) Error() string {
	return fmt.Sprintf("%v after %d iterations: last max|Δφ| = %.3g V (want < tolerance), relative Δn2D = %.3g",
		ErrNotConverged, e.Iterations, e.MaxDeltaV, e.RelDeltaN)
}

// Unwrap returns [ErrNotConverged].
func (e *ConvergenceError) Unwrap() error { return ErrNotConverged }

// Defaults of [Options].
const (
	DefaultGridM        = 0.5e-9 // m
	DefaultTemperatureK = 1.5    // K
	DefaultSubstrateM   = 100e-9 // m of substrate below the last layer
	DefaultMaxIter      = 200
	DefaultMaxSubbands  = 80
	DefaultTolV         = 1e-6 // V
	DefaultTolN         = 1e-5 // relative
)

// Options control [Solve]. The zero value selects every default.
type Options struct {
	GridM float64 // grid step, metres; default 0.5 nm. Layer interfaces snap to the nearest node.
	// TemperatureK sets the Fermi–Dirac smearing, default 1.5 K. A degenerate 2DEG's density
	// changes by far less than the solver tolerance between 1.5 K and 0 K, so a solution at
	// 1.5 K is also the low-temperature answer; donor freeze-out is however temperature
	// dependent, and very low temperatures (< 0.5 K) make convergence slower.
	TemperatureK float64
	SubstrateM   float64 // substrate included below the last layer, metres; default 100 nm
	// DonorDepthEV, when > 0, replaces the hydrogenic donor binding energy of every donor by
	// this depth below the local conduction band (an effective DX-like level E_D', REFERENCE
	// §3.3). Zero keeps the shallow hydrogenic level of each layer's material.
	DonorDepthEV float64
	MaxIter      int     // cap of self-consistent iterations; default 200
	MaxSubbands  int     // most subbands kept; default 80
	TolV         float64 // stop when max|Δφ| < TolV (volts); default 1e-6
	TolN         float64 // and the relative change of n2D < TolN; default 1e-5
}

// check rejects options that are not finite numbers.
func (o Options) check() error {
	for _, f := range []struct {
		name string
		v    float64
	}{{"GridM", o.GridM}, {"TemperatureK", o.TemperatureK}, {"SubstrateM", o.SubstrateM},
		{"DonorDepthEV", o.DonorDepthEV}, {"TolV", o.TolV}, {"TolN", o.TolN}} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) {
			return fmt.Errorf("band: Options.%s is %v, want a finite number (0 for the default)", f.name, f.v)
		}
	}
	if o.GridM < 0 || o.TemperatureK < 0 || o.SubstrateM < 0 || o.DonorDepthEV < 0 {
		return errors.New("band: Options.GridM, TemperatureK, SubstrateM and DonorDepthEV must not be negative")
	}
	return nil
}

func (o Options) withDefaults() Options {
	if o.GridM <= 0 {
		o.GridM = DefaultGridM
	}
	if o.TemperatureK <= 0 {
		o.TemperatureK = DefaultTemperatureK
	}
	if o.SubstrateM <= 0 {
		o.SubstrateM = DefaultSubstrateM
	}
	if o.MaxIter <= 0 {
		o.MaxIter = DefaultMaxIter
	}
	if o.MaxSubbands <= 0 {
		o.MaxSubbands = DefaultMaxSubbands
	}
	if o.TolV <= 0 {
		o.TolV = DefaultTolV
	}
	if o.TolN <= 0 {
		o.TolN = DefaultTolN
	}
	return o
}

// Subband is one bound state of the converged potential.
type Subband struct {
	E     float64   // energy, eV relative to the Fermi level
	N2D   float64   // occupation, m^-2 (spin degeneracy 2, valley 1)
	Mstar float64   // in-plane mass ⟨m*(z)⟩ over |ψ|², in m_e
	MeanZ float64   // ⟨z⟩, metres from the surface
	Psi   []float64 // ψ(z) on Solution.Z, normalised so that ∫|ψ|² dz = 1 (m^-1/2)
}

// Well is a connected region holding electrons.
type Well struct {
	StartM, EndM float64 // depth range, metres from the surface
	N2D          float64 // electrons in it, m^-2
}

// Solution is a converged solution. Energies are in eV with the Fermi level at zero.
type Solution struct {
	Z         []float64 // node depths from the surface, metres
	Ec        []float64 // conduction-band edge, eV
	N3D       []float64 // electron density, m^-3
	Density2D []Well    // regions holding electrons, surface first
	Subbands  []Subband // lowest first
	TotalN2D  float64   // all electrons, m^-2
	// SurfaceChargeM2 is the charge on the surface states or gate, in units of e per m².
	SurfaceChargeM2 float64
	// NeutralityError is surface charge + ∫(N_D⁺ − N_A − n)dz, m^-2; near zero when
	// the solution is self-consistent.
	NeutralityError float64
	Iterations      int
	TemperatureK    float64
	GridM           float64
}

// grid is the discretised stack. Nodes j = 0..n; interval k lies between nodes k and k+1.
type grid struct {
	h      float64
	n      int       // number of intervals
	mInv   []float64 // per interval, m_e/m*
	eps    []float64 // per interval, F/m
	w      []float64 // per node, control-volume width
	v0     []float64 // per node, band offset on the common scale, eV
	mNode  []float64 // per node, m*/m_e
	nd     []float64 // per node, donors m^-3
	na     []float64 // per node, acceptors m^-3
	eb     []float64 // per node, donor binding energy eV
	phi0   float64   // Dirichlet value of φ at the surface node
	kT     float64   // eV
	maxSub int
	cut    float64 // eigenvalues above this (eV) are not computed; 0 selects 40 kT + 5 meV
}

func newGrid(s Stack, ps []Params, o Options) (*grid, error) {
	h := o.GridM
	total := o.SubstrateM
	for _, l := range s.Layers {
		total += l.ThicknessM
	}
	n := int(math.Round(total / h))
	if n < 4 {
		return nil, fmt.Errorf("stack of %.3g m is too thin for a grid step of %.3g m", total, h)
	}
	if n > 2_000_000 {
		return nil, fmt.Errorf("stack of %.3g m needs %d grid points at step %.3g m; use a coarser Options.GridM", total, n, h)
	}
	g := &grid{h: h, n: n, kT: kB * o.TemperatureK / qe, maxSub: o.MaxSubbands}
	layerOf := make([]int, n) // per interval: index into ps
	start := 0
	depth := 0.0
	type sheet struct {
		node int
		d    Doping
		eb   float64
	}
	var sheets []sheet
	ebOf := func(p Params) float64 {
		if o.DonorDepthEV > 0 {
			return o.DonorDepthEV
		}
		return p.DonorEV
	}
	for i, l := range s.Layers {
		top := depth
		depth += l.ThicknessM
		end := int(math.Round(depth / h))
		if l.ThicknessM > 0 && end == start {
			return nil, &LayerError{Layer: i + 1, Name: l.Name, Err: fmt.Errorf("%w: %.3g m is thinner than half the grid step %.3g m; use a finer Options.GridM",
				ErrBadThickness, l.ThicknessM, h)}
		}
		for k := start; k < end && k < n; k++ {
			layerOf[k] = i
		}
		if l.Doping.Sheet && l.Doping.Density > 0 {
			sheets = append(sheets, sheet{node: int(math.Round((top + l.ThicknessM/2) / h)), d: l.Doping, eb: ebOf(ps[i])})
		}
		start = end
	}
	for k := start; k < n; k++ {
		layerOf[k] = len(s.Layers)
	}
	g.mInv = make([]float64, n)
	g.eps = make([]float64, n)
	ndI := make([]float64, n)
	naI := make([]float64, n)
	ebI := make([]float64, n)
	ecI := make([]float64, n)
	mI := make([]float64, n)
	for k, li := range layerOf {
		p := ps[li]
		g.mInv[k] = 1 / p.Mstar
		g.eps[k] = p.EpsR * eps0
		ecI[k] = p.EcEV
		mI[k] = p.Mstar
		if li < len(s.Layers) {
			d := s.Layers[li].Doping
			if !d.Sheet {
				if d.Donor() {
					ndI[k] = d.Density
					ebI[k] = ebOf(p)
				} else if d.Acceptor() {
					naI[k] = d.Density
				}
			}
		}
	}
	np := n + 1
	g.w = make([]float64, np)
	g.v0 = make([]float64, np)
	g.mNode = make([]float64, np)
	g.nd = make([]float64, np)
	g.na = make([]float64, np)
	g.eb = make([]float64, np)
	for j := 0; j < np; j++ {
		var ks []int
		if j > 0 {
			ks = append(ks, j-1)
		}
		if j < n {
			ks = append(ks, j)
		}
		g.w[j] = h / 2 * float64(len(ks))
		ebw := 0.0
		for _, k := range ks {
			g.v0[j] += ecI[k] / float64(len(ks))
			g.mNode[j] += mI[k] / float64(len(ks))
			g.nd[j] += ndI[k] * h / 2 / g.w[j]
			g.na[j] += naI[k] * h / 2 / g.w[j]
			ebw += ebI[k] * ndI[k] * h / 2 / g.w[j]
		}
		if g.nd[j] > 0 {
			g.eb[j] = ebw / g.nd[j]
		}
	}
	for _, sh := range sheets {
		j := min(max(sh.node, 0), n)
		add := sh.d.Density / g.w[j]
		if sh.d.Donor() {
			g.eb[j] = (g.eb[j]*g.nd[j] + sh.eb*add) / (g.nd[j] + add)
			g.nd[j] += add
		} else {
			g.na[j] += add
		}
	}
	// Surface node: E_c(0) = barrier, with E_c = v0 − φ.
	g.phi0 = g.v0[0] - s.Surface.barrier()
	return g, nil
}

// states holds the subbands of one potential.
type states struct {
	e   []float64   // eV
	psi [][]float64 // per node, ∫ψ² dz = 1, length n+1 (zero at both ends)
	dos []float64   // m*/(πħ²) per eV per m², spin 2
	m   []float64   // m*/m_e
	// lo, hi bound the nodes where |ψ|² exceeds 1e-14 of its peak; outside them the state
	// adds nothing measurable to the density.
	lo, hi []int
}

// schrodinger solves the BenDaniel–Duke equation on the potential v0 − φ, with ψ = 0 at
// both ends: −ħ²/(2h²)[(ψ_{j+1} − ψ_j)/m_{j+½} − (ψ_j − ψ_{j−1})/m_{j−½}] + V_j ψ_j = E ψ_j.
func (g *grid) schrodinger(phi []float64, hint []float64, spread float64) *states {
	n := g.n
	t := hbar * hbar / (2 * me * g.h * g.h) / qe // eV
	m := n - 1
	tri := tridiag{d: make([]float64, m), e: make([]float64, m-1)}
	for j := 1; j < n; j++ {
		tri.d[j-1] = t*(g.mInv[j-1]+g.mInv[j]) + g.v0[j] - phi[j]
		if j < n-1 {
			tri.e[j-1] = -t * g.mInv[j]
		}
	}
	cut := g.cut
	if cut == 0 {
		cut = 40*g.kT + 0.005
	}
	vals, vecs := tri.lowest(cut, g.maxSub, hint, spread)
	st := &states{e: vals}
	sq := 1 / math.Sqrt(g.h)
	for i, v := range vecs {
		psi := make([]float64, n+1)
		mm := 0.0
		for j := 1; j < n; j++ {
			psi[j] = v[j-1] * sq
			mm += v[j-1] * v[j-1] * g.mNode[j]
		}
		peak := 0.0
		for _, p := range psi {
			peak = math.Max(peak, p*p)
		}
		lo, hi := 0, n
		for lo < n && psi[lo]*psi[lo] < 1e-14*peak {
			lo++
		}
		for hi > 0 && psi[hi]*psi[hi] < 1e-14*peak {
			hi--
		}
		st.lo = append(st.lo, lo)
		st.hi = append(st.hi, hi)
		st.psi = append(st.psi, psi)
		st.m = append(st.m, mm)
		st.dos = append(st.dos, mm*me/(math.Pi*hbar*hbar)*qe)
		_ = i
	}
	return st
}

// f0 is ln(1 + eˣ), the 2D Fermi–Dirac integral of order 0.
func f0(x float64) float64 {
	if x > 0 {
		return x + math.Log1p(math.Exp(-x))
	}
	return math.Log1p(math.Exp(x))
}

func logistic(x float64) float64 {
	if x > 0 {
		return 1 / (1 + math.Exp(-x))
	}
	ex := math.Exp(x)
	return ex / (1 + ex)
}

// charge fills q (N_D⁺ − N_A − n, m^-3), dq (∂q/∂φ, m^-3 V^-1) and nel (n, m^-3) at φ.
// With phiRef non-nil the electron density is the predictor of Trellakis et al.: each
// subband energy shifted by the local −(φ − φ_ref).
func (g *grid) charge(phi, phiRef []float64, st *states, q, dq, nel []float64) {
	kT := g.kT
	// States that stay more than 45 kT above E_F at every node add nothing.
	var active []int
	if st != nil {
		maxShift := 0.0
		if phiRef != nil {
			maxShift = math.Inf(-1)
			for j := range phi {
				maxShift = math.Max(maxShift, phi[j]-phiRef[j])
			}
		}
		for i, e := range st.e {
			if (maxShift-e)/kT >= -45 {
				active = append(active, i)
			}
		}
	}
	for j := range q {
		nj, dn := 0.0, 0.0
		if st != nil {
			shift := 0.0
			if phiRef != nil {
				shift = phi[j] - phiRef[j]
			}
			for _, i := range active {
				e := st.e[i]
				if j < st.lo[i] || j > st.hi[i] {
					continue
				}
				p2 := st.psi[i][j] * st.psi[i][j]
				x := (shift - e) / kT
				if x < -45 {
					continue
				}
				// one exponential serves ln(1+eˣ) and the logistic 1/(1+e⁻ˣ)
				ex := math.Exp(-math.Abs(x))
				f, l := math.Log1p(ex), ex/(1+ex)
				if x > 0 {
					f += x
					l = 1 / (1 + ex)
				}
				nj += p2 * st.dos[i] * kT * f
				dn += p2 * st.dos[i] * l
			}
		}
		ndp, dnd := 0.0, 0.0
		if g.nd[j] > 0 {
			// N_D⁺ = N_D/(1 + 2 exp(a)), a = (E_F − E_D)/kT, E_D = E_c − E_b = v0 − φ − E_b
			a := (phi[j] - g.v0[j] + g.eb[j]) / kT
			var occ float64 // 2e^a/(1+2e^a), the neutral fraction
			if a > 0 {
				occ = 1 / (1 + 0.5*math.Exp(-a))
			} else {
				ea := 2 * math.Exp(a)
				occ = ea / (1 + ea)
			}
			ndp = g.nd[j] * (1 - occ)
			dnd = -g.nd[j] * occ * (1 - occ) / kT
		}
		q[j] = ndp - g.na[j] - nj
		dq[j] = dnd - dn
		if nel != nil {
			nel[j] = nj
		}
	}
}

// residual fills r[j] for the unknown nodes j = 1..n (r[0] unused), in m^-2:
// [ε_{j+½}(φ_{j+1} − φ_j) − ε_{j−½}(φ_j − φ_{j−1})]/(h e) + w_j q_j, zero field at the end.
func (g *grid) residual(phi, q, r []float64) float64 {
	n := g.n
	s := 0.0
	for j := 1; j <= n; j++ {
		flux := -g.eps[j-1] * (phi[j] - phi[j-1])
		if j < n {
			flux += g.eps[j] * (phi[j+1] - phi[j])
		}
		r[j] = flux/(g.h*qe) + g.w[j]*q[j]
		s += r[j] * r[j]
	}
	return math.Sqrt(s)
}

// work holds scratch slices reused across iterations.
type work struct {
	q, dq, r, trial, d, e, b []float64
}

func newWork(n int) *work {
	mk := func() []float64 { return make([]float64, n+1) }
	return &work{q: mk(), dq: mk(), r: mk(), trial: mk(), d: mk(), e: mk(), b: mk()}
}

// poisson solves the nonlinear Poisson equation for φ (in place; φ[0] is the Dirichlet
// value) by Newton's method with backtracking on the residual norm.
func (g *grid) poisson(phi, phiRef []float64, st *states, wk *work) error {
	n := g.n
	impl := gonum.Implementation{}
	g.charge(phi, phiRef, st, wk.q, wk.dq, nil)
	norm := g.residual(phi, wk.q, wk.r)
	for it := 0; it < 200; it++ {
		// (−J) δ = R, −J symmetric positive definite tridiagonal.
		for j := 1; j <= n; j++ {
			a := g.eps[j-1] / (g.h * qe)
			if j < n {
				a += g.eps[j] / (g.h * qe)
				wk.e[j-1] = -g.eps[j] / (g.h * qe)
			}
			wk.d[j-1] = a - g.w[j]*wk.dq[j]
			wk.b[j-1] = wk.r[j]
		}
		if !impl.Dptsv(n, 1, wk.d[:n], wk.e[:n-1], wk.b[:n], 1) {
			return errors.New("band: Poisson Jacobian is not positive definite")
		}
		step := 0.0
		for j := 0; j < n; j++ {
			step = math.Max(step, math.Abs(wk.b[j]))
		}
		scale := 1.0
		if step > 0.5 {
			scale = 0.5 / step // never move more than 0.5 V in one Newton step
		}
		accepted := false
		for ls := 0; ls < 40; ls++ {
			wk.trial[0] = phi[0]
			for j := 1; j <= n; j++ {
				wk.trial[j] = phi[j] + scale*wk.b[j-1]
			}
			g.charge(wk.trial, phiRef, st, wk.q, wk.dq, nil)
			nn := g.residual(wk.trial, wk.q, wk.r)
			if nn <= (1-1e-4*scale)*norm || scale*step < 1e-13 {
				copy(phi, wk.trial)
				norm = nn
				accepted = true
				break
			}
			scale /= 2
		}
		if !accepted || scale*step < 1e-11 {
			// converged to machine precision or stalled at the tolerance floor
			g.charge(phi, phiRef, st, wk.q, wk.dq, nil)
			g.residual(phi, wk.q, wk.r)
			return nil
		}
	}
	return nil
}

// Solve finds the self-consistent conduction-band profile and subbands of a stack.
//
// The surface node holds E_c = Surface barrier (pinned surface) or Schottky barrier − e·GateV
// (gate); the deep end has zero field. Wavefunctions vanish at both ends of the grid. The loop
// stops when max|Δφ| < TolV and the relative change of n2D < TolN. When the iteration cap is
// reached Solve returns the last iterate together with a *ConvergenceError (wrapping
// [ErrNotConverged]). Invalid stacks give the errors of [Stack.Validate].
func Solve(stack Stack, opt Options) (*Solution, error) {
	ps, err := stack.params()
	if err != nil {
		return nil, err
	}
	if err := opt.check(); err != nil {
		return nil, err
	}
	o := opt.withDefaults()
	g, err := newGrid(stack, ps, o)
	if err != nil {
		return nil, err
	}
	n := g.n
	wk := newWork(n)
	phi := make([]float64, n+1)
	for j := range phi {
		phi[j] = g.phi0
	}
	// Start from the classical solution without electrons: donors ionise or freeze out.
	if err := g.poisson(phi, nil, nil, wk); err != nil {
		return nil, err
	}
	prev := make([]float64, n+1)
	nel := make([]float64, n+1)
	lastN := math.NaN()
	var cerr *ConvergenceError
	it := 0
	var hint []float64
	spread := -1.0
	for it = 1; ; it++ {
		st := g.schrodinger(phi, hint, spread)
		copy(prev, phi)
		if err := g.poisson(phi, prev, st, wk); err != nil {
			return nil, err
		}
		dphi := 0.0
		for j := range phi {
			dphi = math.Max(dphi, math.Abs(phi[j]-prev[j]))
		}
		g.charge(phi, prev, st, wk.q, wk.dq, nel)
		n2 := 0.0
		for j := range nel {
			n2 += nel[j] * g.w[j]
		}
		rel := math.Abs(n2-lastN) / math.Max(n2, 1e9)
		if math.IsNaN(rel) {
			rel = math.Inf(1)
		}
		lastN = n2
		hint, spread = st.e, dphi
		if dphi < o.TolV && rel < o.TolN {
			break
		}
		if it >= o.MaxIter {
			cerr = &ConvergenceError{Iterations: it, MaxDeltaV: dphi, RelDeltaN: rel}
			break
		}
	}
	res := g.result(phi, it, o, hint, spread)
	if cerr != nil {
		return res, cerr
	}
	return res, nil
}

// result evaluates the corrector (plain) electron density on the final potential.
func (g *grid) result(phi []float64, it int, o Options, hint []float64, spread float64) *Solution {
	n := g.n
	st := g.schrodinger(phi, hint, spread)
	q := make([]float64, n+1)
	dq := make([]float64, n+1)
	nel := make([]float64, n+1)
	r := make([]float64, n+1)
	g.charge(phi, nil, st, q, dq, nel)
	g.residual(phi, q, r)
	res := &Solution{Iterations: it, TemperatureK: o.TemperatureK, GridM: g.h}
	res.Z = make([]float64, n+1)
	res.Ec = make([]float64, n+1)
	res.N3D = nel
	for j := 0; j <= n; j++ {
		res.Z[j] = float64(j) * g.h
		res.Ec[j] = g.v0[j] - phi[j]
		res.TotalN2D += nel[j] * g.w[j]
	}
	for j := 1; j <= n; j++ {
		res.NeutralityError += r[j]
	}
	sigma := -g.eps[0]*(phi[1]-phi[0])/(g.h*qe) - g.w[0]*q[0]
	res.SurfaceChargeM2 = sigma
	for i, e := range st.e {
		sb := Subband{E: e, Mstar: st.m[i], Psi: st.psi[i]}
		sb.N2D = st.dos[i] * g.kT * f0(-e/g.kT)
		for j := range st.psi[i] {
			sb.MeanZ += st.psi[i][j] * st.psi[i][j] * res.Z[j] * g.h
		}
		res.Subbands = append(res.Subbands, sb)
	}
	res.Density2D = wells(res.Z, nel, g.w)
	return res
}

// wells splits the electron density into connected regions where it exceeds 1e-4 of its
// maximum, and integrates each.
func wells(z, nel, w []float64) []Well {
	peak := 0.0
	for _, v := range nel {
		peak = math.Max(peak, v)
	}
	if peak == 0 {
		return nil
	}
	var out []Well
	in := false
	for j, v := range nel {
		if v > 1e-4*peak {
			if !in {
				out = append(out, Well{StartM: z[j]})
				in = true
			}
			out[len(out)-1].EndM = z[j]
			out[len(out)-1].N2D += v * w[j]
		} else {
			in = false
		}
	}
	return out
}
