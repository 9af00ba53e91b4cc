package transport

import (
	"fmt"
	"math"

	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// VdPHallResult is the density from a van der Pauw Hall measurement.
type VdPHallResult struct {
	Density  Estimate // n = B/(e|ΔR|), m^-2
	DeltaR   Estimate // the Hall change of R_13,24 per field B, Ohm
	Carriers string   // "electrons" when ΔR/B < 0, "holes" when > 0 (the convention of [src:IHN2010])
}

// VdPHallDensity returns n = B/(e |R_13,24(B) − R_13,24(0)|) (van der Pauw,
// Philips Res. Rep. 13, 1 (1958) [src:VDP1958]) with current through
// contacts 1→3 and voltage across 2–4, from the resistance at field B (T)
// and at zero field (Ohm, each with its standard uncertainty). The
// uncertainties of the two readings are combined in quadrature.
func VdPHallDensity(B float64, rB, r0 Estimate) (VdPHallResult, error) {
	return vdpHall(B, Estimate{rB.Value - r0.Value, math.Hypot(rB.Uncertainty, r0.Uncertainty)})
}

// VdPHallDensityPolarity returns n = 2B/(e |R_13,24(+B) − R_13,24(−B)|) from
// readings at both field polarities (B > 0 is the magnitude, T), which
// cancels the zero-field offset of misplaced contacts [src:VDP1958].
func VdPHallDensityPolarity(B float64, rPlus, rMinus Estimate) (VdPHallResult, error) {
	return vdpHall(B, Estimate{(rPlus.Value - rMinus.Value) / 2, math.Hypot(rPlus.Uncertainty, rMinus.Uncertainty) / 2})
}

func vdpHall(B float64, d Estimate) (VdPHallResult, error) {
	if !(B > 0) || math.IsInf(B, 0) {
		return VdPHallResult{}, fmt.Errorf("van der Pauw Hall density: field %g T: expected > 0: %w", B, ErrBadArgument)
	}
	if d.Value == 0 || math.IsNaN(d.Value) || math.IsInf(d.Value, 0) {
		return VdPHallResult{}, fmt.Errorf("van der Pauw Hall density: the Hall change is %g Ohm: no density: %w", d.Value, ErrBadArgument)
	}
	n := B / (qe * math.Abs(d.Value))
	r := VdPHallResult{Density: Estimate{n, n * d.Uncertainty / math.Abs(d.Value)}, DeltaR: d, Carriers: "electrons"}
	if d.Value > 0 {
		r.Carriers = "holes"
	}
	return r, nil
}

// VdPSheetResult is the outcome of VdPSheet.
type VdPSheetResult struct {
	SheetResistance Estimate // R_s, Ohm per square
	Ratio           float64  // R_A/R_B
	Warnings        []Warning
}

// VdPSheet returns the sheet resistance of a van der Pauw sample from
// R_A = R_12,34 and R_B = R_23,41 (each already averaged over current
// reversal), solving exp(−πR_A/R_s) + exp(−πR_B/R_s) = 1 with
// physics.VdpSheetResistance, which also propagates the uncertainties.
// If the reciprocal readings R_34,12 and R_41,23 are given (non-zero), they
// are averaged in and compared with R_A and R_B.
//
// Warnings (common practice): R_A/R_B > 10 or < 1/10, and a reciprocity mismatch
// above 5 % (bad contacts or an inhomogeneous sample).
func VdPSheet(rA, rB, rArecip, rBrecip Estimate) (*VdPSheetResult, error) {
	res := &VdPSheetResult{}
	avg := func(name string, a, b Estimate) Estimate {
		if b.Value == 0 {
			return a
		}
		if m := math.Abs(a.Value - b.Value); m > 0.05*math.Abs(a.Value+b.Value)/2 {
			res.Warnings = append(res.Warnings, Warning{WarnReciprocity, fmt.Sprintf(
				"%s and its reciprocal differ by %.1f %% (tolerance 5 %%): bad contacts or an inhomogeneous sample?", name, 200*m/math.Abs(a.Value+b.Value))})
		}
		return Estimate{(a.Value + b.Value) / 2, math.Hypot(a.Uncertainty, b.Uncertainty) / 2}
	}
	a := avg("R_12,34", rA, rArecip)
	b := avg("R_23,41", rB, rBrecip)
	if !(a.Value > 0) || !(b.Value > 0) {
		return nil, fmt.Errorf("van der Pauw sheet resistance: R_A = %g Ohm, R_B = %g Ohm: both must be > 0: %w", a.Value, b.Value, ErrBadArgument)
	}
	qa := quantity.Uncertain(a.Value, a.Uncertainty, DimResistance)
	qb := quantity.Uncertain(b.Value, b.Uncertainty, DimResistance)
	rs, err := physics.VdpSheetResistance(qa, qb)
	if err != nil {
		return nil, fmt.Errorf("van der Pauw sheet resistance: %v: %w", err, ErrBadArgument)
	}
	res.SheetResistance = Estimate{rs.Value(), rs.Uncertainty()}
	res.Ratio = a.Value / b.Value
	if res.Ratio > 10 || res.Ratio < 0.1 {
		res.Warnings = append(res.Warnings, Warning{WarnVdPRatio, fmt.Sprintf(
			"R_A/R_B = %.3g is beyond 10:1: contacts far from the corners, an odd shape or an inhomogeneous sample", res.Ratio)})
	}
	return res, nil
}
