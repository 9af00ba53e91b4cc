package band

import (
	"errors"
	"fmt"
	"math"
)

// FangHoward returns the Fang–Howard variational ground subband of a heterojunction with an
// infinite barrier: the trial function ψ = √(b³/2) z e^{−bz/2}, with
//
//	b³ = 12 m* e² (N_depl + 11n/32) / (ε ħ²)
//	E0 = ħ²b²/(8m*) + 3e²N_depl/(εb) + 33e²n/(16εb)
//
// mstar is m*/m_e, epsR the channel permittivity, n and nDepl in m^-2. E0 is returned in eV
// above the conduction-band edge at the interface, b in m^-1; ⟨z⟩ = 3/b. It is an upper bound
// of the Hartree ground state. Fang & Howard, Phys. Rev. Lett. 16, 797 (1966); Ando, Fowler &
// Stern, Rev. Mod. Phys. 54, 437 (1982).
func FangHoward(mstar, epsR, n, nDepl float64) (e0EV, b float64) {
	m := mstar * me
	eps := epsR * eps0
	b = math.Cbrt(12 * m * qe * qe * (nDepl + 11*n/32) / (eps * hbar * hbar))
	if b == 0 {
		return 0, 0
	}
	e0 := hbar*hbar*b*b/(8*m) + 3*qe*qe*nDepl/(eps*b) + 33*qe*qe*n/(16*eps*b)
	return e0 / qe, b
}

// AnalyticInput describes a modulation-doped single heterojunction for [Analytic].
type AnalyticInput struct {
	DeltaEcEV    float64 // conduction-band offset barrier/channel, eV
	DonorDepthEV float64 // E_D': depth below the barrier conduction band of the level that pins E_F in the doped barrier, eV
	BarrierEpsR  float64 // relative permittivity of the barrier
	SpacerM      float64 // undoped spacer thickness between the doping and the channel, m
	// BulkDonorsM3 is a uniform donor density beyond the spacer (m^-3); zero means a delta
	// layer at the end of the spacer with enough donors to pin E_F.
	BulkDonorsM3 float64
	ChannelMstar float64 // m*/m_e in the channel
	ChannelEpsR  float64 // relative permittivity of the channel
	// DeplM2 is the depletion charge on the channel side, m^-2: background acceptors, or
	// the field of a pinned substrate.
	DeplM2 float64
	// NoGroundState drops E0 from the energy balance, NoFermiEnergy drops E_F; both false
	// gives the full estimate.
	NoGroundState, NoFermiEnergy bool

	// Surface, when true, adds the pinned surface (or gate) above the donors: E_c sits
	// SurfaceBarrierEV above E_F at the surface, and the surface states take the electrons
	// the donors give beyond those of the channel and the depletion charge (see [Analytic]).
	Surface          bool
	SurfaceBarrierEV float64
	// SurfaceOffsetEV is the conduction edge of the surface layer above the channel's
	// (the band offsets met on the way from the surface to the channel add up to it): 0 for a
	// GaAs cap over a GaAs channel, ΔE_c when the barrier reaches the surface.
	SurfaceOffsetEV float64
	// DonorsM2 is every donor between the surface and the channel per area (m^-2).
	DonorsM2 float64
	// DepthOverEps is ∫dz/ε from the surface to the channel interface (m²/F), and
	// DonorMomentOverEps is ∫Q(z)/ε dz over the same range with Q(z) the donors per area
	// between the surface and z (1/F).
	DepthOverEps, DonorMomentOverEps float64
}

// AnalyticResult is the estimate of [Analytic].
type AnalyticResult struct {
	N2D  float64 // m^-2
	E0EV float64 // Fang–Howard ground subband above the interface band edge, eV
	EFEV float64 // Fermi energy above E0, eV
	B    float64 // Fang–Howard parameter, m^-1 (⟨z⟩ = 3/b)
	// SurfaceLimited is true when the surface, not the donor level, sets n: every donor is
	// ionised and the surface states hold SurfaceN2D electrons (m^-2).
	SurfaceLimited bool
	SurfaceN2D     float64
	// PinnedN2D is the density the donor level alone allows (the estimate without the
	// surface), m^-2.
	PinnedN2D float64
}

