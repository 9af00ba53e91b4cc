package band

import (
	"errors"
	"fmt"
	"math"
	"strings"

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
	DefaultSubstrateM   = 100e-9 // m of substrate below the last layer (BottomBulk, BottomZeroField)
	DefaultMaxIter      = 200
	DefaultMaxSubbands  = 80
	DefaultTolV         = 1e-6 // V
	DefaultTolN         = 1e-5 // relative
	// DefaultDXDepthEV is the effective depth of the DX level of Si below the conduction band
	// of Al(x)Ga(1−x)As with x ≥ DXOnsetX, used in the dark: 0.1 eV, a typical value of
	// the fitted donor level E_D' of modulation-doping models (range 0.05–0.2 eV; from
	// memory, unverified).
	DefaultDXDepthEV = 0.1
	// DXOnsetX is the Al fraction above which the DX state is the ground state of Si in
	// Al(x)Ga(1−x)As, about 0.22 (Mooney, J. Appl. Phys. 67, R1 (1990)).
	DXOnsetX = 0.22
)

// Donor models (Options.Donors).
const (
	// DonorsShallow: every donor has the hydrogenic level of its layer material (the
	// zero value; also the state after illumination, when the DX centres have been
	// emptied and stay empty at low temperature: persistent photoconductivity).
	DonorsShallow = iota
	// DonorsDark: Si in Al(x)Ga(1−x)As with x ≥ DXOnsetX (and in AlAs) sits at the DX
	// level, DXDepthEV below the local conduction band; donors in GaAs and in alloys below
	// the onset stay shallow. This is the wafer cooled in the dark.
	DonorsDark
)

// Options control [Solve]. The zero value selects every default.
type Options struct {
	GridM float64 // grid step, metres; default 0.5 nm. Layer interfaces snap to the nearest node.
	// TemperatureK sets the Fermi–Dirac smearing, default 1.5 K. A degenerate 2DEG's density
	// changes by far less than the solver tolerance between 1.5 K and 0 K, so a solution at
	// 1.5 K is also the low-temperature answer; donor freeze-out is however temperature
	// dependent, and very low temperatures (< 0.5 K) make convergence slower.
	TemperatureK float64
	// SubstrateM is the substrate included below the last layer for BottomBulk and
	// BottomZeroField, metres; default 100 nm. BottomPinned ends the grid at the substrate.
	SubstrateM float64
	// DonorDepthEV, when > 0, replaces the binding energy of every donor outside doping
	// wells by this depth below the local conduction band (an effective deep level E_D',
	// Stern, Appl. Phys. Lett. 43, 974 (1983)). It overrides Donors.
	DonorDepthEV float64
	// Donors selects the donor model: DonorsShallow (default) or DonorsDark.
	Donors int
	// DXDepthEV is the DX depth below the local conduction band for DonorsDark; 0 selects
	// DefaultDXDepthEV.
	DXDepthEV   float64
	MaxIter     int     // cap of self-consistent iterations; default 200
	MaxSubbands int     // most subbands kept per valley; default 80
	TolV        float64 // stop when max|Δφ| < TolV (volts); default 1e-6
	TolN        float64 // and the relative change of n2D < TolN; default 1e-5
}

// check rejects options that are not finite numbers.
func (o Options) check() error {
	for _, f := range []struct {
		name string
		v    float64
	}{{"GridM", o.GridM}, {"TemperatureK", o.TemperatureK}, {"SubstrateM", o.SubstrateM},
		{"DonorDepthEV", o.DonorDepthEV}, {"DXDepthEV", o.DXDepthEV}, {"TolV", o.TolV}, {"TolN", o.TolN}} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) {
			return fmt.Errorf("band: Options.%s is %v, want a finite number (0 for the default)", f.name, f.v)
		}
	}
	if o.GridM < 0 || o.TemperatureK < 0 || o.SubstrateM < 0 || o.DonorDepthEV < 0 || o.DXDepthEV < 0 {
		return errors.New("band: Options.GridM, TemperatureK, SubstrateM, DonorDepthEV and DXDepthEV must not be negative")
	}
	if o.Donors != DonorsShallow && o.Donors != DonorsDark {
		return fmt.Errorf("band: Options.Donors = %d, want DonorsShallow or DonorsDark", o.Donors)
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
	if o.DXDepthEV <= 0 {
		o.DXDepthEV = DefaultDXDepthEV
	}
	return o
}

