package transport

import (
	"errors"
	"math"
	"testing"
)

// TestSdHFrequencyWorkedExample: [src:W15]: n = 3e11 cm^-2, g_s = 2
// gives f_B = 6.2035 T (Δ(1/B) = 0.161199 T^-1); spin-resolved 12.407 T.
// Closed form f_B = h n/(g_s g_v e), CODATA 2018 h and e; 1e-4 relative.
func TestSdHFrequencyWorkedExample(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name      string
		n, gs, gv float64
		want      float64
	}{
		{"GaAs spin-degenerate", 3e15, 2, 1, 6.2035},
		{"GaAs spin-resolved", 3e15, 1, 1, 12.407},
		{"Si(100) n = 1e12 cm^-2, g = 4 (W27)", 1e16, 2, 2, 10.339},
	}
	for _, tc := range tests {
		if got := SdHFrequency(tc.n, tc.gs, tc.gv); math.Abs(got-tc.want)/tc.want > 1e-4 {
			t.Errorf("%s: f_B = %.6g T, want %.6g", tc.name, got, tc.want)
		}
		if got := DensityFromSdH(tc.want, tc.gs, tc.gv); math.Abs(got-tc.n)/tc.n > 1e-4 {
			t.Errorf("%s: n = %.6g m^-2, want %.6g", tc.name, got, tc.n)
		}
	}
}

// TestSdHRecovery: SdHDensity on synthetic sweeps (low-field SdH form,
// [src:CSF1989]) recovers the density. Noise-free, the only error is the
// envelope model and interpolation: 1e-3 relative; with noise we allow 1 %
// (the reported σ is ~0.1 % for these settings, see TestSdHCoverage).
func TestSdHRecovery(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name       string
		mod        func(*SweepParams)
		bmin, bmax float64
		gs         float64
		opts       []Option
		tol        float64
	}{
		{"W15 noise-free", func(p *SweepParams) { p.Noise = 0 }, 0.3, 1, 2, nil, 1e-3},
		{"noisy, ±B up-down", func(p *SweepParams) { p.Noise, p.BStart, p.UpDown = 1, -1, true }, 0.3, 1, 2, nil, 0.01},
		{"1.5e11, higher mobility, 20 mK", func(p *SweepParams) {
			p.Density, p.Temperature, p.QuantumLifetime, p.Noise, p.BEnd = 1.5e15, 0.02, 3e-12, 0.5, 0.6
		}, 0.1, 0.6, 2, nil, 0.01},
		{"Si-like valley degeneracy", func(p *SweepParams) {
			p.Density, p.ValleyDeg, p.MassRatio, p.Noise, p.BEnd, p.Points = 1e16, 2, 0.19, 0.5, 4, 8001
		}, 1, 4, 2, []Option{WithValleyDegeneracy(2)}, 0.01},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := gaas()
			tc.mod(&p)
			d, err := Sweep(p)
			if err != nil {
				t.Fatal(err)
			}
			r, err := SdHDensity(d, tc.bmin, tc.bmax, tc.gs, tc.opts...)
			if err != nil {
				t.Fatal(err)
			}
			if rel := math.Abs(r.Density.Value-p.Density) / p.Density; rel > tc.tol {
				t.Errorf("n = %v m^-2, want %g (rel %.2g > %.2g); f = %v, FFT %.5g; warnings %v", r.Density, p.Density, rel, tc.tol, r.Frequency, r.FFTFrequency, r.Warnings)
			}
			if len(r.Spectrum.Freq) == 0 || len(r.Spectrum.Freq) != len(r.Spectrum.Amp) {
				t.Errorf("spectrum of %d/%d points", len(r.Spectrum.Freq), len(r.Spectrum.Amp))
			}
		})
	}
}

// TestSdHCoverage: the true density lies within ±2σ in at least 85 % of 50 seeds.
func TestSdHCoverage(t *testing.T) {
	t.Parallel()
	const seeds = 50
	in := 0
	for s := uint64(0); s < seeds; s++ {
		p := gaas()
		p.Noise, p.Seed = 3, 1000+s
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := SdHDensity(d, 0.3, 1, 2)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.Density.Value-p.Density) <= 2*r.Density.Uncertainty {
			in++
		}
		if s == 0 {
			t.Logf("seed %d: n = %v m^-2 (rel σ %.2g)", p.Seed, r.Density, r.Density.Uncertainty/r.Density.Value)
		}
	}
	frac := float64(in) / seeds
	t.Logf("SdH density: true value within ±2σ in %d/%d seeds (%.0f %%)", in, seeds, 100*frac)
	if frac < 0.85 {
		t.Errorf("coverage %.2f < 0.85", frac)
	}
}

func TestSdHErrors(t *testing.T) {
	t.Parallel()
	p := gaas()
	p.Points = 40
	d, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name       string
		bmin, bmax float64
		want       string
		sentinel   error
	}{
		{"too few points", 0.3, 1, "synthetic: SdH analysis of Rxx over 0.3 T ≤ |B| ≤ 1 T: 28 points; need at least 32: too few points", ErrTooFewPoints},
		{"zero bmin", 0, 1, "synthetic: SdH analysis: field range 0 T to 1 T: expected a range lo .. hi with 0 < lo < hi: bad argument", ErrBadArgument},
	}
	for _, tc := range tests {
		_, err := SdHDensity(d, tc.bmin, tc.bmax, 2)
		if err == nil || err.Error() != tc.want || !errors.Is(err, tc.sentinel) {
			t.Errorf("%s: error = %v\nwant %q", tc.name, err, tc.want)
		}
	}
}
