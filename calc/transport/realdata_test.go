package transport

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// Regression tests for data as they come from a cryostat: holes in the data,
// spin splitting inside the SdH window, field columns in the wrong unit. The
// sweeps are synthetic, from the Drude and low-field SdH model of Sweep
// ([src:AFS1982], [src:CSF1989]) with GaAs m* = 0.067 and n = 3e11 cm^-2, whose SdH
// frequency is 6.2035 T ([src:W15]).

func realBase() SweepParams {
	return SweepParams{Density: 3e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 1e-12, Temperature: 0.3,
		BStart: -2, BEnd: 2, Points: 2001, Noise: 0.01, Seed: 1}
}

// TestSdHDataHole: NaN rows over 1.0–1.4 T on both field polarities leave a
// hole of 1.8 periods in 1/B. The hole used to cap the searched frequency at
// 1/(2 × hole) = 1.75 T, below f_B, and the analysis failed with advice about
// the background; the density must come out and the hole be reported.
func TestSdHDataHole(t *testing.T) {
	d, err := Sweep(realBase())
	if err != nil {
		t.Fatal(err)
	}
	B, R := d.Columns[0].Values, d.Columns[1].Values
	for i := range B {
		if a := math.Abs(B[i]); a > 1.0 && a < 1.4 {
			if B[i] < 0 {
				R[i] = math.NaN() // a missing resistance reading
			} else {
				B[i] = math.NaN() // a missing field reading
			}
		}
	}
	r, err := SdHDensity(d, 0.3, 2, 2)
	if err != nil {
		t.Fatalf("SdHDensity with a hole in the data: %v", err)
	}
	if got := r.Density.Value / 3e15; math.Abs(got-1) > 0.005 {
		t.Errorf("density %.5g m^-2, want 3e15 within 0.5 %% ([src:W15])", r.Density.Value)
	}
	if !hasWarning(r.Warnings, WarnGap) {
		t.Errorf("no %s warning for a 1.8-period hole: %v", WarnGap, r.Warnings)
	}
	// The same sweep without the hole raises no gap warning.
	d2, _ := Sweep(realBase())
	r2, err := SdHDensity(d2, 0.3, 2, 2)
	if err != nil {
		t.Fatal(err)
	}
	if hasWarning(r2.Warnings, WarnGap) {
		t.Errorf("gap warning on complete data: %v", r2.Warnings)
	}
}

// spinSplitSweep is R_xx(B) with a spin-degenerate SdH term of frequency f_B
// and, growing in at higher field, the spin-resolved term at 2 f_B
// ([src:CSF1989]: minima at every integer ν once spin is resolved).
func spinSplitSweep() *Dataset {
	f := SdHFrequency(3e15, 2, 1)
	var B, R []float64
	for i := 0; i <= 4000; i++ {
		b := 0.2 + 5.8*float64(i)/4000
		r := 10 * (1 + 0.8*math.Exp(-1.5/b)*math.Cos(2*math.Pi*f/b-math.Pi) + 1.5*math.Exp(-6/b)*math.Cos(2*math.Pi*2*f/b))
		B, R = append(B, b), append(R, r)
	}
	return &Dataset{Name: "spin-split", Columns: []Column{
		{Name: "B", Dim: DimField, Values: B}, {Name: "Rxx", Dim: DimResistance, Values: R}}}
}

// TestSdHSpinSplitWindow: a window reaching into the spin-split regime gives
// a density several per cent off (or the doubled frequency) and must say so;
// the low-field window gives the right density without that warning.
func TestSdHSpinSplitWindow(t *testing.T) {
	d := spinSplitSweep()
	r, err := SdHDensity(d, 0.3, 1.5, 2)
	if err != nil {
		t.Fatal(err)
	}
	if got := r.Density.Value / 3e15; math.Abs(got-1) > 0.005 {
		t.Errorf("low-field window: density %.5g, want 3e15 within 0.5 %%", r.Density.Value)
	}
	if hasWarning(r.Warnings, WarnHarmonic) {
		t.Errorf("low-field window: unexpected %s: %v", WarnHarmonic, r.Warnings)
	}
	for _, w := range [][2]float64{{1.5, 6}, {2.5, 6}} {
		r, err := SdHDensity(d, w[0], w[1], 2)
		if err != nil {
			if !strings.Contains(err.Error(), "spin") {
				t.Errorf("window %v: error does not mention spin splitting: %v", w, err)
			}
			continue
		}
		if !hasWarning(r.Warnings, WarnHarmonic) {
			t.Errorf("window %v: density %.4g with no %s warning: %v", w, r.Density.Value, WarnHarmonic, r.Warnings)
		}
	}
}