// Subband is one bound state of the converged potential.
type Subband struct {
	Valley string    // ValleyGamma, ValleyXz, ValleyXxy or ValleyL
	Gv     int       // valley degeneracy of the subband
	E      float64   // energy, eV relative to the Fermi level
	N2D    float64   // occupation, m^-2 (spin 2 and the Gv valleys included)
	Mstar  float64   // in-plane density-of-states mass ⟨m_d(z)⟩ over |ψ|², in m_e
	MeanZ  float64   // ⟨z⟩, metres from the surface
	Region int       // index into Solution.Regions of the region the subband belongs to
	Psi    []float64 // ψ(z) on Solution.Z, normalised so that ∫|ψ|² dz = 1 (m^-1/2)
}

// Well is a connected region holding electrons.
type Well struct {
	StartM, EndM float64 // depth range, metres from the surface
	N2D          float64 // electrons in it, m^-2
}

// Solution is a converged solution. Energies are in eV with the Fermi level at zero.
type Solution struct {
	Z   []float64 // node depths from the surface, metres
	Ec  []float64 // lowest conduction-band edge over the valleys, eV
	N3D []float64 // electron density, m^-3
	// Edges holds the band edge of each valley (Γ, X_z, X_xy, L) at each node, eV.
	Edges     [NValleys][]float64
	Density2D []Well    // connected regions holding electrons, surface first
	Subbands  []Subband // all valleys, lowest first
	// Regions are the groups of layers (channel, doping wells, cap, barriers …) with the
	// electrons each holds; see [Region].
	Regions    []Region
	TotalN2D   float64 // all electrons, m^-2
	ChannelN2D float64 // electrons in the channel region(s), m^-2
	// Warnings name electrons outside the intended channel (a parasitic channel, electrons
	// left in a doping layer or in the cap) with where and how many, and a stack without a
	// channel. Electrons in doping wells are by design and only reported in Regions.
	Warnings []string
	// SurfaceChargeM2 is the charge on the surface states or gate, in units of e per m².
	SurfaceChargeM2 float64
	// BottomChargeM2 is the charge below the grid (the pinned substrate, or the depletion
	// layer of the p-type bulk), in units of e per m².
	BottomChargeM2 float64
	// NeutralityError is surface + bottom charge + ∫(N_D⁺ − N_A − n)dz, m^-2; near zero
	// when the solution is self-consistent.
	NeutralityError float64
	Iterations      int
	TemperatureK    float64
	GridM           float64
}

// vgrid is one valley on the grid.
type vgrid struct {
	name string
	gv   int
	mInv []float64 // per interval, m_e/Mz
	v0   []float64 // per node, band edge on the common scale, eV
	md   []float64 // per node, in-plane DOS mass m_d/m_e
}

// grid is the discretised stack. Nodes j = 0..n; interval k lies between nodes k and k+1.
type grid struct {
	h   float64
	n   int       // number of intervals
	eps []float64 // per interval, F/m
	w   []float64 // per node, control-volume width
	v0  []float64 // per node, lowest band edge over the valleys, eV
	val [NValleys]vgrid
	nd  []float64 // per node, donors m^-3
	na  []float64 // per node, acceptors m^-3
	eb  []float64 // per node, donor binding energy eV; +Inf for donors taken as ionised
	// mott is, per node, the Mott density of shallow donors (m^-3) above which electrons on
	// neutral donors form a conducting band; +Inf where the donors are deep (DX, or a given
	// DonorDepthEV) and their electrons stay localised.
	mott []float64
	// boundaries
	phi0     float64 // Dirichlet value of φ at the surface node
	bottom   int     // BottomPinned, BottomBulk, BottomZeroField
	phiN     float64 // BottomPinned: Dirichlet value of φ at the last node
	ecBulk   float64 // BottomBulk: E_c − E_F of the neutral bulk, eV
	naBulk   float64 // BottomBulk: acceptors of the bulk, m^-3
	epsBulk  float64 // BottomBulk: permittivity of the bulk, F/m
	kT       float64 // eV
	maxSub   int
	cut      float64 // eigenvalues above this (eV) are not computed; 0 selects 40 kT + 5 meV
	regions  []Region
	layerEnd float64 // depth of the bottom of the last layer
}

