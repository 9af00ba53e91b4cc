package transport

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"cleave/internal/testutil"
)

// tlmGaps are the gaps of a common five-pad pattern, in m.
var tlmGaps = []float64{5e-6, 10e-6, 20e-6, 40e-6, 80e-6}

// TestFitTLMExact: points made exactly from R_T = 2R_c + R_sh d/W (Berger 1972; Schroder,
// Semiconductor Material and Device Characterization, 3rd ed., ch. 3, the TLM section, from
// memory) with W = 100 µm, R_sh = 1000 Ohm, R_c = 5 Ohm (the check values of the project's
// reference notes, computed there, not taken from the book): the line is 10 Ohm + 10 Ohm/µm·d.
func TestFitTLMExact(t *testing.T) {
	R := make([]float64, len(tlmGaps))
	for i, d := range tlmGaps {
		R[i] = 2*5 + 1000*d/100e-6
	}
	f, err := FitTLM(tlmGaps, R, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !testutil.WithinRel(f.Intercept.Value, 10, 1e-12) || !testutil.WithinRel(f.Slope.Value, 1e7, 1e-12) {
		t.Errorf("line %v + %v d, want 10 + 1e7 d", f.Intercept, f.Slope)
	}
	if !testutil.Within(f.R2, 1, 1e-12, 0) || len(f.Warnings) != 0 {
		t.Errorf("R² = %v, warnings %v", f.R2, f.Warnings)
	}
}

// TestFitTLMSynthetic: noisy synthetic patterns with known R_c and R_sh (the model above,
// Gaussian noise of 0.5 Ohm on each resistance). Over many patterns the intercept and the
// slope scatter around the truth as their uncertainties say: with a residual-scaled
// covariance and 3 degrees of freedom, (estimate − truth)/σ follows Student's t with 3
// degrees of freedom, |t| < 3.182 for 95 % of the patterns.
func TestFitTLMSynthetic(t *testing.T) {
	const W, Rsh, Rc, noise = 50e-6, 350.0, 12.0, 0.5
	r := rand.New(rand.NewPCG(14, 3))
	var inI, inS int
	const trials = 2000
	for range trials {
		R := make([]float64, len(tlmGaps))
		for i, d := range tlmGaps {
			R[i] = 2*Rc + Rsh*d/W + noise*r.NormFloat64()
		}
		f, err := FitTLM(tlmGaps, R, nil)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(f.Intercept.Value-2*Rc) < 3.182*f.Intercept.Uncertainty {
			inI++
		}
		if math.Abs(f.Slope.Value-Rsh/W) < 3.182*f.Slope.Uncertainty {
			inS++
		}
	}
	for name, in := range map[string]int{"intercept": inI, "slope": inS} {
		if frac := float64(in) / trials; frac < 0.935 || frac > 0.965 {
			t.Errorf("%s inside its 95 %% interval in %.3f of the patterns, want 0.95", name, frac)
		}
	}
}

func TestFitTLMWarningsAndErrors(t *testing.T) {
	// A bad pad: the 20 µm gap reads far too high.
	f, err := FitTLM(tlmGaps, []float64{60, 110, 400, 410, 810}, nil)
	if err != nil || !hasWarning(f.Warnings, WarnTLMLinearity) {
		t.Errorf("bad pad: %v, %v", f, err)
	}
	// Three gaps, and contacts so good the intercept comes out negative.
	f, err = FitTLM(tlmGaps[:3], []float64{49.5, 100.4, 199.6}, nil)
	if err != nil || !hasWarning(f.Warnings, WarnFewPoints) || !hasWarning(f.Warnings, WarnTLMIntercept) {
		t.Errorf("three good contacts: %+v, %v", f, err)
	}
	for _, c := range []struct {
		d, R []float64
		want error
	}{
		{tlmGaps[:2], []float64{1, 2}, ErrTooFewPoints},
		{tlmGaps, []float64{1, 2, 3}, ErrBadArgument},
		{tlmGaps, []float64{80, 40, 20, 10, 5}, ErrBadArgument}, // reversed order
		{[]float64{-1e-6, 1e-6, 2e-6}, []float64{1, 2, 3}, ErrBadArgument},
	} {
		if _, err := FitTLM(c.d, c.R, nil); !errors.Is(err, c.want) {
			t.Errorf("FitTLM(%v, %v): %v, want %v", c.d, c.R, err, c.want)
		}
	}
}

// TestFitArrhenius: synthetic cell calibrations y = A exp(−E_a/(k_B T)) with a known
// activation energy (k_B = 1.380649e-23 J/K, e = 1.602176634e-19 C, exact in CODATA 2018).
// Exact points give E_a back to rounding; noisy points (3 % relative scatter) give it back
// within the fit's uncertainty for 95 % of calibrations (Student's t, 3 degrees of freedom).
func TestFitArrhenius(t *testing.T) {
	const kB, e = 1.380649e-23, 1.602176634e-19
	Ea := 4.2 * e
	T := []float64{1323.15, 1373.15, 1423.15, 1473.15, 1523.15} // 1050 … 1250 °C
	A := 1e24 / math.Exp(-Ea/(kB*1423.15))                      // 1e18 cm^-3 at 1150 °C
	y := make([]float64, len(T))
	for i := range T {
		y[i] = A * math.Exp(-Ea/(kB*T[i]))
	}
	f, err := FitArrhenius(T, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := -f.Slope.Value * kB / e; !testutil.WithinRel(got, 4.2, 1e-10) {
		t.Errorf("E_a = %.12g eV, want 4.2", got)
	}
	if !testutil.WithinRel(f.LnA.Value, math.Log(A), 1e-12) || f.TMin != 1323.15 || f.TMax != 1523.15 {
		t.Errorf("ln A = %v (want %v), range %v … %v", f.LnA.Value, math.Log(A), f.TMin, f.TMax)
	}
	r := rand.New(rand.NewPCG(7, 11))
	in := 0
	const trials = 2000
	for range trials {
		yn := make([]float64, len(T))
		for i := range T {
			yn[i] = y[i] * (1 + 0.03*r.NormFloat64())
		}
		f, err := FitArrhenius(T, yn, nil)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(f.Slope.Value+Ea/kB) < 3.182*f.Slope.Uncertainty {
			in++
		}
	}
	if frac := float64(in) / trials; frac < 0.935 || frac > 0.965 {
		t.Errorf("E_a inside its 95 %% interval in %.3f of the calibrations", frac)
	}
	if _, err := FitArrhenius(T[:2], y[:2], nil); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("two points: %v", err)
	}
	if _, err := FitArrhenius([]float64{1300, 1400, 1500}, []float64{1, 0, 2}, nil); !errors.Is(err, ErrBadArgument) {
		t.Errorf("a zero density: %v", err)
	}
}

// rheedTrace synthesises a RHEED intensity trace: a slowly falling background plus a damped
// cosine of period P (one monolayer per period; Neave et al. 1983, from memory), sampled at
// 20 Hz for 60 s, with Gaussian noise.
func rheedTrace(r *rand.Rand, P, noise float64) (tt, y []float64) {
	for i := 0; i <= 1200; i++ {
		ti := float64(i) / 20
		tt = append(tt, ti)
		y = append(y, 1-0.004*ti+0.0001*ti*ti/10+0.25*math.Exp(-ti/30)*math.Cos(2*math.Pi*ti/P+0.4)+noise*r.NormFloat64())
	}
	return tt, y
}

// TestRHEEDPeriod recovers the known period of synthetic traces.
func TestRHEEDPeriod(t *testing.T) {
	r := rand.New(rand.NewPCG(2, 9))
	for _, P := range []float64{1.8, 3.53, 5.1} {
		tt, y := rheedTrace(r, P, 0)
		res, err := RHEEDPeriod(tt, y)
		if err != nil {
			t.Fatalf("P = %v: %v", P, err)
		}
		if !testutil.WithinRel(res.Period.Value, P, 2e-3) {
			t.Errorf("noise-free P = %v: got %v", P, res.Period)
		}
	}
	// With noise the period is within 4 σ of the truth in (nearly) every trace.
	bad := 0
	for range 200 {
		tt, y := rheedTrace(r, 3.53, 0.01)
		res, err := RHEEDPeriod(tt, y)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(res.Period.Value-3.53) > 4*res.Period.Uncertainty+1e-3*3.53 {
			bad++
		}
	}
	if bad > 4 {
		t.Errorf("%d of 200 noisy traces missed the period by more than 4 σ", bad)
	}
	if _, err := RHEEDPeriod([]float64{0, 1, 2}, []float64{1, 2, 1}); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("three points: %v", err)
	}
	flat := make([]float64, 100)
	tt := make([]float64, 100)
	for i := range tt {
		tt[i] = float64(i)
		flat[i] = 1
	}
	if _, err := RHEEDPeriod(tt, flat); err == nil {
		t.Error("a flat trace gave a period")
	}
}

// BenchmarkRHEEDPeriod times the period of a 60 s trace sampled at 20 Hz (1201 points).
func BenchmarkRHEEDPeriod(b *testing.B) {
	tt, y := rheedTrace(rand.New(rand.NewPCG(1, 1)), 3.53, 0.01)
	for b.Loop() {
		if _, err := RHEEDPeriod(tt, y); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkFitTLM times the fit of a five-gap pattern.
func BenchmarkFitTLM(b *testing.B) {
	R := []float64{60.2, 109.7, 210.4, 409.9, 810.1}
	for b.Loop() {
		if _, err := FitTLM(tlmGaps, R, nil); err != nil {
			b.Fatal(err)
		}
	}
}