// TestFieldUnitSlip: a field logged in kG under a header that says G makes
// every field 1000× too small. The Hall density then comes out 1000× too low
// and must be flagged; the SdH error must show where the data lie. The same
// numbers under the right header, or in mT and kOhm, give 3e11 cm^-2 quietly.
func TestFieldUnitSlip(t *testing.T) {
	d, err := Sweep(realBase())
	if err != nil {
		t.Fatal(err)
	}
	write := func(header string, sb, sr float64) *Dataset {
		var b strings.Builder
		b.WriteString(header + "\n")
		for i := range d.Columns[0].Values {
			fmt.Fprintf(&b, "%.9g,%.9g,%.9g\n", d.Columns[0].Values[i]*sb, d.Columns[1].Values[i]*sr, d.Columns[2].Values[i]*sr)
		}
		dd, err := Read("slip.csv", strings.NewReader(b.String()))
		if err != nil {
			t.Fatal(err)
		}
		return dd
	}
	for _, tc := range []struct {
		header string
		sb, sr float64
		slip   bool
	}{
		{"B (kG),Rxx (Ohm),Rxy (Ohm)", 10, 1, false},
		{"B (mT),Rxx (kOhm),Rxy (kOhm)", 1e3, 1e-3, false},
		{"B (G),Rxx (Ohm),Rxy (Ohm)", 10, 1, true}, // kG values under a G header
	} {
		dd := write(tc.header, tc.sb, tc.sr)
		h, err := HallDensity(dd, "B", "Rxy", 0, 0.3)
		if tc.slip {
			// 1/(e × 2080.5 Ohm/T × 1000): 3e8 cm^-2 ([src:W12]).
			if err != nil {
				if !strings.Contains(err.Error(), "header unit is G") {
					t.Errorf("%s: %v", tc.header, err)
				}
			} else if !hasWarning(h.Warnings, WarnDensityRange) {
				t.Errorf("%s: density %.3g m^-2 without %s: %v", tc.header, h.Density.Value, WarnDensityRange, h.Warnings)
			}
			_, err = SdHDensity(dd, 0.3, 2, 2)
			if !errors.Is(err, ErrTooFewPoints) || !strings.Contains(err.Error(), "header unit is G") {
				t.Errorf("%s: SdH error %v does not point at the header unit", tc.header, err)
			}
			continue
		}
		if err != nil {
			t.Fatalf("%s: %v", tc.header, err)
		}
		if got := h.Density.Value / 3e15; math.Abs(got-1) > 1e-4 || hasWarning(h.Warnings, WarnDensityRange) {
			t.Errorf("%s: density %.6g, warnings %v; want 3e15 m^-2 ([src:W12])", tc.header, h.Density.Value, h.Warnings)
		}
	}
}

// TestHallSignNegativeSweep: a sweep that covers only B < 0 still gives the
// carrier type from the sign of dR_xy/dB ([src:IHN2010]: ρ_xy = B/(qn), so
// holes have a positive slope whatever the sign of B) and the density.
func TestHallSignNegativeSweep(t *testing.T) {
	for _, holes := range []bool{false, true} {
		p := realBase()
		p.BStart, p.BEnd, p.Holes = -2, -0.01, holes
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		h, err := HallDensity(d, "B", "Rxy", 0, 0.3)
		if err != nil {
			t.Fatal(err)
		}
		want := "electrons"
		if holes {
			want = "holes"
		}
		if h.Carriers != want || math.Abs(h.Density.Value/3e15-1) > 1e-3 {
			t.Errorf("holes=%v: %s, n = %.5g; want %s, 3e15 m^-2", holes, h.Carriers, h.Density.Value, want)
		}
	}
}

// TestSymmetrizeFieldOffset: a field column that reads B + δ (a magnet's
// remanent field, a field zero set wrongly) makes R_xx differ between +B and
// −B near every SdH extremum. The odd-part warning used to blame a density
// gradient; it must name the offset, and FieldOffset must recover δ (to first
// order the removed part is −δ dR/dB, see fieldOffset).
func TestSymmetrizeFieldOffset(t *testing.T) {
	for _, off := range []float64{0, 0.005, -0.003} {
		p := realBase()
		p.UpDown = true
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		for i := range d.Columns[0].Values {
			d.Columns[0].Values[i] += off
		}
		s, err := Symmetrize(d, "B", "Rxx")
		if err != nil {
			t.Fatal(err)
		}
		a, err := Antisymmetrize(d, "B", "Rxy")
		if err != nil {
			t.Fatal(err)
		}
		if off == 0 {
			if s.OffsetMatch > 0.5 || hasWarning(s.Warnings, WarnOddPart) {
				t.Errorf("no offset: match %.2g, warnings %v", s.OffsetMatch, s.Warnings)
			}
			continue
		}
		// R_xx: the oscillation is steep, so δ comes out within 10 %; R_xy is
		// a straight line plus a small oscillation, so within 1 %.
		if math.Abs(s.FieldOffset-off) > 0.1*math.Abs(off) || math.Abs(a.FieldOffset-off) > 0.01*math.Abs(off) {
			t.Errorf("offset %g T: Symmetrize gives %g T, Antisymmetrize %g T", off, s.FieldOffset, a.FieldOffset)
		}
		found := false
		for _, w := range s.Warnings {
			found = found || (w.Code == WarnOddPart && strings.Contains(w.Msg, "field offset"))
		}
		if !found {
			t.Errorf("offset %g T: odd-part warning does not name the field offset: %v", off, s.Warnings)
		}
	}
}