// unknowns is the number of the last node whose potential is solved for (n, or n−1 with a
// pinned bottom).
func (g *grid) unknowns() int {
	if g.bottom == BottomPinned {
		return g.n - 1
	}
	return g.n
}

func newGrid(s Stack, ps []Params, o Options) (*grid, error) {
	h := o.GridM
	total := 0.0
	for _, l := range s.Layers {
		total += l.ThicknessM
	}
	layerEnd := total
	if s.Bottom.Kind != BottomPinned {
		total += o.SubstrateM
	}
	n := int(math.Round(total / h))
	if n < 4 {
		return nil, fmt.Errorf("stack of %.3g m is too thin for a grid step of %.3g m", total, h)
	}
	if n > 2_000_000 {
		return nil, fmt.Errorf("stack of %.3g m needs %d grid points at step %.3g m; use a coarser Options.GridM", total, n, h)
	}
	g := &grid{h: h, n: n, kT: kB * o.TemperatureK / qe, maxSub: o.MaxSubbands, bottom: s.Bottom.Kind, layerEnd: layerEnd}
	g.regions = regionsOf(s, ps, float64(n)*h)
	inDopingWell := make([]bool, len(s.Layers))
	for _, r := range g.regions {
		if r.Kind != RegionDopingWell {
			continue
		}
		for li := r.FirstLayer; li <= r.LastLayer && li >= 1; li++ {
			inDopingWell[li-1] = true
		}
	}
	// ebOf is the binding energy of the donors of layer i: +Inf (ionised, their electrons
	// in the well's own subbands) inside a doping well; otherwise DonorDepthEV when given,
	// the DX depth in the dark for Al-rich layers, or the hydrogenic level.
	ebOf := func(i int) float64 {
		p := ps[i]
		switch {
		case inDopingWell[i]:
			return math.Inf(1)
		case o.DonorDepthEV > 0:
			return o.DonorDepthEV
		case o.Donors == DonorsDark && dxLayer(p):
			return o.DXDepthEV
		}
		return p.DonorEV
	}
	background := s.Bottom.background()
	layerOf := make([]int, n) // per interval: index into ps
	start := 0
	depth := 0.0
	type sheet struct {
		node     int
		d        Doping
		eb, mott float64
	}
	var sheets []sheet
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
			sheets = append(sheets, sheet{node: int(math.Round((top + l.ThicknessM/2) / h)), d: l.Doping, eb: ebOf(i), mott: mottOf(ps[i], ebOf(i))})
		}
		start = end
	}
	for k := start; k < n; k++ {
		layerOf[k] = len(s.Layers)
	}
	g.eps = make([]float64, n)
	ndI := make([]float64, n)
	naI := make([]float64, n)
	ebI := make([]float64, n)
	mottI := make([]float64, n)
	var ecI, mdI [NValleys][]float64
	for v := range g.val {
		g.val[v] = vgrid{name: valleyNames[v], gv: ps[0].Valleys[v].Gv, mInv: make([]float64, n)}
		ecI[v] = make([]float64, n)
		mdI[v] = make([]float64, n)
	}
	for k, li := range layerOf {
		p := ps[li]
		g.eps[k] = p.EpsR * eps0
		for v := range g.val {
			g.val[v].mInv[k] = 1 / p.Valleys[v].Mz
			ecI[v][k] = p.Valleys[v].EcEV
			mdI[v][k] = p.Valleys[v].Md
		}
		undoped := true
		if li < len(s.Layers) {
			d := s.Layers[li].Doping
			if d.Density > 0 {
				undoped = false
			}
			if !d.Sheet {
				if d.Donor() {
					ndI[k] = d.Density
					ebI[k] = ebOf(li)
					mottI[k] = mottOf(p, ebI[k])
				} else if d.Acceptor() {
					naI[k] = d.Density
				}
			}
		}
		if undoped {
			naI[k] += background
		}
	}
	np := n + 1
	g.w = make([]float64, np)
	g.v0 = make([]float64, np)
	g.nd = make([]float64, np)
	g.na = make([]float64, np)
	g.eb = make([]float64, np)
	g.mott = make([]float64, np)
	for j := range g.mott {
		g.mott[j] = math.Inf(1)
	}
	for v := range g.val {
		g.val[v].v0 = make([]float64, np)
		g.val[v].md = make([]float64, np)
	}
	for j := 0; j < np; j++ {
		var ks []int
		if j > 0 {
			ks = append(ks, j-1)
		}
		if j < n {
			ks = append(ks, j)
		}
		g.w[j] = h / 2 * float64(len(ks))
		ion := false
		ebw := 0.0
		for _, k := range ks {
			for v := range g.val {
				g.val[v].v0[j] += ecI[v][k] / float64(len(ks))
				g.val[v].md[j] += mdI[v][k] / float64(len(ks))
			}
			g.nd[j] += ndI[k] * h / 2 / g.w[j]
			g.na[j] += naI[k] * h / 2 / g.w[j]
			if ndI[k] > 0 {
				g.mott[j] = math.Min(g.mott[j], mottI[k])
			}
			if ndI[k] > 0 {
				if math.IsInf(ebI[k], 1) {
					ion = true
				} else {
					ebw += ebI[k] * ndI[k] * h / 2 / g.w[j]
				}
			}
		}
		switch {
		case ion:
			g.eb[j] = math.Inf(1)
		case g.nd[j] > 0:
			g.eb[j] = ebw / g.nd[j]
		}
		g.v0[j] = math.Inf(1)
		for v := range g.val {
			g.v0[j] = math.Min(g.v0[j], g.val[v].v0[j])
		}
	}
	for _, sh := range sheets {
		j := min(max(sh.node, 0), n)
		add := sh.d.Density / g.w[j]
		if sh.d.Donor() {
			if math.IsInf(sh.eb, 1) || math.IsInf(g.eb[j], 1) {
				g.eb[j] = math.Inf(1)
			} else {
				g.eb[j] = (g.eb[j]*g.nd[j] + sh.eb*add) / (g.nd[j] + add)
			}
			g.nd[j] += add
			g.mott[j] = math.Min(g.mott[j], sh.mott)
		} else {
			g.na[j] += add
		}
	}
	// Surface node: E_c(0) = barrier, with E_c = v0 − φ.
	g.phi0 = g.v0[0] - s.Surface.barrier()
	sub := ps[len(s.Layers)]
	switch s.Bottom.Kind {
	case BottomPinned:
		g.phiN = g.v0[n] - s.Bottom.pin()
	case BottomBulk:
		g.naBulk = background
		g.epsBulk = sub.EpsR * eps0
		// neutral p-type bulk: E_F at the acceptor level above the valence band
		g.ecBulk = sub.EcEV - (sub.VBOEV + acceptorEV)
	}
	return g, nil
}

