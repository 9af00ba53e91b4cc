package transport

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

var lkTemps = []float64{0.5, 1, 1.5, 2.2, 3, 4}

// TestLKMassTableExact: amplitudes from the LK form itself [src:LK1956]
// at several masses and fields; the fit must return m* to 1e-6 (the golden
// section stops at 1e-12 in ln m*; Gauss–Newton polishes).
func TestLKMassTableExact(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ ratio, B, A0 float64 }{
		{0.067, 1, 10}, {0.067, 0.4, 0.3}, {0.043, 2, 5}, {0.19, 3, 1e-3},
	} {
		A := make([]float64, len(lkTemps))
		for i, T := range lkTemps {
			A[i] = c.A0 * ThermalDamping(T, c.B, c.ratio*mE)
		}
		r, err := LKMassTable(lkTemps, A, c.B)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.MassRatio.Value-c.ratio) > 1e-6*c.ratio || math.Abs(r.A0.Value-c.A0) > 1e-6*c.A0 {
			t.Errorf("m*/m_e %.4g at %g T: got %v, A0 %v", c.ratio, c.B, r.MassRatio, r.A0)
		}
		if math.Abs(r.Mass.Value-c.ratio*mE) > 1e-6*c.ratio*mE {
			t.Errorf("mass in kg %g", r.Mass.Value)
		}
	}
}

// TestLKW16: the ratio of amplitudes at 4.2 K and 1.5 K at 1 T for GaAs is
// 0.13241/0.71166 ([src:W16]); a two-temperature table plus the
// T → 0 limit must give back m* = 0.067.
func TestLKW16(t *testing.T) {
	t.Parallel()
	r, err := LKMassTable([]float64{1e-3, 1.5, 4.2}, []float64{1, 0.71166, 0.13241}, 1)
	if err != nil {
		t.Fatal(err)
	}
	// The table values carry 5 digits, so the mass is good to about 1e-4.
	if math.Abs(r.MassRatio.Value-0.067) > 1e-4*0.067 {
		t.Errorf("m*/m_e = %v, want 0.067", r.MassRatio)
	}
}

// TestLKMassTableCoverage: Gaussian noise (1 % of A0) on exact LK amplitudes;
// over 50 seeds the truth lies within 2σ in at least 75 % (with 4 degrees of
// freedom a Student t gives 88 %; binomial sd ≈ 4.5 %).
func TestLKMassTableCoverage(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(5, 6))
	in := 0
	const seeds = 50
	for s := 0; s < seeds; s++ {
		A := make([]float64, len(lkTemps))
		for i, T := range lkTemps {
			A[i] = ThermalDamping(T, 1, 0.067*mE) + 0.01*rng.NormFloat64()
		}
		r, err := LKMassTable(lkTemps, A, 1)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.MassRatio.Value-0.067) <= 2*r.MassRatio.Uncertainty {
			in++
		}
	}
	t.Logf("LK table: %d of %d within 2σ", in, seeds)
	if float64(in)/seeds < 0.75 {
		t.Errorf("coverage %d/%d", in, seeds)
	}
}

func lkSweeps(t testing.TB, seed uint64, noise float64, temps []float64, sat float64) []*Dataset {
	var ds []*Dataset
	for i, T := range temps {
		p := dingleSweep(seed*100 + uint64(i))
		p.Noise = noise
		// Electron temperature saturating at sat (a model of heating).
		p.Temperature = math.Sqrt(T*T + sat*sat)
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		// The thermometer reading goes into the metadata.
		d.Meta = append([]KV{{"T", fmt.Sprintf("%g K", T)}}, d.Meta...)
		ds = append(ds, d)
	}
	return ds
}

// TestLKMassSweeps: sweeps from the synthetic model at six temperatures;
// m* = 0.067 recovered within 0.5 % (the noise-free extraction is within
// 0.1 %; the local fits leave a ±0.15 % alternation between maxima and minima).
func TestLKMassSweeps(t *testing.T) {
	t.Parallel()
	ds := lkSweeps(t, 1, 0.05, lkTemps, 0)
	// Up to 1 T the coldest sweep's oscillation reaches ΔR/R_0 ≈ 1: outside the low-field form.
	r, err := LKMassSweeps(ds, nil, 0.3, 1, WithExpectedMass(GaAsMassRange[0], GaAsMassRange[1]))
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnLargeAmplitude) {
		t.Errorf("no %s warning over 0.3–1 T: %v", WarnLargeAmplitude, r.Warnings)
	}
	// Below 0.6 T every extremum stays under ΔR/R_0 = 0.5.
	r, err = LKMassSweeps(ds, nil, 0.3, 0.6, WithExpectedMass(GaAsMassRange[0], GaAsMassRange[1]))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.MassRatio.Value-0.067) > 0.005*0.067 {
		t.Errorf("m*/m_e = %v, want 0.067", r.MassRatio)
	}
	if len(r.Extrema) < 10 || len(r.Warnings) != 0 {
		t.Errorf("%d extrema, warnings %v", len(r.Extrema), r.Warnings)
	}
	if r.Temperatures[0] != 0.5 {
		t.Errorf("temperature from metadata: %v", r.Temperatures)
	}
	// Explicit temperatures override the metadata: a 10 % scale error in the
	// thermometer gives a mass 10 % off (m* enters X as m* T), and the GaAs
	// range check is blind to it but not to a 30 % error.
	tt := make([]float64, len(lkTemps))
	for i, T := range lkTemps {
		tt[i] = 0.7 * T
	}
	r2, err := LKMassSweeps(ds, tt, 0.3, 1, WithExpectedMass(GaAsMassRange[0], GaAsMassRange[1]))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r2.MassRatio.Value-0.067/0.7) > 0.01*0.067/0.7 || !hasWarning(r2.Warnings, WarnMass) {
		t.Errorf("scaled temperatures: m*/m_e = %v, warnings %v", r2.MassRatio, r2.Warnings)
	}
}

