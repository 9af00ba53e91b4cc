package transport

import (
	"strings"
	"testing"
)

// TestHallSign: the carriers come from the sample's record when given, the slope's sign is
// read with the orientation of the measured column (R_xy = o·ρ_xy; electrons give a
// negative ρ_xy slope with B along +z, [src:IHN2010]), and a disagreement is a warning.
func TestHallSign(t *testing.T) {
	p := gaas() // electrons: ρ_xy = −B/(ne)
	p.Points = 201
	d, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	flipped, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	for i := range flipped.Columns[2].Values {
		flipped.Columns[2].Values[i] *= -1 // the Hall probes wired the other way round
	}
	for _, tc := range []struct {
		name     string
		d        *Dataset
		opts     []Option
		carriers string
		measured string
		warn     bool
	}{
		{"default convention", d, nil, "electrons", "electrons", false},
		{"flipped probes, default convention", flipped, nil, "holes", "holes", false},
		{"flipped probes, orientation from the wiring", flipped, []Option{WithOrientation(-1, "the wiring")}, "electrons", "electrons", false},
		{"wafer says electrons, slope agrees", d, []Option{WithCarrier("electrons", "wafer W1")}, "electrons", "electrons", false},
		{"wafer says electrons, slope disagrees", flipped, []Option{WithCarrier("electrons", "wafer W1")}, "electrons", "holes", true},
		{"wafer says holes, wiring flips", d, []Option{WithCarrier("holes", "wafer W2"), WithOrientation(-1, "the wiring")}, "holes", "holes", false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			h, err := HallDensity(tc.d, "B", "Rxy", 0.05, 0.3, tc.opts...)
			if err != nil {
				t.Fatal(err)
			}
			if h.Carriers != tc.carriers || h.MeasuredCarriers != tc.measured {
				t.Errorf("carriers %s (measured %s), want %s (%s)", h.Carriers, h.MeasuredCarriers, tc.carriers, tc.measured)
			}
			if got := hasWarning(h.Warnings, WarnCarrierSign); got != tc.warn {
				t.Errorf("carrier-sign warning %v, want %v: %v", got, tc.warn, h.Warnings)
			}
		})
	}
	h, _ := HallDensity(flipped, "B", "Rxy", 0.05, 0.3, WithCarrier("electrons", "wafer W1"), WithOrientation(1, "the wiring (current 1 → 5, R_xy = V3 − V7)"))
	if w := h.Warnings[len(h.Warnings)-1].Msg; !strings.Contains(w, "means holes by the wiring (current 1 → 5, R_xy = V3 − V7), but wafer W1 records electrons") {
		t.Errorf("warning %q", w)
	}
}