// mottFactor is the Mott criterion n_c^{1/3} a_B* = 0.26 for the metal–insulator transition of
// doped semiconductors (Edwards & Sienko, Phys. Rev. B 17, 2575 (1978)).
const mottFactor = 0.26

// mottOf is the Mott density (m^-3) of donors with binding energy eb in material p: shallow
// hydrogenic donors have a_B* = a_0 ε_r/(m*/m_e); deeper (DX or given) levels get +Inf, their
// electrons being localised.
func mottOf(p Params, eb float64) float64 {
	if eb != p.DonorEV {
		return math.Inf(1)
	}
	a0 := 4 * math.Pi * eps0 * hbar * hbar / (me * qe * qe)
	aB := a0 * p.EpsR / p.Mstar
	return math.Pow(mottFactor/aB, 3)
}

// dxLayer reports whether Si in the layer forms DX centres: Al(x)Ga(1−x)As with
// x ≥ DXOnsetX, and AlAs.
func dxLayer(p Params) bool {
	switch p.Elements {
	case "AlAs":
		return true
	case "AlGaAs":
		return p.X >= DXOnsetX
	}
	return false
}

// states holds the subbands of one potential, all valleys together.
type states struct {
	e      []float64   // eV
	psi    [][]float64 // per node, ∫ψ² dz = 1, length n+1 (zero at both ends)
	dos    []float64   // Gv·m_d/(πħ²) per eV per m², spin 2
	m      []float64   // m_d/m_e
	valley []int
	// lo, hi bound the nodes where |ψ|² exceeds 1e-14 of its peak; outside them the state
	// adds nothing measurable to the density.
	lo, hi []int
}

