package transport

import (
	"errors"
	"math"
	"strings"
	"testing"

	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// dingleSweep is an invented GaAs 2DEG (m* = 0.067 m_e [src:VURGAFTMAN2001]) with
// n = 3e11 cm^-2, μ = 1e6 cm^2/(V s), τ_q = 1 ps at 1.5 K, 0.15–1 T, 6000
// points, 5 squares (R_0 ≈ 104 Ohm), Gaussian noise 0.05 Ohm.
func dingleSweep(seed uint64) SweepParams {
	p := gaas()
	p.BStart, p.BEnd, p.Points, p.Noise, p.Seed = 0.15, 1, 6000, 0.05, seed
	return p
}

// TestDingleClosedForms checks the float helpers against [src:W16] and [src:W17]
// (computed from CODATA 2018) and against package physics.
func TestDingleClosedForms(t *testing.T) {
	t.Parallel()
	m := 0.067 * mE
	cases := []struct {
		name      string
		got, want float64
	}{
		// W16: X = 14.6932·0.067·1.5/1 = 1.47666, X/sinh X = 0.71166; at 4.2 K 0.13241.
		{"X at 1.5 K, 1 T", lkArgument(1.5, 1, m), 1.47666},
		{"X/sinh X at 1.5 K, 1 T", ThermalDamping(1.5, 1, m), 0.71166},
		{"X/sinh X at 4.2 K, 1 T", ThermalDamping(4.2, 1, m), 0.13241},
		// W17: τ_q = 1 ps, 1 T: Dingle factor 0.30217, T_D = 1.21566 K.
		{"Dingle factor", DingleFactor(1, m, 1e-12), 0.30217},
		{"Dingle temperature", hbar / (2 * math.Pi * kB * 1e-12), 1.21566},
		// W17: Dingle-plot slope −π m*/(e τ_q) = −1.19675 T.
		{"Dingle slope", -math.Pi * m / (qe * 1e-12), -1.19675},
		// Rows 10 and 17: τ_t at μ = 1e6 cm^2/(V s) is 38.094 ps, τ_t/τ_q = 38.094.
		{"transport time", 100 * m / qe, 38.094e-12},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > 1e-4*math.Abs(c.want) {
			t.Errorf("%s = %.6g, want %.6g ([src:W16], [src:W17])", c.name, c.got, c.want)
		}
	}
	// The same factors from package physics (on quantities) agree to rounding.
	q := func(v float64, d quantity.Dim) quantity.Quantity { return quantity.New(v, d) }
	pt, err := physics.ThermalDamping(q(4.2, quantity.Temperature), q(1, DimField), q(m, quantity.Mass))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(pt.Value()-ThermalDamping(4.2, 1, m)) > 1e-12 {
		t.Errorf("ThermalDamping %.12g, physics %.12g", ThermalDamping(4.2, 1, m), pt.Value())
	}
	pd, err := physics.DingleFactor(q(0.7, DimField), q(2e-12, quantity.Time), q(m, quantity.Mass))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(pd.Value()-DingleFactor(0.7, m, 2e-12)) > 1e-12 {
		t.Errorf("DingleFactor %.12g, physics %.12g", DingleFactor(0.7, m, 2e-12), pd.Value())
	}
}

// TestQuantumLifetimeRecovery: synthetic sweeps from the low-field SdH form
// (Coleridge, Stoner & Fletcher 1989) with known τ_q. Tolerance: 3 % — the
// noise-free extraction is within 0.5 % (local fits over one period), and the
// statistical σ at this noise is about 0.4 %.
func TestQuantumLifetimeRecovery(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name    string
		tq, T   float64
		lo, hi  float64
		noise   float64
		wantRat float64
	}{
		{"1 ps, 1.5 K", 1e-12, 1.5, 0.2, 1, 0.05, 38.094},
		{"2 ps, 0.5 K", 2e-12, 0.5, 0.15, 0.8, 0.05, 19.047},
		{"0.7 ps, 3 K, noisy", 0.7e-12, 3, 0.3, 1, 0.5, 54.42},
	}
	for _, c := range cases {
		p := dingleSweep(7)
		p.QuantumLifetime, p.Temperature, p.Noise = c.tq, c.T, c.noise
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := QuantumLifetime(d, c.lo, c.hi, 0.067*mE, 3e15, c.T, WithMobility(100, 0))
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if got := r.QuantumLifetime.Value; math.Abs(got-c.tq) > 0.03*c.tq {
			t.Errorf("%s: τ_q = %v, want %g", c.name, r.QuantumLifetime, c.tq)
		}
		if got := r.DingleRatio.Value; math.Abs(got-c.wantRat) > 0.03*c.wantRat {
			t.Errorf("%s: τ_t/τ_q = %v, want %g", c.name, r.DingleRatio, c.wantRat)
		}
		// T_D·τ_q = ħ/(2π k_B) = 1.21566 K ps ([src:DINGLE1952], [src:W17]).
		if got := r.DingleTemperature.Value * r.QuantumLifetime.Value; math.Abs(got-1.21566e-12) > 1e-4*1.21566e-12 {
			t.Errorf("%s: T_D τ_q = %g", c.name, got)
		}
		if math.Abs(r.Intercept.Value) > 0.1 {
			t.Errorf("%s: intercept %v, want ≈ 0 for the model", c.name, r.Intercept)
		}
		for _, w := range r.Warnings {
			if w.Code == WarnIntercept || w.Code == WarnDingleRatio || w.Code == WarnFrequency {
				t.Errorf("%s: unexpected warning %v", c.name, w)
			}
		}
	}
}