// Analytic estimates the 2DEG density of a modulation-doped heterojunction in the depletion
// approximation at T = 0 with one subband (Stern, Appl. Phys. Lett. 43, 974 (1983);
// Delagebeaudeuf & Linh, IEEE Trans. Electron Devices 29, 955 (1982)). With the donor level
// pinning E_F in the doped barrier the energy balance across the spacer is
//
//	ΔE_c − E_D' = (e/ε_b)((n + N_depl) d + (n + N_depl)²/(2N_D)) + E0(n) + E_F(n),
//
// with the (n + N_depl)²/(2N_D) term (depletion of the doped layer) absent for a delta layer,
// E_F = πħ²n/m* and E0 from [FangHoward]; it is solved for n by bisection (the right side
// grows with n). A non-positive ΔE_c − E_D' gives n = 0.
//
// With Surface set, the surface may take so many electrons that every donor is ionised and
// the donor level no longer pins E_F. Gauss's law from the surface (E_c = Φ_B, surface
// charge −e(N − n − N_depl)) to the channel interface then gives
//
//	e n A + E0(n) + E_F(n) = ΔE_s − Φ_B + e(N − N_depl)A − eB,
//
// with ΔE_s the conduction edge of the surface layer above the channel's (the band offsets
// met on the way), N the donors above the channel, A = ∫dz/ε and B = ∫Q(z)/ε dz from the
// surface to the interface (Q(z) the donors above z). The estimate is the smaller of the two densities (the
// donor level can only hold E_F while the donors are not all ionised), and n ≥ 0. Parallel
// conduction and DX centres beyond E_D' are not modelled: the result is an estimate, not a
// check of a wafer.
func Analytic(in AnalyticInput) (AnalyticResult, error) {
	switch {
	case !(in.BarrierEpsR > 0), !(in.ChannelEpsR > 0), !(in.ChannelMstar > 0):
		return AnalyticResult{}, errors.New("band: analytic estimate needs positive permittivities and mass")
	case !(in.SpacerM >= 0), !(in.BulkDonorsM3 >= 0), !(in.DeplM2 >= 0):
		return AnalyticResult{}, errors.New("band: analytic estimate needs spacer, donor and depletion densities ≥ 0")
	case math.IsNaN(in.DeltaEcEV) || math.IsNaN(in.DonorDepthEV):
		return AnalyticResult{}, errors.New("band: analytic estimate: band offset or donor depth is NaN")
	case in.Surface && (!(in.DonorsM2 >= 0) || !(in.DepthOverEps > 0) || !(in.DonorMomentOverEps >= 0) || math.IsNaN(in.SurfaceBarrierEV)):
		return AnalyticResult{}, errors.New("band: analytic estimate with a surface needs donors ≥ 0, a positive depth and a finite barrier")
	}
	epsb := in.BarrierEpsR * eps0
	fermiPerN := math.Pi * hbar * hbar / (in.ChannelMstar * me) / qe // eV m²
	sub := func(n float64) (e0, ef, b float64) {
		if !in.NoFermiEnergy {
			ef = fermiPerN * n
		}
		if !in.NoGroundState {
			e0, b = FangHoward(in.ChannelMstar, in.ChannelEpsR, n, in.DeplM2)
			if n == 0 && in.DeplM2 == 0 {
				e0 = 0
			}
		}
		return e0, ef, b
	}
	// pinned: the donor level holds E_F in the doped layer.
	pinned := func(n float64) float64 {
		q := n + in.DeplM2
		v := qe / epsb * q * in.SpacerM
		if in.BulkDonorsM3 > 0 {
			v += qe / epsb * q * q / (2 * in.BulkDonorsM3)
		}
		e0, ef, _ := sub(n)
		return v + ef + e0 - (in.DeltaEcEV - in.DonorDepthEV)
	}
	// surface: every donor ionised, the rest of their electrons on the surface.
	surface := func(n float64) float64 {
		e0, ef, _ := sub(n)
		rhs := in.SurfaceOffsetEV - in.SurfaceBarrierEV + qe*(in.DonorsM2-in.DeplM2)*in.DepthOverEps - qe*in.DonorMomentOverEps
		return qe*n*in.DepthOverEps + e0 + ef - rhs
	}
	nPin, err := root(pinned)
	if err != nil {
		return AnalyticResult{}, fmt.Errorf("%w (ΔE_c − E_D' = %g eV)", err, in.DeltaEcEV-in.DonorDepthEV)
	}
	res := AnalyticResult{N2D: nPin, PinnedN2D: nPin}
	if in.Surface {
		nSurf, err := root(surface)
		if err != nil {
			return AnalyticResult{}, err
		}
		if nSurf < nPin {
			res.N2D = nSurf
			res.SurfaceLimited = true
		}
		res.SurfaceN2D = math.Max(0, in.DonorsM2-res.N2D-in.DeplM2)
	}
	res.E0EV, res.EFEV, res.B = sub(res.N2D)
	if res.N2D == 0 {
		res.E0EV, res.EFEV, res.B = 0, 0, 0
	}
	return res, nil
}