// TestLKSaturation: the electron temperature saturates at 0.8 K while the
// thermometer reads 0.3 K; the coldest amplitude falls below the LK curve
// of the warmer sweeps.
func TestLKSaturation(t *testing.T) {
	t.Parallel()
	temps := []float64{0.3, 1, 1.5, 2.2, 3, 4}
	r, err := LKMassSweeps(lkSweeps(t, 2, 0.05, temps, 0.8), nil, 0.3, 1)
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnSaturation) {
		t.Errorf("no saturation warning: %v", r.Warnings)
	}
	// The same table without saturation raises none.
	A := make([]float64, len(temps))
	for i, T := range temps {
		A[i] = ThermalDamping(T, 0.5, 0.067*mE) * (1 + 0.001*float64(i%2))
	}
	rt, err := LKMassTable(temps, A, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	if hasWarning(rt.Warnings, WarnSaturation) {
		t.Errorf("saturation warning on unsaturated data: %v", rt.Warnings)
	}
	for i, T := range temps {
		A[i] = ThermalDamping(math.Hypot(T, 0.8), 0.5, 0.067*mE)
	}
	rt, err = LKMassTable(temps, A, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(rt.Warnings, WarnSaturation) {
		t.Errorf("no saturation warning on a saturated table: %v", rt.Warnings)
	}
}

// TestLKMassSweepsCoverage: 50 seeds of six sweeps with 1 Ohm noise; the
// fraction of seeds with the truth within 2σ is reported and must be ≥ 0.8.
func TestLKMassSweepsCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("50 × 6 sweeps")
	}
	t.Parallel()
	in, sz2 := 0, 0.0
	const seeds = 50
	for s := uint64(0); s < seeds; s++ {
		r, err := LKMassSweeps(lkSweeps(t, 10+s, 1, lkTemps, 0), nil, 0.3, 1)
		if err != nil {
			t.Fatal(err)
		}
		z := (r.MassRatio.Value - 0.067) / r.MassRatio.Uncertainty
		sz2 += z * z
		if math.Abs(z) <= 2 {
			in++
		}
	}
	frac := float64(in) / seeds
	t.Logf("LK sweeps: %d of %d seeds within 2σ (%.2f); RMS z = %.2f", in, seeds, frac, math.Sqrt(sz2/seeds))
	if frac < 0.8 {
		t.Errorf("coverage %.2f < 0.8", frac)
	}
}

func TestLKErrors(t *testing.T) {
	t.Parallel()
	table := []struct {
		name string
		T, A []float64
		B    float64
		want error
	}{
		{"length mismatch", []float64{1, 2, 3}, []float64{1, 2}, 1, ErrBadArgument},
		{"two points", []float64{1, 2}, []float64{1, 0.5}, 1, ErrTooFewPoints},
		{"zero temperature", []float64{0, 1, 2}, []float64{1, 0.8, 0.5}, 1, ErrBadArgument},
		{"negative amplitude", []float64{1, 2, 3}, []float64{1, -0.8, 0.5}, 1, ErrBadArgument},
		{"zero field", []float64{1, 2, 3}, []float64{1, 0.8, 0.5}, 0, ErrBadArgument},
		{"one temperature", []float64{1, 1, 1}, []float64{1, 0.8, 0.5}, 1, ErrBadArgument},
		{"NaN temperature", []float64{1, math.NaN(), 3}, []float64{1, 0.8, 0.5}, 1, ErrBadArgument},
	}
	for _, c := range table {
		if _, err := LKMassTable(c.T, c.A, c.B); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.name, err, c.want)
		}
	}
	ds := lkSweeps(t, 3, 0.05, lkTemps[:3], 0)
	noT := make([]*Dataset, len(ds))
	for i, d := range ds {
		c := *d
		c.Meta = nil
		c.Columns = c.Columns[:3] // B, Rxx, Rxy: no T column
		noT[i] = &c
	}
	if _, err := LKMassSweeps(noT, nil, 0.3, 1); !errors.Is(err, ErrBadArgument) {
		t.Errorf("missing temperatures: %v", err)
	}
	if _, err := LKMassSweeps(ds, []float64{1, 2}, 0.3, 1); !errors.Is(err, ErrBadArgument) {
		t.Errorf("temperature count: %v", err)
	}
	if _, err := LKMassSweeps(ds[:2], nil, 0.3, 1); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("two sweeps: %v", err)
	}
	if _, err := LKMassSweeps(ds, nil, 0.3, 0.301); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("narrow window: %v", err)
	}
	bad := *ds[0]
	bad.Meta = []KV{{"T", "1.5 T"}}
	if _, err := LKMassSweeps([]*Dataset{&bad, ds[1], ds[2]}, nil, 0.3, 1); !errors.Is(err, ErrBadArgument) {
		t.Errorf("temperature in tesla: %v", err)
	}
}
