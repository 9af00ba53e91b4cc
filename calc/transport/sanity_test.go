package transport

import (
	"math"
	"strings"
	"testing"
)

// TestCheckSweep: each check fires on the data built to trigger it and stays
// quiet on a clean ±B sweep of the invented GaAs 2DEG.
func TestCheckSweep(t *testing.T) {
	t.Parallel()
	base := gaas()
	base.BStart, base.BEnd, base.Noise = -1, 1, 0.05
	cases := []struct {
		name string
		mod  func(p *SweepParams)
		opts []Option
		want []string
	}{
		{"clean", func(p *SweepParams) {}, nil, nil},
		// 30 % R_xx pick-up: R_xy(0) = 0.3·104 Ohm ≈ 1.5 % of 2080 Ohm at 1 T.
		{"pick-up", func(p *SweepParams) { p.Pickup = 0.3 }, nil, []string{WarnXYAtZero}},
		{"out of phase", func(p *SweepParams) { p.OutOfPhase = 0.5 }, nil, []string{WarnOutOfPhase}},
		{"few points", func(p *SweepParams) { p.Points = 8 }, nil, []string{WarnFewPoints}},
		// The plateau model takes R_xx to zero where the levels are resolved; a
		// parallel channel (1e10 cm^-2, 1000 cm²/(V s), two-carrier Drude) keeps
		// the minima far above 5 % of ρ_0, as in a sample with a conducting
		// doping layer.
		{"QH minima", func(p *SweepParams) {
			p.Plateaus, p.BStart, p.BEnd, p.Points, p.QuantumLifetime = true, 0, 10, 4001, 0.3e-12
			p.Parallel = &ParallelChannel{Density: 1e14, Mobility: 0.1}
		}, []Option{WithDensity(3e15)}, []string{WarnRxxNotZero}},
	}
	for _, c := range cases {
		p := base
		c.mod(&p)
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		ws, err := CheckSweep(d, c.opts...)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		var codes []string
		for _, w := range ws {
			codes = append(codes, w.Code)
		}
		for _, want := range c.want {
			if !hasWarning(ws, want) {
				t.Errorf("%s: no %s in %v", c.name, want, codes)
			}
		}
		if len(c.want) == 0 && len(ws) != 0 {
			t.Errorf("%s: unexpected %v", c.name, ws)
		}
	}
}

// TestRxxMinimaZero: R_xx that does reach zero in the quantum Hall regime raises nothing.
func TestRxxMinimaZero(t *testing.T) {
	t.Parallel()
	B := make([]float64, 200)
	R := make([]float64, 200)
	for i := range B {
		B[i] = 0.05 * float64(i)
		R[i] = 100 * math.Abs(math.Sin(3*B[i]))
	}
	R[0] = 100
	if w := rxxMinima(B, R, 3e15); w != nil {
		t.Errorf("warning on minima that reach zero: %v", w)
	}
}

// TestSweepTemperature: the metadata forms that give a temperature, and the
// errors.
func TestSweepTemperature(t *testing.T) {
	t.Parallel()
	cases := []struct {
		meta []KV
		cols []Column
		want float64
		err  string
	}{
		{[]KV{{"T", "1.5"}}, nil, 1.5, ""},
		{[]KV{{"temperature", "300 mK"}}, nil, 0.3, ""},
		{nil, []Column{{Name: "T", Values: []float64{1, 2, 9, math.NaN()}}}, 2, ""},
		{[]KV{{"T", "1.5 T"}}, nil, 0, "expected a temperature"},
		{nil, nil, 0, "no temperature"},
	}
	for _, c := range cases {
		got, err := sweepTemperature(&Dataset{Name: "x.csv", Meta: c.meta, Columns: c.cols})
		if c.err != "" {
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%v: error %v, want %q", c.meta, err, c.err)
			}
			continue
		}
		if err != nil || math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%v: %g, %v; want %g", c.meta, got, err, c.want)
		}
	}
}

// FuzzSweepTemperature: any metadata value gives a positive finite
// temperature or an error, never a panic.
func FuzzSweepTemperature(f *testing.F) {
	for _, s := range []string{"1.5", "1.5 K", "300 mK", "1.5 T", "", "-1", "NaN", "1e400 K", "2 ± 0.1 K"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := sweepTemperature(&Dataset{Name: "f.csv", Meta: []KV{{"T", s}}})
		if err == nil && (!(v > 0) || math.IsInf(v, 0)) {
			t.Errorf("%q gave %g without an error", s, v)
		}
	})
}