// hints holds the eigenvalues of the previous iteration, per valley, and the largest
// potential change since.
type hints struct {
	e      [NValleys][]float64
	spread float64
}

// schrodinger solves the BenDaniel–Duke equation of every valley on the potential
// v0 − φ, with ψ = 0 at both ends:
// −ħ²/(2h²)[(ψ_{j+1} − ψ_j)/m_{j+½} − (ψ_j − ψ_{j−1})/m_{j−½}] + V_j ψ_j = E ψ_j,
// with m the valley's mass along the growth axis.
func (g *grid) schrodinger(phi []float64, hint *hints) *states {
	st := &states{}
	for v := range g.val {
		g.schrodingerValley(v, phi, hint, st)
	}
	return st
}

// windowEV and windowPadM set the part of the grid a valley's eigenproblem is solved on:
// the nodes where its band edge lies less than windowEV above the cut, widened by windowPadM
// on each side. A state below the cut decays at least as e^{−κz} with κ ≥ √(2m·windowEV)/ħ
// outside (κ ≥ 1.1 nm⁻¹ for m = 0.067 m_e), so the cut-off wavefunction is wrong by less
// than e^{−22} of its peak.
const (
	windowEV   = 0.3
	windowPadM = 20e-9
)

func (g *grid) schrodingerValley(v int, phi []float64, hint *hints, st *states) {
	n := g.n
	vg := &g.val[v]
	cut := g.cut
	if cut == 0 {
		cut = 40*g.kT + 0.005
	}
	// A valley whose edge lies above the cut everywhere has no state below it; otherwise
	// solve on the window around the nodes where it comes near the cut.
	lo, hi := -1, -1
	for j := 1; j < n; j++ {
		if vg.v0[j]-phi[j] < cut+windowEV {
			if lo < 0 {
				lo = j
			}
			hi = j
		}
	}
	if lo < 0 {
		return
	}
	below := false
	for j := lo; j <= hi; j++ {
		if vg.v0[j]-phi[j] < cut {
			below = true
			break
		}
	}
	if !below {
		return
	}
	pad := int(math.Ceil(windowPadM / g.h))
	lo, hi = max(1, lo-pad), min(n-1, hi+pad)
	t := hbar * hbar / (2 * me * g.h * g.h) / qe // eV
	m := hi - lo + 1
	if m < 2 {
		return
	}
	tri := tridiag{d: make([]float64, m), e: make([]float64, m-1)}
	for j := lo; j <= hi; j++ {
		tri.d[j-lo] = t*(vg.mInv[j-1]+vg.mInv[j]) + vg.v0[j] - phi[j]
		if j < hi {
			tri.e[j-lo] = -t * vg.mInv[j]
		}
	}
	var hv []float64
	spread := -1.0
	if hint != nil {
		hv, spread = hint.e[v], hint.spread
	}
	vals, vecs := tri.lowest(cut, g.maxSub, hv, spread)
	sq := 1 / math.Sqrt(g.h)
	for i, vec := range vecs {
		psi := make([]float64, n+1)
		mm := 0.0
		for j := lo; j <= hi; j++ {
			psi[j] = vec[j-lo] * sq
			mm += vec[j-lo] * vec[j-lo] * vg.md[j]
		}
		peak := 0.0
		for j := lo; j <= hi; j++ {
			peak = math.Max(peak, psi[j]*psi[j])
		}
		a, b := lo, hi
		for a < hi && psi[a]*psi[a] < 1e-14*peak {
			a++
		}
		for b > lo && psi[b]*psi[b] < 1e-14*peak {
			b--
		}
		st.e = append(st.e, vals[i])
		st.valley = append(st.valley, v)
		st.lo = append(st.lo, a)
		st.hi = append(st.hi, b)
		st.psi = append(st.psi, psi)
		st.m = append(st.m, mm)
		st.dos = append(st.dos, float64(vg.gv)*mm*me/(math.Pi*hbar*hbar)*qe)
	}
}