// TestQuantumLifetimeCoverage: over 50 seeded sweeps the true τ_q must lie
// within 2σ in at least 80 % of them (95 % expected for a correct σ; the bound
// leaves room for binomial scatter, sd ≈ 3 %, and small systematic effects).
func TestQuantumLifetimeCoverage(t *testing.T) {
	t.Parallel()
	in, sz2 := 0, 0.0
	const seeds = 50
	for s := uint64(0); s < seeds; s++ {
		p := dingleSweep(100 + s)
		p.Noise = 0.5
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := QuantumLifetime(d, 0.25, 1, 0.067*mE, 3e15, 1.5)
		if err != nil {
			t.Fatal(err)
		}
		z := (r.QuantumLifetime.Value - 1e-12) / r.QuantumLifetime.Uncertainty
		sz2 += z * z
		if math.Abs(z) <= 2 {
			in++
		}
	}
	frac := float64(in) / seeds
	t.Logf("τ_q: %d of %d seeds within 2σ (%.2f); RMS of (τ_q − truth)/σ = %.2f", in, seeds, frac, math.Sqrt(sz2/seeds))
	if frac < 0.8 {
		t.Errorf("τ_q coverage %.2f < 0.8", frac)
	}
}

func TestQuantumLifetimeWarnings(t *testing.T) {
	t.Parallel()
	d, err := Sweep(dingleSweep(3))
	if err != nil {
		t.Fatal(err)
	}
	// A mobility giving τ_t < 0.8 τ_q (μ = 2 m^2/(V s): τ_t = 0.76 ps vs 1 ps).
	r, err := QuantumLifetime(d, 0.2, 1, 0.067*mE, 3e15, 1.5, WithMobility(2, 0))
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnDingleRatio) {
		t.Errorf("no %s warning at τ_t/τ_q = %.3g: %v", WarnDingleRatio, r.DingleRatio.Value, r.Warnings)
	}
	// Up to 1 T at 1.5 K and τ_q = 1 ps, ΔR/R_0 = 4 (X/sinh X) exp(−π/(ω_c τ_q)) reaches 0.86
	// (X = 1.48, X/sinh X = 0.71, Dingle factor 0.30): outside the low-field form. Up to 0.6 T
	// it stays at 0.23 (X = 2.46, X/sinh X = 0.42, Dingle factor 0.136).
	if !hasWarning(r.Warnings, WarnLargeAmplitude) {
		t.Errorf("no %s warning over 0.2–1 T: %v", WarnLargeAmplitude, r.Warnings)
	}
	if r, err := QuantumLifetime(d, 0.2, 0.6, 0.067*mE, 3e15, 1.5); err != nil || hasWarning(r.Warnings, WarnLargeAmplitude) {
		t.Errorf("over 0.2–0.6 T: err %v, warnings %v; want no %s", err, r.Warnings, WarnLargeAmplitude)
	}
	// A density 20 % off the data: frequency mismatch.
	r, err = QuantumLifetime(d, 0.2, 1, 0.067*mE, 3.6e15, 1.5)
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnFrequency) {
		t.Errorf("no %s warning: %v", WarnFrequency, r.Warnings)
	}
	// Oscillations three times the low-field form (a wrong prefactor): the
	// intercept moves to ln 3 ≈ 1.1 (R' = R_0 + 3(R − R_0), R_0 = 5/(n e μ)).
	r0 := 5 / (3e15 * qe * 100)
	rxx, _ := d.Col("Rxx")
	for i, v := range rxx.Values {
		rxx.Values[i] = r0 + 3*(v-r0)
	}
	r, err = QuantumLifetime(d, 0.2, 1, 0.067*mE, 3e15, 1.5)
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnIntercept) || math.Abs(r.Intercept.Value-math.Log(3)) > 0.05 {
		t.Errorf("intercept %v (want ln 3 and a %s warning): %v", r.Intercept, WarnIntercept, r.Warnings)
	}
}

