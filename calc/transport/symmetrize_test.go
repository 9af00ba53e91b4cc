package transport

import (
	"errors"
	"math"
	"testing"
)

// symSweep is a ±1 T up/down sweep of the invented GaAs 2DEG with R_xx
// pick-up in R_xy (misaligned probes).
func symSweep(noise float64, pickup float64) (*Dataset, SweepParams) {
	p := gaas()
	p.BStart, p.BEnd, p.Points, p.UpDown, p.Noise, p.Pickup, p.Seed = -1, 1, 2001, true, noise, pickup, 4
	d, err := Sweep(p)
	if err != nil {
		panic(err)
	}
	return d, p
}

// TestSymmetrizeModel: on noise-free data ([src:BUTTIKER1986]) the symmetrised
// R_xx equals the model ρ_xx·squares and the antisymmetrised R_xy the model
// ρ_xy, with the pick-up gone; only linear-interpolation error remains, which
// is below 1e-3 relative for this grid (0.001 T spacing against SdH periods
// of at least 0.16 T at 1 T... and ≥ 6 mT at 0.2 T; we check |B| ≥ 0.2 T).
func TestSymmetrizeModel(t *testing.T) {
	t.Parallel()
	d, p := symSweep(0, 0.2)
	s, err := Symmetrize(d, "B", "Rxx")
	if err != nil {
		t.Fatal(err)
	}
	a, err := Antisymmetrize(d, "B", "Rxy")
	if err != nil {
		t.Fatal(err)
	}
	if s.BMin != 0 || s.BMax != 1 || len(s.B) != 1001 {
		t.Errorf("grid %g–%g T, %d points", s.BMin, s.BMax, len(s.B))
	}
	for i, b := range s.B {
		if b < 0.2 {
			continue
		}
		rx, ry := p.Resistivity(b)
		if math.Abs(s.Values[i]-5*rx) > 1e-3*5*rx {
			t.Fatalf("R_xx^sym(%g) = %g, model %g", b, s.Values[i], 5*rx)
		}
		if math.Abs(a.Values[i]-ry) > 1e-3*math.Abs(ry) {
			t.Fatalf("R_xy^anti(%g) = %g, model %g", b, a.Values[i], ry)
		}
	}
	// The even part removed from R_xy is the pick-up, 20 % of R_xx ≈ 1.7 % of R_xy (RMS).
	if !hasWarning(a.Warnings, WarnEvenPart) {
		t.Errorf("no even-part warning: %v", a.Warnings)
	}
	if len(s.Warnings) != 0 {
		t.Errorf("symmetrize warnings %v", s.Warnings)
	}
	// Without pick-up the even part is only interpolation error.
	d0, _ := symSweep(0, 0)
	a0, err := Antisymmetrize(d0, "B", "Rxy")
	if err != nil {
		t.Fatal(err)
	}
	if a0.RemovedRatio > 1e-6 || len(a0.Warnings) != 0 {
		t.Errorf("removed ratio %g, warnings %v", a0.RemovedRatio, a0.Warnings)
	}
}

// TestSymmetrizeProperties: swapping the sign of B leaves R^sym unchanged and
// flips R^anti (property of the definitions), and averaging
// up and down sweeps halves the noise variance.
func TestSymmetrizeProperties(t *testing.T) {
	t.Parallel()
	d, _ := symSweep(0.5, 0.01)
	flip := *d
	flip.Columns = append([]Column(nil), d.Columns...)
	nb := make([]float64, len(d.Columns[0].Values))
	for i, b := range d.Columns[0].Values {
		nb[i] = -b
	}
	flip.Columns[0].Values = nb
	for _, col := range []string{"Rxx", "Rxy"} {
		s1, err1 := Symmetrize(d, "B", col)
		s2, err2 := Symmetrize(&flip, "B", col)
		a1, err3 := Antisymmetrize(d, "B", col)
		a2, err4 := Antisymmetrize(&flip, "B", col)
		if err := errors.Join(err1, err2, err3, err4); err != nil {
			t.Fatal(err)
		}
		for i := range s1.Values {
			if math.Abs(s1.Values[i]-s2.Values[i]) > 1e-9 || math.Abs(a1.Values[i]+a2.Values[i]) > 1e-9 {
				t.Fatalf("%s at %g T: sym %g/%g anti %g/%g", col, s1.B[i], s1.Values[i], s2.Values[i], a1.Values[i], a2.Values[i])
			}
		}
	}
}

func TestSymmetrizeWarningsAndErrors(t *testing.T) {
	t.Parallel()
	// R_xx 20 % larger at +B than at −B (a density gradient; [src:PONOMARENKO2004]).
	d, _ := symSweep(0, 0)
	b, _ := d.Col("B")
	rxx, _ := d.Col("Rxx")
	for i, v := range b.Values {
		if v > 0 {
			rxx.Values[i] *= 1.2
		}
	}
	s, err := Symmetrize(d, "B", "Rxx")
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(s.Warnings, WarnOddPart) {
		t.Errorf("no odd-part warning: %v", s.Warnings)
	}
	for i := range rxx.Values {
		rxx.Values[i] = -rxx.Values[i]
	}
	if s, _ = Symmetrize(d, "B", "Rxx"); !hasWarning(s.Warnings, WarnNegative) {
		t.Errorf("no negative warning: %v", s.Warnings)
	}

	one, err := Sweep(gaas()) // 0–1 T only
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		d    *Dataset
		x, y string
		want error
	}{
		{"one polarity", one, "B", "Rxx", ErrNoField},
		{"unknown column", one, "B", "Rxz", ErrUnknownColumn},
		{"field in ohm", one, "Rxy", "Rxx", ErrUnitDim},
	}
	for _, c := range cases {
		if _, err := Symmetrize(c.d, c.x, c.y); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.name, err, c.want)
		}
		if _, err := Antisymmetrize(c.d, c.x, c.y); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.name, err, c.want)
		}
	}
	tiny := &Dataset{Name: "tiny.csv", Columns: []Column{
		{Name: "B", Values: []float64{-0.1, 0.5}},
		{Name: "Rxx", Values: []float64{1, 2}},
	}}
	if _, err := Symmetrize(tiny, "B", "Rxx"); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("no overlap: %v", err)
	}
}