// f0 is ln(1 + eˣ), the 2D Fermi–Dirac integral of order 0.
func f0(x float64) float64 {
	if x > 0 {
		return x + math.Log1p(math.Exp(-x))
	}
	return math.Log1p(math.Exp(x))
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
			if math.IsInf(g.eb[j], 1) {
				ndp = g.nd[j] // ionised: the electrons are in the well's subbands
			} else {
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
		}
		q[j] = ndp - g.na[j] - nj
		dq[j] = dnd - dn
		if nel != nil {
			nel[j] = nj
		}
	}
}

// bulkCharge is the charge beyond the end of the grid for BottomBulk, in e per m² (negative:
// ionised acceptors of the depletion layer), and its derivative with respect to φ at the
// last node.
func (g *grid) bulkCharge(phiN float64) (c, dc float64) {
	const floor = 1e-4 // V: below it the depletion layer is taken as linear (regularisation)
	dv := g.ecBulk - (g.v0[g.n] - phiN)
	k := math.Sqrt(2 * g.epsBulk / (qe * g.naBulk)) // W = k √ΔV
	if dv < floor {
		slope := g.naBulk * k / (2 * math.Sqrt(floor))
		return -g.naBulk*k*math.Sqrt(floor) - slope*(dv-floor), -slope
	}
	w := k * math.Sqrt(dv)
	return -g.naBulk * w, -g.naBulk * w / (2 * dv)
}

