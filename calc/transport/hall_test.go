package transport

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// TestHallWorkedExample: [src:W12], n = 3.0e11 cm^-2 ↔ |dR_xy/dB| =
// 1/(e n) = 2080.5 Ohm/T (CODATA 2018 e). Noise-free data from the Drude model,
// so the only error is rounding: 1e-4 relative, as the 5-6 digits of W12 allow.
func TestHallWorkedExample(t *testing.T) {
	t.Parallel()
	p := gaas()
	p.Noise = 0
	d, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	r, err := HallDensity(d, "B", "Rxy", 0, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	if got := r.Slope.Value; math.Abs(got+2080.5)/2080.5 > 1e-4 {
		t.Errorf("slope = %.6g Ohm/T, want -2080.5", got)
	}
	if got := r.Density.Value / 1e4; math.Abs(got-3.0e11)/3e11 > 1e-4 {
		t.Errorf("n = %.6g cm^-2, want 3.0000e11", got)
	}
	if r.Carriers != "electrons" {
		t.Errorf("carriers %q", r.Carriers)
	}
	if len(r.Warnings) != 0 {
		t.Errorf("unexpected warnings %v", r.Warnings)
	}
}

// TestHallRecovery: noisy sweeps from the Drude model with known n. With 1 Ohm
// noise on ~1000 points the slope's standard error is ~1e-4 relative, so 1 %
// is far outside any plausible scatter while still catching a wrong e or a
// factor of the sign.
func TestHallRecovery(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name     string
		n        float64
		holes    bool
		b0, b1   float64
		carriers string
	}{
		{"electrons 3e11", 3e15, false, 0, 1, "electrons"},
		{"electrons 1e11 ±B", 1e15, false, -1, 1, "electrons"},
		{"holes 2.2e11 (Ge)", 2.2e15, true, 0, 1, "holes"},
		{"electrons 1e12 negative field only", 1e16, false, -1, 0, "electrons"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := gaas()
			p.Density, p.Holes, p.BStart, p.BEnd, p.Noise, p.Seed = tc.n, tc.holes, tc.b0, tc.b1, 1, 7
			d, err := Sweep(p)
			if err != nil {
				t.Fatal(err)
			}
			r, err := HallDensity(d, "B", "Rxy", 0, 0.4)
			if err != nil {
				t.Fatal(err)
			}
			if rel := math.Abs(r.Density.Value-tc.n) / tc.n; rel > 0.01 {
				t.Errorf("n = %v, want %v (rel %.2g)", r.Density, tc.n, rel)
			}
			if r.Carriers != tc.carriers {
				t.Errorf("carriers %q, want %q", r.Carriers, tc.carriers)
			}
		})
	}
}

// TestHallCoverage: over 50 seeds the true density lies within ±2σ of the
// estimate in at least 85 % of them (for Gaussian errors 95.4 % is expected).
func TestHallCoverage(t *testing.T) {
	t.Parallel()
	const seeds = 50
	in := 0
	for s := uint64(0); s < seeds; s++ {
		p := gaas()
		p.Noise, p.Seed, p.Points = 5, s+100, 401
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := HallDensity(d, "B", "Rxy", 0, 0.5)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.Density.Value-p.Density) <= 2*r.Density.Uncertainty {
			in++
		}
	}
	frac := float64(in) / seeds
	t.Logf("Hall density: true value within ±2σ in %d/%d seeds (%.0f %%)", in, seeds, 100*frac)
	if frac < 0.85 {
		t.Errorf("coverage %.2f < 0.85", frac)
	}
}

func TestHallWarnings(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		mod    func(*SweepParams)
		b0, b1 float64
		want   []string // warning codes expected
	}{
		{"clean", func(p *SweepParams) {}, 0, 0.5, nil},
		// A parallel layer of 2e11 cm^-2 at 1e4 cm^2/(V s) bends R_xy between
		// its low-field and high-field limits (two-carrier Drude, [src:IHN2010]).
		{"parallel layer", func(p *SweepParams) { p.Parallel = &ParallelChannel{Density: 2e15, Mobility: 1} }, 0, 2, []string{WarnCurvature}},
		// Single-carrier Drude R_xx is flat at low field, so pick-up shows as an offset.
		{"pick-up on ±B", func(p *SweepParams) { p.Pickup, p.BStart = 0.5, -1 }, 0, 0.5, []string{WarnOffset}},
		{"out of phase", func(p *SweepParams) { p.OutOfPhase = 0.3 }, 0, 0.5, []string{WarnOutOfPhase}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := gaas()
			p.Noise = 0.2
			tc.mod(&p)
			p.BEnd = tc.b1
			d, err := Sweep(p)
			if err != nil {
				t.Fatal(err)
			}
			r, err := HallDensity(d, "B", "Rxy", tc.b0, tc.b1)
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			for _, w := range r.Warnings {
				got = append(got, w.Code)
			}
			if fmt.Sprint(got) != fmt.Sprint(tc.want) {
				t.Errorf("warnings %v, want codes %v", r.Warnings, tc.want)
			}
		})
	}
}

func TestHallErrors(t *testing.T) {
	t.Parallel()
	d, err := Read("cd12.csv", strings.NewReader("# cooldown: CD-12\nB (T),Rxy (Ohm),V (V)\n0.1,-200,1\n0.2,-400,1\n0.3,-600,1\n0.9,-1800,1\n1.0,-2000,1\n1.1,-2200,1\n"))
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name       string
		x, y       string
		bmin, bmax float64
		want       string
		sentinel   error
	}{
		{"too few points", "B", "Rxy", 0, 0.5, "cd12.csv: Hall fit of Rxy over 0 T ≤ |B| ≤ 0.5 T: 3 points; need at least 5: too few points", ErrTooFewPoints},
		{"unknown column", "B", "Rxy2", 0, 2, `cd12.csv:2:1: no column "Rxy2"; available: B, Rxy, V`, ErrUnknownColumn},
		{"wrong dimension", "B", "V", 0, 2, `cd12.csv:2:17: column "V" is in V, a voltage; expected a resistance (Ohm) (volts are not ohms: a layout's ` + "`derive:`" + ` turns it into R = V/I)`, ErrUnitDim},
		{"field not a field", "Rxy", "Rxy", 0, 2, `cd12.csv:2:7: column "Rxy" is in Ohm, a resistance; expected a magnetic field (T)`, ErrUnitDim},
		{"empty range", "B", "Rxy", 1, 1, "cd12.csv: Hall fit: field range 1 T to 1 T: expected a range lo .. hi with 0 ≤ lo < hi: bad argument", ErrBadArgument},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := HallDensity(d, tc.x, tc.y, tc.bmin, tc.bmax)
			if err == nil || err.Error() != tc.want || !errors.Is(err, tc.sentinel) {
				t.Errorf("error = %v\nwant %q wrapping %v", err, tc.want, tc.sentinel)
			}
		})
	}
}