func TestQuantumLifetimeErrors(t *testing.T) {
	t.Parallel()
	d, err := Sweep(dingleSweep(1))
	if err != nil {
		t.Fatal(err)
	}
	flat, err := Sweep(SweepParams{Density: 3e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 1e-15,
		Temperature: 1.5, BStart: 0.2, BEnd: 1, Points: 2000, Noise: 0.05, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name            string
		d               *Dataset
		lo, hi, m, n, T float64
		want            error
	}{
		{"reversed range", d, 1, 0.2, 0.067 * mE, 3e15, 1.5, ErrBadArgument},
		{"zero bmin", d, 0, 1, 0.067 * mE, 3e15, 1.5, ErrBadArgument},
		{"mass ratio instead of kg", d, 0.2, 1, 0.067, 3e15, 1.5, ErrBadArgument},
		{"no temperature", d, 0.2, 1, 0.067 * mE, 3e15, 0, ErrBadArgument},
		{"negative density", d, 0.2, 1, 0.067 * mE, -1, 1.5, ErrBadArgument},
		{"too few points", d, 0.2, 0.201, 0.067 * mE, 3e15, 1.5, ErrTooFewPoints},
		// Noise only: either too few extrema pass 2σ or the few that do show no damping.
		{"no oscillations", flat, 0.2, 1, 0.067 * mE, 3e15, 1.5, errNoDingle},
	}
	for _, c := range cases {
		_, err := QuantumLifetime(c.d, c.lo, c.hi, c.m, c.n, c.T)
		if c.want == errNoDingle && (errors.Is(err, ErrTooFewPoints) || errors.Is(err, ErrBadArgument)) {
			continue
		}
		if !errors.Is(err, c.want) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.want)
		}
	}
}

var errNoDingle = errors.New("too few points or no damping")

func hasWarning(ws []Warning, code string) bool {
	for _, w := range ws {
		if w.Code == code {
			return true
		}
	}
	return false
}

// TestNoFrequencyNamesFileOnce: when the SdH analysis that places the extrema
// fails, the Dingle and LK errors wrap its error, which already starts with the
// file name; the name must appear once. A noise-free exponential with a
// constant background polynomial holds no oscillation, and SdHDensity fails
// on it.
func TestNoFrequencyNamesFileOnce(t *testing.T) {
	t.Parallel()
	const name = "cd7-steep.csv"
	mk := func() *Dataset {
		B, R := make([]float64, 400), make([]float64, 400)
		for i := range B {
			B[i] = 0.5 + 1.5*float64(i)/399
			R[i] = 100 * math.Exp(3*B[i])
		}
		return &Dataset{Name: name, Columns: []Column{
			{Name: "B", Unit: "T", Dim: DimField, Values: B},
			{Name: "Rxx", Unit: "Ohm", Dim: DimResistance, Values: R}}}
	}
	_, errD := QuantumLifetime(mk(), 0.5, 2, 0.067*mE, 0, 1.5, WithBackground(0))
	ds := []*Dataset{mk(), mk(), mk()}
	_, errL := LKMassSweeps(ds, []float64{1, 2, 3}, 0.5, 2, WithBackground(0))
	for _, err := range []error{errD, errL} {
		if err == nil {
			t.Error("no error for a sweep without oscillations")
			continue
		}
		if n := strings.Count(err.Error(), name); n != 1 {
			t.Errorf("file name appears %d times in %q", n, err)
		}
	}
}