// residual fills r[j] for the unknown nodes j = 1..unknowns() (r[0] unused), in m^-2:
// [ε_{j+½}(φ_{j+1} − φ_j) − ε_{j−½}(φ_j − φ_{j−1})]/(h e) + w_j q_j, with at the last node
// zero field (BottomZeroField) or the depletion charge of the bulk (BottomBulk).
func (g *grid) residual(phi, q, r []float64) float64 {
	n := g.n
	s := 0.0
	for j := 1; j <= g.unknowns(); j++ {
		flux := -g.eps[j-1] * (phi[j] - phi[j-1])
		if j < n {
			flux += g.eps[j] * (phi[j+1] - phi[j])
		}
		r[j] = flux/(g.h*qe) + g.w[j]*q[j]
		if j == n && g.bottom == BottomBulk {
			c, _ := g.bulkCharge(phi[n])
			r[j] += c
		}
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

// poisson solves the nonlinear Poisson equation for φ (in place; φ[0], and φ[n] with a
// pinned bottom, are Dirichlet values) by Newton's method with backtracking on the residual
// norm.
func (g *grid) poisson(phi, phiRef []float64, st *states, wk *work) error {
	n := g.n
	nu := g.unknowns()
	impl := gonum.Implementation{}
	g.charge(phi, phiRef, st, wk.q, wk.dq, nil)
	norm := g.residual(phi, wk.q, wk.r)
	for it := 0; it < 200; it++ {
		// (−J) δ = R, −J symmetric positive definite tridiagonal.
		for j := 1; j <= nu; j++ {
			a := g.eps[j-1] / (g.h * qe)
			if j < n {
				a += g.eps[j] / (g.h * qe)
			}
			if j < nu {
				wk.e[j-1] = -g.eps[j] / (g.h * qe)
			}
			wk.d[j-1] = a - g.w[j]*wk.dq[j]
			if j == n && g.bottom == BottomBulk {
				_, dc := g.bulkCharge(phi[n])
				wk.d[j-1] -= dc
			}
			wk.b[j-1] = wk.r[j]
		}
		if !impl.Dptsv(nu, 1, wk.d[:nu], wk.e[:nu-1], wk.b[:nu], 1) {
			return errors.New("band: Poisson Jacobian is not positive definite")
		}
		step := 0.0
		for j := 0; j < nu; j++ {
			step = math.Max(step, math.Abs(wk.b[j]))
		}
		scale := 1.0
		if step > 0.5 {
			scale = 0.5 / step // never move more than 0.5 V in one Newton step
		}
		accepted := false
		for ls := 0; ls < 40; ls++ {
			copy(wk.trial, phi)
			for j := 1; j <= nu; j++ {
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

// Solve finds the self-consistent conduction-band profile and subbands of a stack, in
// every valley (Γ, X_z, X_xy, L; see [Valley]).
//
// The surface node holds E_c = Surface barrier (pinned surface) or Schottky barrier − e·GateV
// (gate); the bottom follows Stack.Bottom (by default a semi-insulating substrate with E_F
// pinned DefaultSubstratePinEV below the conduction band). Wavefunctions vanish at both ends
// of the grid. Donors inside doping wells are taken as ionised, their electrons in the well's
// own subbands. The loop stops when max|Δφ| < TolV and the relative change of n2D < TolN.
// When the iteration cap is reached Solve returns the last iterate together with a
// *ConvergenceError (wrapping [ErrNotConverged]). Invalid stacks give the errors of
// [Stack.Validate].
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
		if g.bottom == BottomPinned {
			phi[j] = g.phi0 + (g.phiN-g.phi0)*float64(j)/float64(n)
		}
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
	var hint *hints
	for it = 1; ; it++ {
		st := g.schrodinger(phi, hint)
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
		hint = hintsOf(st, dphi)
		if dphi < o.TolV && rel < o.TolN {
			break
		}
		if it >= o.MaxIter {
			cerr = &ConvergenceError{Iterations: it, MaxDeltaV: dphi, RelDeltaN: rel}
			break
		}
	}
	res := g.result(phi, it, o, hint)
	if cerr != nil {
		return res, cerr
	}
	return res, nil
}

func hintsOf(st *states, spread float64) *hints {
	h := &hints{spread: spread}
	for i, e := range st.e {
		h.e[st.valley[i]] = append(h.e[st.valley[i]], e)
	}
	return h
}

// result evaluates the corrector (plain) electron density on the final potential, and
// sorts the electrons into regions.
func (g *grid) result(phi []float64, it int, o Options, hint *hints) *Solution {
	n := g.n
	st := g.schrodinger(phi, hint)
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
	for v := range g.val {
		res.Edges[v] = make([]float64, n+1)
	}
	for j := 0; j <= n; j++ {
		res.Z[j] = float64(j) * g.h
		res.Ec[j] = g.v0[j] - phi[j]
		for v := range g.val {
			res.Edges[v][j] = g.val[v].v0[j] - phi[j]
		}
		res.TotalN2D += nel[j] * g.w[j]
	}
	for j := 1; j <= g.unknowns(); j++ {
		res.NeutralityError += r[j]
	}
	res.SurfaceChargeM2 = -g.eps[0]*(phi[1]-phi[0])/(g.h*qe) - g.w[0]*q[0]
	switch g.bottom {
	case BottomPinned:
		res.BottomChargeM2 = g.eps[n-1]*(phi[n]-phi[n-1])/(g.h*qe) - g.w[n]*q[n]
	case BottomBulk:
		res.BottomChargeM2, _ = g.bulkCharge(phi[n])
	}
	res.Regions = append([]Region(nil), g.regions...)
	for i, e := range st.e {
		v := st.valley[i]
		sb := Subband{Valley: g.val[v].name, Gv: g.val[v].gv, E: e, Mstar: st.m[i], Psi: st.psi[i]}
		sb.N2D = st.dos[i] * g.kT * f0(-e/g.kT)
		peak, jp := 0.0, 0
		for j := range st.psi[i] {
			p2 := st.psi[i][j] * st.psi[i][j]
			sb.MeanZ += p2 * res.Z[j] * g.h
			if p2 > peak {
				peak, jp = p2, j
			}
		}
		k := regionAt(res.Regions, res.Z[jp])
		if w := claddedWell(res.Regions, k, res.Z[jp]); w >= 0 {
			k = w
		}
		if res.Regions[k].Kind == RegionChannel && !nearInterface(res.Regions, k, res.Z, sb.Psi, g.h) {
			k = deepRegion(res, k)
		}
		sb.Region = k
		res.Subbands = append(res.Subbands, sb)
	}
	sortSubbands(res)
	for i, sb := range res.Subbands {
		rg := &res.Regions[sb.Region]
		rg.Subbands = append(rg.Subbands, i)
		rg.N2D += sb.N2D
		for v := range valleyNames {
			if valleyNames[v] == sb.Valley {
				rg.ValleyN2D[v] += sb.N2D
			}
		}
	}
	for _, rg := range res.Regions {
		if rg.Kind == RegionChannel {
			res.ChannelN2D += rg.N2D
		}
	}
	// Electrons on neutral shallow donors above the Mott density conduct.
	for j := 0; j <= n; j++ {
		if g.nd[j] == 0 || math.IsInf(g.eb[j], 1) {
			continue
		}
		neutral := g.nd[j] - (q[j] + g.na[j] + nel[j]) // N_D − N_D⁺
		if neutral > g.mott[j] {
			res.Regions[regionAt(res.Regions, res.Z[j])].BoundN2D += neutral * g.w[j]
		}
	}
	res.Density2D = wells(res.Z, nel, g.w)
	res.Warnings = regionWarnings(res.Regions)
	return res
}

// deepRegion returns the region for states deep in channel region k, away from its
// interfaces: a parasitic well, added on first use.
func deepRegion(res *Solution, k int) int {
	c := res.Regions[k]
	inner := strings.TrimSuffix(strings.TrimPrefix(c.Name, c.Kind.String()+" ("), ")")
	name := RegionWell.String() + " (deep in " + inner + ")"
	for i, r := range res.Regions {
		if r.Kind == RegionWell && r.Name == name {
			return i
		}
	}
	start, end := c.StartM, c.EndM
	if k > 0 {
		start += interfaceReachM
	}
	if k+1 < len(res.Regions) {
		end -= interfaceReachM
	}
	res.Regions = append(res.Regions, Region{Kind: RegionWell, Name: name, FirstLayer: c.FirstLayer, LastLayer: c.LastLayer,
		StartM: start, EndM: max(start, end), EcEV: c.EcEV})
	return len(res.Regions) - 1
}

// sortSubbands orders the subbands of all valleys by energy (stable: Γ before X before L at
// equal energy).
func sortSubbands(res *Solution) {
	s := res.Subbands
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j].E < s[j-1].E; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}

// parasiticMinM2 is the smallest number of electrons outside the channel worth a warning:
// 1e8 cm^-2, well below what a Hall or SdH measurement of a 2DEG resolves (common practice).
const parasiticMinM2 = 1e12

// regionWarnings names the electrons outside the intended channel.
func regionWarnings(rs []Region) []string {
	var out []string
	channel := false
	for _, r := range rs {
		if r.Kind == RegionChannel {
			channel = true
		}
		if r.BoundN2D >= parasiticMinM2 {
			where := "the doping layer"
			if r.Kind == RegionCap {
				where = "the cap"
			}
			out = append(out, fmt.Sprintf("parallel conduction in %s: %.3g cm^-2 electrons on un-ionised donors above the Mott density in %s at %.1f–%.1f nm",
				where, r.BoundN2D*1e-4, r.Name, r.StartM*1e9, r.EndM*1e9))
		}
		if r.N2D < parasiticMinM2 {
			continue
		}
		where := fmt.Sprintf("%.1f–%.1f nm", r.StartM*1e9, r.EndM*1e9)
		var what string
		switch r.Kind {
		case RegionWell:
			what = "a parasitic channel"
		case RegionBarrier:
			what = "a parasitic channel in a barrier"
		case RegionDopingLayer:
			what = "parallel conduction in the doping layer"
		case RegionCap:
			what = "electrons in the cap"
		default:
			continue
		}
		out = append(out, fmt.Sprintf("%s: %.3g cm^-2 electrons in %s at %s%s", what, r.N2D*1e-4, r.Name, where, valleyNote(r)))
	}
	if !channel {
		out = append(out, "no channel: the stack has no undoped well to hold a 2D electron gas (name the channel layer \"channel\" to choose one)")
	}
	return out
}

// valleyNote says which valleys hold a region's electrons when it is not Γ alone.
func valleyNote(r Region) string {
	if r.N2D == 0 || r.ValleyN2D[0] >= 0.999*r.N2D {
		return ""
	}
	s := " ("
	first := true
	for v, x := range r.ValleyN2D {
		if x < 1e-3*r.N2D {
			continue
		}
		if !first {
			s += ", "
		}
		first = false
		s += fmt.Sprintf("%s %.0f %%", valleyNames[v], 100*x/r.N2D)
	}
	return s + ")"
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
