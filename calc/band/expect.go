package band

import (
	"errors"
	"fmt"
	"math"
)

// Expectation is what a wafer's layer stack leads one to expect in the two states a
// cooldown measures, and the analytic estimate where it applies.
type Expectation struct {
	// Dark is the solution for the wafer cooled in the dark: Si in Al-rich AlGaAs at the DX
	// level (DonorsDark), or every donor at Options.DonorDepthEV when that is given.
	Dark *Solution
	// Illuminated is the solution with shallow donors: after illumination at low
	// temperature the DX centres stay empty (persistent photoconductivity). It is the same
	// *Solution as Dark when no layer has DX donors and no donor depth was given.
	Illuminated *Solution
	// Analytic is the heterojunction estimate for the dark state (the surface included);
	// AnalyticNote is empty when it applies and otherwise says why it does not (a quantum
	// well, doping wells, several channels).
	Analytic     AnalyticResult
	AnalyticNote string
	// Warnings are the dark solution's (electrons outside the channel), a note when two
	// channel subbands are occupied, and the illuminated solution's warnings that the dark
	// one does not have.
	Warnings []string
}

// ChannelSubbands returns the indices into r.Subbands of the channel's subbands, lowest
// first.
func (r *Solution) ChannelSubbands() []int {
	var out []int
	for i, s := range r.Subbands {
		if r.Regions[s.Region].Kind == RegionChannel {
			out = append(out, i)
		}
	}
	return out
}

// Occupied returns the channel subbands below the Fermi level (thermal tails above it do not
// count).
func (r *Solution) Occupied() []int {
	var out []int
	for _, i := range r.ChannelSubbands() {
		if r.Subbands[i].E < 0 {
			out = append(out, i)
		}
	}
	return out
}

// SdHFrequency is the Shubnikov–de Haas frequency of a subband's electrons, f = h n/(2 e
// Gv) in tesla (spin-degenerate Landau levels of Gv valleys each hold 2 Gv eB/h).
func (s Subband) SdHFrequency() float64 { return hPl * s.N2D / (2 * float64(s.Gv) * qe) }

// Expect solves a stack for the dark and the illuminated state and adds the analytic
// estimate. Options.Donors is ignored (both models are solved); Options.DonorDepthEV, when
// given, sets the dark state's donor level. A second solve is made only when it can differ
// from the first.
func Expect(s Stack, o Options) (*Expectation, error) {
	ps, err := s.params()
	if err != nil {
		return nil, err
	}
	dx := false
	for i, l := range s.Layers {
		if hasDonors(l) && dxLayer(ps[i]) {
			dx = true
		}
	}
	od, oi := o, o
	od.Donors, oi.Donors = DonorsDark, DonorsShallow
	oi.DonorDepthEV = 0
	ex := &Expectation{}
	if ex.Dark, err = Solve(s, od); err != nil {
		return nil, err
	}
	if dx || o.DonorDepthEV > 0 {
		if ex.Illuminated, err = Solve(s, oi); err != nil {
			return nil, err
		}
	} else {
		ex.Illuminated = ex.Dark
	}
	ex.Warnings = append(ex.Warnings, ex.Dark.Warnings...)
	if ex.Illuminated != ex.Dark {
		seen := map[string]bool{}
		for _, w := range ex.Dark.Warnings {
			seen[w] = true
		}
		for _, w := range ex.Illuminated.Warnings {
			if !seen[w] {
				ex.Warnings = append(ex.Warnings, "after illumination: "+w)
			}
		}
	}
	if occ := ex.Dark.Occupied(); len(occ) >= 2 {
		ex.Warnings = append(ex.Warnings, twoSubbands(ex.Dark, occ))
	}
	// The analytic estimate, with the donor level of the dark state.
	depth := o.DonorDepthEV
	in, err := AnalyticInputFor(s, depth)
	switch {
	case errors.Is(err, ErrNotApplicable), errors.Is(err, ErrNoWell), errors.Is(err, ErrNoDoping):
		ex.AnalyticNote = err.Error()
	case err != nil:
		return nil, err
	default:
		if depth == 0 && dxNearest(s, ps) {
			in.DonorDepthEV = od.withDefaults().DXDepthEV
		}
		if ex.Analytic, err = Analytic(in); err != nil {
			ex.AnalyticNote = err.Error()
		}
	}
	return ex, nil
}

// dxNearest reports whether the donor layer nearest above the channel of a single
// heterojunction holds DX donors.
func dxNearest(s Stack, ps []Params) bool {
	for i := len(s.Layers) - 1; i >= 0; i-- {
		if hasDonors(s.Layers[i]) {
			return dxLayer(ps[i])
		}
	}
	return false
}

// twoSubbands words the note for a channel with several occupied subbands.
func twoSubbands(r *Solution, occ []int) string {
	msg := fmt.Sprintf("%d subbands occupied in the channel (", len(occ))
	for k, i := range occ {
		if k > 0 {
			msg += ", "
		}
		msg += fmt.Sprintf("%.3g cm^-2", r.Subbands[i].N2D*1e-4)
	}
	msg += "): the SdH spectrum shows one frequency per subband ("
	for k, i := range occ {
		if k > 0 {
			msg += ", "
		}
		msg += fmt.Sprintf("%.3g T", r.Subbands[i].SdHFrequency())
	}
	return msg + fmt.Sprintf("), subband separation %.3g meV", math.Abs(r.Subbands[occ[1]].E-r.Subbands[occ[0]].E)*1e3)
}
