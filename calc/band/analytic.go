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
	DeplM2       float64 // depletion charge on the channel side, m^-2 (background acceptors)
	// NoGroundState drops E0 from the energy balance, NoFermiEnergy drops E_F; both false
	// gives the full estimate.
	NoGroundState, NoFermiEnergy bool
}

// AnalyticResult is the estimate of [Analytic].
type AnalyticResult struct {
	N2D  float64 // m^-2
	E0EV float64 // Fang–Howard ground subband above the interface band edge, eV
	EFEV float64 // Fermi energy above E0, eV
	B    float64 // Fang–Howard parameter, m^-1 (⟨z⟩ = 3/b)
}

// Analytic estimates the 2DEG density of a modulation-doped heterojunction in the depletion
// approximation at T = 0 with one subband (REFERENCE §3.3; Stern, Appl. Phys. Lett. 43, 974
// (1983); Delagebeaudeuf & Linh, IEEE Trans. Electron Devices 29, 955 (1982)). The energy
// balance across the barrier is
//
//	ΔE_c − E_D' = (e/ε_b)(n d + n²/(2N_D)) + E0(n) + E_F(n),
//
// with the n²/(2N_D) term (depletion of the doped layer) absent for a delta layer,
// E_F = πħ²n/m* and E0 from [FangHoward]; it is solved for n by bisection (the right side
// grows with n). A non-positive ΔE_c − E_D' gives n = 0. Surface depletion, DX centres and
// parallel conduction are ignored: the result is an estimate, not a check of a wafer.
func Analytic(in AnalyticInput) (AnalyticResult, error) {
	switch {
	case !(in.BarrierEpsR > 0), !(in.ChannelEpsR > 0), !(in.ChannelMstar > 0):
		return AnalyticResult{}, errors.New("band: analytic estimate needs positive permittivities and mass")
	case !(in.SpacerM >= 0), !(in.BulkDonorsM3 >= 0), !(in.DeplM2 >= 0):
		return AnalyticResult{}, errors.New("band: analytic estimate needs spacer, donor and depletion densities ≥ 0")
	case math.IsNaN(in.DeltaEcEV) || math.IsNaN(in.DonorDepthEV):
		return AnalyticResult{}, errors.New("band: analytic estimate: band offset or donor depth is NaN")
	}
	drive := in.DeltaEcEV - in.DonorDepthEV
	epsb := in.BarrierEpsR * eps0
	fermiPerN := math.Pi * hbar * hbar / (in.ChannelMstar * me) / qe // eV m²
	balance := func(n float64) (g, e0, ef, b float64) {
		v := qe / epsb * n * in.SpacerM
		if in.BulkDonorsM3 > 0 {
			v += qe / epsb * n * n / (2 * in.BulkDonorsM3)
		}
		if !in.NoFermiEnergy {
			ef = fermiPerN * n
		}
		if !in.NoGroundState {
			e0, b = FangHoward(in.ChannelMstar, in.ChannelEpsR, n, in.DeplM2)
			if n == 0 && in.DeplM2 == 0 {
				e0 = 0
			}
		}
		return v + ef + e0 - drive, e0, ef, b
	}
	if g0, _, _, _ := balance(0); g0 >= 0 {
		return AnalyticResult{}, nil
	}
	lo, hi := 0.0, 1e14
	for {
		if g, _, _, _ := balance(hi); g > 0 {
			break
		}
		hi *= 2
		if hi > 1e20 {
			return AnalyticResult{}, fmt.Errorf("band: analytic estimate has no solution below 1e16 cm^-2 (ΔE_c − E_D' = %g eV)", drive)
		}
	}
	for i := 0; i < 200 && hi-lo > 1e-13*hi; i++ {
		mid := 0.5 * (lo + hi)
		if g, _, _, _ := balance(mid); g > 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	n := 0.5 * (lo + hi)
	_, e0, ef, b := balance(n)
	return AnalyticResult{N2D: n, E0EV: e0, EFEV: ef, B: b}, nil
}

// AnalyticInputFor reads the inputs of [Analytic] off a layer stack: the channel is the first
// layer, from the surface down, whose conduction band lies below the layer above it with
// donors somewhere above it; the spacer is the undoped thickness between the channel and the
// nearest donor layer above (plus half that layer's thickness for a sheet, which [Solve] puts
// at the layer's centre); ΔE_c is the step between the channel and the layer just above it;
// the barrier permittivity is that of the spacer (or of the doped layer when there is no
// spacer); DeplM2 adds up the acceptors of the channel and the layers below it. donorDepthEV
// > 0 sets E_D', otherwise the doped layer's hydrogenic donor level is used. Errors wrap
// [ErrNoWell] or [ErrNoDoping], or are those of [Stack.Validate].
func AnalyticInputFor(s Stack, donorDepthEV float64) (AnalyticInput, error) {
	ps, err := s.params()
	if err != nil {
		return AnalyticInput{}, err
	}
	thick := func(i int) float64 {
		if i >= len(s.Layers) {
			return math.Inf(1)
		}
		return s.Layers[i].ThicknessM
	}
	donor := func(i int) bool {
		return i < len(s.Layers) && s.Layers[i].Doping.Donor() && s.Layers[i].Doping.Density > 0
	}
	channel := -1
	anyDonor := false
	for i := 0; i <= len(s.Layers); i++ {
		if thick(i) > 0 {
			j := prevThick(s, i)
			if j >= 0 && anyDonor && ps[i].EcEV < ps[j].EcEV-1e-9 {
				channel = i
				break
			}
		}
		if donor(i) {
			anyDonor = true
		}
	}
	if channel < 0 {
		if !anyDonor {
			return AnalyticInput{}, fmt.Errorf("%w: no donor layer above a heterojunction", ErrNoDoping)
		}
		return AnalyticInput{}, fmt.Errorf("%w: no heterojunction below the donors", ErrNoWell)
	}
	above := prevThick(s, channel)
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
	if k < 0 { // cannot happen: a donor layer lies above the channel
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
	for i := channel; i < len(s.Layers); i++ {
		if a := s.Layers[i].Doping; a.Acceptor() {
			if a.Sheet {
				in.DeplM2 += a.Density
			} else {
				in.DeplM2 += a.Density * s.Layers[i].ThicknessM
			}
		}
	}
	return in, nil
}
