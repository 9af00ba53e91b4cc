package transport

import (
	"errors"
	"math"
	"testing"
)

// qhSweep is the invented GaAs 2DEG (n = 3e11 cm^-2) at 0.3 K swept to 10 T
// with the package's smoothed-step quantum Hall model and 0.5 Ohm noise.
func qhSweep(t *testing.T) (*Dataset, SweepParams) {
	t.Helper()
	p := gaas()
	p.Plateaus, p.Temperature, p.BStart, p.BEnd, p.Points, p.Noise = true, 0.3, 0, 10, 5001, 0.5
	d, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	return d, p
}

// TestHallResistanceW19: R_K/ν from CODATA 2018 (exact h and e) against
// [src:W19], to 1e-6 Ohm.
func TestHallResistanceW19(t *testing.T) {
	t.Parallel()
	want := []float64{25812.807459, 12906.403730, 8604.269153, 6453.201865, 5162.561492, 4302.134577}
	for i, w := range want {
		if got := rK / float64(i+1); math.Abs(got-w) > 1e-6 {
			t.Errorf("R_K/%d = %.6f, want %.6f", i+1, got, w)
		}
	}
}

// TestPlateausModel: the spin-degenerate model has plateaus at ν = 2, 4, 6,
// 8, 10 (B_ν = n h/(ν e): 6.2035 T at ν = 2, [src:W5]). Each must be
// found with ν assigned correctly, |deviation| < 1e-3 (the model's logistic
// steps leave about 1e-4), inside the density's ν range.
func TestPlateausModel(t *testing.T) {
	t.Parallel()
	d, p := qhSweep(t)
	// Replace R_xx by a quantity that vanishes on plateaus: ρ_xx ∝ B·|dρ_xy/dB|
	// of the noise-free model (an empirical relation, Chang & Tsui 1985, from
	// memory), scaled to R_xx(0) = 104 Ohm at the classical slope, plus 1 mOhm noise.
	b, _ := d.Col("B")
	rxx, _ := d.Col("Rxx")
	for i, B := range b.Values {
		_, y1 := p.Resistivity(B + 1e-4)
		_, y0 := p.Resistivity(B - 1e-4)
		rxx.Values[i] = 104*B*math.Abs((y1-y0)/2e-4)/2080.5 + 1e-3*math.Cos(float64(i))
		if B == 0 {
			rxx.Values[i] = 104
		}
	}
	r, err := Plateaus(d, PlateauOptions{Density: 3e15})
	if err != nil {
		t.Fatal(err)
	}
	var nus []int
	for _, pl := range r.Plateaus {
		nus = append(nus, pl.P)
		if pl.Q != 1 || pl.Sign != 1 {
			t.Errorf("plateau %+v", pl)
		}
		if math.Abs(pl.Deviation) > 1e-3 || !pl.RxxNearZero || len(pl.Warnings) != 0 {
			t.Errorf("ν = %d: deviation %.2g, R_xx min %.3g, warnings %v", pl.P, pl.Deviation, pl.RxxMin, pl.Warnings)
		}
		if pl.Rxy.Value > 0 {
			t.Errorf("ν = %d: R_xy %v should be negative for electrons at +B", pl.P, pl.Rxy)
		}
	}
	if want := []int{10, 8, 6, 4, 2}; !equalInts(nus, want) {
		t.Errorf("filling factors %v, want %v", nus, want)
	}
	// ν = 2 spans B_2 = 6.2035 T ([src:W5]).
	last := r.Plateaus[len(r.Plateaus)-1]
	if !(last.BMin < 6.2035 && last.BMax > 6.2035) {
		t.Errorf("ν = 2 plateau %g–%g T does not contain 6.2035 T", last.BMin, last.BMax)
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func TestPlateauWarnings(t *testing.T) {
	t.Parallel()
	d, p := qhSweep(t)
	// A parallel channel (1e10 cm^-2, 1000 cm²/(V s), two-carrier Drude) keeps
	// R_xx finite on the plateaus: the first plateau warns.
	p.Parallel = &ParallelChannel{Density: 1e14, Mobility: 0.1}
	dp, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Plateaus(dp, PlateauOptions{Density: 3e15})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Plateaus) == 0 || !hasWarning(r.Plateaus[0].Warnings, WarnRxxNotZero) {
		t.Errorf("no %s warning: %v", WarnRxxNotZero, r.Warnings)
	}
	// Without it, the model's R_xx reaches zero and nothing is said about it.
	r, err = Plateaus(d, PlateauOptions{Density: 3e15})
	if err != nil {
		t.Fatal(err)
	}
	if hasWarning(r.Warnings, WarnRxxNotZero) {
		t.Errorf("clean model: %v", r.Warnings)
	}
	// A density 30 % too high moves the expected ν.
	r, err = Plateaus(d, PlateauOptions{Density: 3.9e15})
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnFilling) {
		t.Errorf("no %s warning: %v", WarnFilling, r.Warnings)
	}
	// A 0.2 % calibration error of the Hall voltage.
	rxy, _ := d.Col("Rxy")
	for i := range rxy.Values {
		rxy.Values[i] *= 1.002
	}
	r, err = Plateaus(d, PlateauOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnPlateauDev) {
		t.Errorf("no %s warning: %v", WarnPlateauDev, r.Warnings)
	}
}

func TestNearestFilling(t *testing.T) {
	t.Parallel()
	cases := []struct {
		nu   float64
		frac bool
		p, q int
	}{
		{2.0004, false, 2, 1},
		{0.3, false, 1, 1},
		{0.6668, true, 2, 3},
		{0.3333, true, 1, 3},
		{0.4001, true, 2, 5},
		{1.0002, true, 1, 1},
		{4.4, false, 4, 1},
	}
	for _, c := range cases {
		if p, q := nearestFilling(c.nu, c.frac); p != c.p || q != c.q {
			t.Errorf("nearestFilling(%g, %v) = %d/%d, want %d/%d", c.nu, c.frac, p, q, c.p, c.q)
		}
	}
}

func TestPlateauErrors(t *testing.T) {
	t.Parallel()
	d, _ := qhSweep(t)
	short := &Dataset{Name: "short.csv", Columns: []Column{{Name: "B", Values: []float64{0, 1, 2}}, {Name: "Rxy", Values: []float64{0, 1, 2}}}}
	cases := []struct {
		name string
		d    *Dataset
		o    PlateauOptions
		want error
	}{
		{"too few points", short, PlateauOptions{}, ErrTooFewPoints},
		{"negative width", d, PlateauOptions{MinWidth: -1}, ErrBadArgument},
		{"negative density", d, PlateauOptions{Density: -1}, ErrBadArgument},
		{"unknown column", d, PlateauOptions{YCol: "Rxy2"}, ErrUnknownColumn},
	}
	for _, c := range cases {
		if _, err := Plateaus(c.d, c.o); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.name, err, c.want)
		}
	}
	// A classical Hall line has no plateau, and that is not an error.
	p := gaas()
	lin, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Plateaus(lin, PlateauOptions{})
	if err != nil || len(r.Plateaus) != 0 {
		t.Errorf("classical line: %v, %d plateaus", err, len(r.Plateaus))
	}
}