// root finds the zero of an increasing balance g(n) for n ≥ 0 by bisection; g(0) ≥ 0 gives 0.
func root(g func(n float64) float64) (float64, error) {
	if g(0) >= 0 {
		return 0, nil
	}
	lo, hi := 0.0, 1e14
	for g(hi) <= 0 {
		hi *= 2
		if hi > 1e20 {
			return 0, errors.New("band: analytic estimate has no solution below 1e16 cm^-2")
		}
	}
	for i := 0; i < 200 && hi-lo > 1e-13*hi; i++ {
		mid := 0.5 * (lo + hi)
		if g(mid) > 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	return 0.5 * (lo + hi), nil
}

// ErrNotApplicable is wrapped by [AnalyticInputFor] for a stack that is not a single
// modulation-doped heterojunction (a quantum well, doping wells, several channels): the
// analytic estimate does not describe it.
var ErrNotApplicable = errors.New("the analytic heterojunction estimate does not apply")

// AnalyticInputFor reads the inputs of [Analytic] off a layer stack that is a single
// modulation-doped heterojunction: the channel region of [Solve]'s classification must be the
// last group of layers (no barrier below it: otherwise it is a quantum well), the only
// channel, with no doping wells and no donors below it; otherwise the error wraps
// [ErrNotApplicable] and says why.
//
// The spacer is the undoped thickness between the channel and the nearest donor layer above
// (plus half that layer's thickness for a sheet, which [Solve] puts at the layer's centre);
// ΔE_c is the step between the lowest edges of the channel and the layer just above it; the
// barrier permittivity is that of the spacer (or of the doped layer when there is no
// spacer). DeplM2 is the depletion charge below the channel: its acceptors (taken as
// depleted), plus for a pinned substrate ε·PinEV/(e·d) over the distance d to the substrate,
// or for a p-type bulk √(2εN_A·ΔV/e) with ΔV the rise to the bulk band position. The surface
// (pinned, or a gate) is always included. donorDepthEV > 0 sets E_D', otherwise the doped
// layer's hydrogenic donor level is used. Errors wrap [ErrNoWell], [ErrNoDoping] or
// [ErrNotApplicable], or are those of [Stack.Validate].
func AnalyticInputFor(s Stack, donorDepthEV float64) (AnalyticInput, error) {
	ps, err := s.params()
	if err != nil {
		return AnalyticInput{}, err
	}
	donor := func(i int) bool {
		return i < len(s.Layers) && hasDonors(s.Layers[i])
	}
	anyDonor := false
	for i := range s.Layers {
		anyDonor = anyDonor || donor(i)
	}
	if !anyDonor {
		return AnalyticInput{}, fmt.Errorf("%w: no donor layer above a heterojunction", ErrNoDoping)
	}
	total := 0.0
	for _, l := range s.Layers {
		total += l.ThicknessM
	}
	rs := regionsOf(s, ps, total)
	ch := -1
	for k, r := range rs {
		switch r.Kind {
		case RegionChannel:
			if ch >= 0 {
				return AnalyticInput{}, fmt.Errorf("%w: the stack has more than one channel", ErrNotApplicable)
			}
			ch = k
		case RegionDopingWell:
			return AnalyticInput{}, fmt.Errorf("%w: the donors sit in doping wells (%s)", ErrNotApplicable, r.Name)
		}
	}
	if ch < 0 {
		return AnalyticInput{}, fmt.Errorf("%w: no heterojunction below the donors", ErrNoWell)
	}
	if ch != len(rs)-1 {
		return AnalyticInput{}, fmt.Errorf("%w: the channel (%s) has a barrier below it: a quantum well, not a single heterojunction", ErrNotApplicable, rs[ch].Name)
	}
	channel := rs[ch].FirstLayer - 1
	for i := channel; i < len(s.Layers); i++ {
		if donor(i) {
			return AnalyticInput{}, fmt.Errorf("%w: donors in or below the channel (layer %d)", ErrNotApplicable, i+1)
		}
	}
	above := prevThick(s, channel)
	if above < 0 {
		return AnalyticInput{}, fmt.Errorf("%w: no barrier above the channel", ErrNoWell)
	}
	in := AnalyticInput{
		DeltaEcEV:    ps[above].EcEV - ps[channel].EcEV,
		ChannelMstar: ps[channel].Mstar,
		ChannelEpsR:  ps[channel].EpsR,
		BarrierEpsR:  ps[above].EpsR,
	}
	k := channel - 1
	for ; k >= 0 && !donor(k); k-- {
		in.SpacerM += s.Layers[k].ThicknessM
	}
	if k < 0 {
		return AnalyticInput{}, fmt.Errorf("%w: no donor layer above the channel", ErrNoDoping)
	}
	d := s.Layers[k].Doping
	if d.Sheet {
		in.SpacerM += s.Layers[k].ThicknessM / 2
	} else {
		in.BulkDonorsM3 = d.Density
	}
	if k == channel-1 {
		in.BarrierEpsR = ps[k].EpsR
	}
	in.DonorDepthEV = ps[k].DonorEV
	if donorDepthEV > 0 {
		in.DonorDepthEV = donorDepthEV
	}
	// Depletion charge below the channel.
	epsCh := ps[channel].EpsR * eps0
	bufM, accM2 := 0.0, 0.0
	for i := channel; i < len(s.Layers); i++ {
		bufM += s.Layers[i].ThicknessM
		if a := s.Layers[i].Doping; a.Acceptor() {
			if a.Sheet {
				accM2 += a.Density
			} else {
				accM2 += a.Density * s.Layers[i].ThicknessM
			}
		} else if a.Density == 0 {
			accM2 += s.Bottom.background() * s.Layers[i].ThicknessM
		}
	}
	switch s.Bottom.Kind {
	case BottomZeroField:
		in.DeplM2 = accM2
	case BottomPinned:
		// field of the pinned substrate over an undoped buffer, plus its depleted acceptors
		// weighted by their position (half of a uniform background).
		in.DeplM2 = epsCh*s.Bottom.pin()/(qe*bufM) + accM2/2
	case BottomBulk:
		sub := ps[len(s.Layers)]
		dv := sub.EcEV - (sub.VBOEV + acceptorEV)
		na := s.Bottom.background()
		if bufM > 0 && accM2/bufM > na {
			na = accM2 / bufM
		}
		in.DeplM2 = math.Sqrt(2 * epsCh * na * dv / qe)
	}
	// Surface: donors above the channel and the integrals A = ∫dz/ε, B = ∫Q/ε.
	in.Surface = true
	in.SurfaceBarrierEV = s.Surface.barrier()
	if top := nextThick(s, -1); top >= 0 && top < len(s.Layers) {
		in.SurfaceOffsetEV = ps[top].EcEV - ps[channel].EcEV
	}
	q := 0.0
	for i := 0; i < channel; i++ {
		l := s.Layers[i]
		eps := ps[i].EpsR * eps0
		t := l.ThicknessM
		in.DepthOverEps += t / eps
		if !donor(i) {
			in.DonorMomentOverEps += q * t / eps
			continue
		}
		if l.Doping.Sheet { // the sheet sits at the layer's centre
			in.DonorMomentOverEps += q*t/eps + l.Doping.Density*t/2/eps
			q += l.Doping.Density
			in.DonorsM2 += l.Doping.Density
			continue
		}
		nd := l.Doping.Density
		in.DonorMomentOverEps += (q*t + nd*t*t/2) / eps
		q += nd * t
		in.DonorsM2 += nd * t
	}
	return in, nil
}
