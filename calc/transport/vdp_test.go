package transport

import (
	"errors"
	"math"
	"testing"
)

// TestVdPHall: n = 3e11 cm^-2 gives |ΔR_13,24| = B/(e n) = 2080.5 Ohm at 1 T
// ([src:VDP1958] and [src:W12]); both formulas must return the density, and the
// polarity form must cancel a zero-field offset.
func TestVdPHall(t *testing.T) {
	t.Parallel()
	const off = 37.0 // misplaced-contact offset, Ohm
	r, err := VdPHallDensity(1, Estimate{off - 2080.5, 0.5}, Estimate{off, 0.5})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Density.Value-3e15) > 1e-4*3e15 || r.Carriers != "electrons" {
		t.Errorf("one polarity: %v %s", r.Density, r.Carriers)
	}
	// σ_n/n = hypot(0.5, 0.5)/2080.5.
	if want := 3e15 * math.Sqrt2 * 0.5 / 2080.5; math.Abs(r.Density.Uncertainty-want) > 1e-3*want {
		t.Errorf("σ_n = %g, want %g", r.Density.Uncertainty, want)
	}
	r, err = VdPHallDensityPolarity(0.5, Estimate{off + 1040.25, 0.5}, Estimate{off - 1040.25, 0.5})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Density.Value-3e15) > 1e-4*3e15 || r.Carriers != "holes" {
		t.Errorf("two polarities: %v %s", r.Density, r.Carriers)
	}
	for _, c := range []struct {
		name   string
		B      float64
		rb, r0 float64
	}{{"zero field", 0, 1, 0}, {"no Hall change", 1, 5, 5}, {"NaN", 1, math.NaN(), 0}} {
		if _, err := VdPHallDensity(c.B, Estimate{c.rb, 0}, Estimate{c.r0, 0}); !errors.Is(err, ErrBadArgument) {
			t.Errorf("%s: %v", c.name, err)
		}
	}
}

// TestVdPSheet: [src:W13] and [src:W14] (van der Pauw 1958): R_A = R_B =
// 10 Ohm gives πR/ln 2 = 45.3236 Ohm; R_A = 10, R_B = 20 Ohm gives 65.285.
func TestVdPSheet(t *testing.T) {
	t.Parallel()
	cases := []struct {
		a, b, ar, br float64
		want         float64
		warn         string
	}{
		{10, 10, 0, 0, 45.3236, ""},
		{10, 20, 0, 0, 65.285, ""},
		{10, 10, 10, 10, 45.3236, ""},
		{10, 10, 11, 10, 0, WarnReciprocity},
		{10, 120, 0, 0, 0, WarnVdPRatio},
	}
	for _, c := range cases {
		r, err := VdPSheet(Estimate{c.a, 0.01}, Estimate{c.b, 0.01}, Estimate{c.ar, 0.01}, Estimate{c.br, 0.01})
		if err != nil {
			t.Fatal(err)
		}
		if c.want > 0 && math.Abs(r.SheetResistance.Value-c.want) > 1e-4*c.want {
			t.Errorf("R_A %g R_B %g: R_s = %v, want %g", c.a, c.b, r.SheetResistance, c.want)
		}
		if c.want > 0 && !(r.SheetResistance.Uncertainty > 0) {
			t.Errorf("no uncertainty propagated: %v", r.SheetResistance)
		}
		if (c.warn == "") != (len(r.Warnings) == 0) || (c.warn != "" && !hasWarning(r.Warnings, c.warn)) {
			t.Errorf("R_A %g R_B %g: warnings %v, want %q", c.a, c.b, r.Warnings, c.warn)
		}
	}
	if _, err := VdPSheet(Estimate{-1, 0}, Estimate{10, 0}, Estimate{}, Estimate{}); !errors.Is(err, ErrBadArgument) {
		t.Errorf("negative R_A: %v", err)
	}
}
