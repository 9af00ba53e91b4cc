package transport

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// parallelSweep is an invented GaAs 2DEG (n = 2.9e11 cm^-2, μ = 8e5 cm²/(V s),
// τ_q = 1.2 ps, 0.3 K, 5 squares) with a parallel channel of 1e12 cm^-2 at
// 2e4 cm²/(V s): the two-carrier Drude background (Sweep's model) rises from
// 240 to 925 Ohm over 0.05–1.5 T, far more than the oscillations, which only
// exceed the 0.2 Ohm noise above about 0.2 T.
func parallelSweep(t *testing.T, tauQ float64) *Dataset {
	t.Helper()
	d, err := Sweep(SweepParams{Density: 2.9e15, Mobility: 80, MassRatio: 0.067, QuantumLifetime: tauQ, Temperature: 0.3,
		Squares: 5, BStart: -1.5, BEnd: 1.5, Points: 6001, Noise: 0.2, Seed: 301, Parallel: &ParallelChannel{Density: 1e16, Mobility: 2}})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// symmetrized returns R_xx averaged over ±B on the |B| grid, as calc's
// symmetrize block builds it.
func symmetrized(t *testing.T, d *Dataset) *Dataset {
	t.Helper()
	s, err := Symmetrize(d, "B", "Rxx")
	if err != nil {
		t.Fatal(err)
	}
	return &Dataset{Name: "symmetrized", Hash: d.Hash, Columns: []Column{
		{Name: "B", Unit: "T", Dim: DimField, Values: s.B},
		{Name: "Rxx", Unit: "Ohm", Dim: DimResistance, Values: s.Values}}}
}

// TestSdHParallelConduction: with a parallel channel the cubic background in
// B leaves up to 53 Ohm of curvature over 0.15–1.2 T, which used to put the
// spectral peak at the lower edge and the parabolic interpolation at
// f = −1.25 T. The background in 1/B follows the two-carrier Drude form to
// 1.5 Ohm, and the density must come out at the model's 2.9e11 cm^-2
// (f_B = h n/(2e) = 5.9967 T, [src:AFS1982]) within 2e-3: twice the 1e-3
// that TestSdHRecovery allows for the envelope model on noise-free data, for
// the remaining background error.
func TestSdHParallelConduction(t *testing.T) {
	t.Parallel()
	raw := parallelSweep(t, 1.2e-12)
	sym := symmetrized(t, raw)
	const n = 2.9e15
	for _, d := range []*Dataset{raw, sym} {
		for _, w := range [][2]float64{{0.15, 1.2}, {0.2, 1.2}, {0.3, 1.2}, {0.15, 1.5}} {
			r, err := SdHDensity(d, w[0], w[1], 2)
			if err != nil {
				t.Errorf("%s %g–%g T: %v", d.Name, w[0], w[1], err)
				continue
			}
			if rel := math.Abs(r.Density.Value-n) / n; rel > 2e-3 || len(r.Warnings) != 0 {
				t.Errorf("%s %g–%g T: n = %v m^-2, want %g (rel %.2g); f = %v; warnings %v", d.Name, w[0], w[1], r.Density, n, rel, r.Frequency, r.Warnings)
			}
			if r.BackgroundIn != "1/B" || !strings.Contains(r.Method, "in 1/B") {
				t.Errorf("%s %g–%g T: background in %q (%s), want 1/B", d.Name, w[0], w[1], r.BackgroundIn, r.Method)
			}
		}
	}
}

// TestSdHEdgeIsError: a constant background (degree 0) cannot follow the
// parallel channel's magnetoresistance; the spectrum then peaks at its lower
// edge, and that must be an error that says what to do, not a frequency.
func TestSdHEdgeIsError(t *testing.T) {
	t.Parallel()
	d := parallelSweep(t, 1.2e-12)
	for _, w := range [][2]float64{{0.15, 1.2}, {0.05, 1.5}, {0.1, 0.3}} {
		r, err := SdHDensity(d, w[0], w[1], 2, WithBackground(0))
		if !errors.Is(err, ErrNoOscillation) {
			t.Errorf("%g–%g T: result %+v, error %v; want ErrNoOscillation", w[0], w[1], r, err)
			continue
		}
		for _, s := range []string{"edge of the searched range", "a higher lower end", "background = 0 to 3 in sdh_density"} {
			if !strings.Contains(err.Error(), s) {
				t.Errorf("%g–%g T: error %q does not say %q", w[0], w[1], err, s)
			}
		}
	}
}

// TestSdHFrequencyPositive is a property: over data with and without
// oscillations, every background degree and a spread of windows, SdHDensity
// either fails with ErrNoOscillation or ErrTooFewPoints, or returns a positive
// frequency within one spectral resolution 1/Δ(1/B) of the FFT peak, which
// itself lies inside the searched range.
func TestSdHFrequencyPositive(t *testing.T) {
	t.Parallel()
	wins := [][2]float64{{0.05, 1.5}, {0.1, 0.3}, {0.15, 1.2}, {0.2, 0.6}, {0.3, 1.5}, {0.5, 1.5}, {0.8, 1.5}}
	for _, tq := range []float64{1.2e-12, 1e-16} { // 1e-16 s: no oscillation at all
		d := parallelSweep(t, tq)
		for deg := 0; deg <= 3; deg++ {
			for _, w := range wins {
				r, err := SdHDensity(d, w[0], w[1], 2, WithBackground(deg))
				if err != nil {
					if !errors.Is(err, ErrNoOscillation) && !errors.Is(err, ErrTooFewPoints) {
						t.Errorf("τ_q %g, degree %d, %g–%g T: unexpected error %v", tq, deg, w[0], w[1], err)
					}
					continue
				}
				res := 1/w[0] - 1/w[1]
				f := r.Frequency.Value
				if !(f > 0) || !(r.Density.Value > 0) || math.Abs(f-r.FFTFrequency) > 1/res ||
					r.FFTFrequency < r.FMin || r.FFTFrequency > r.FMax {
					t.Errorf("τ_q %g, degree %d, %g–%g T: f = %v, FFT %g in %g–%g T", tq, deg, w[0], w[1], r.Frequency, r.FFTFrequency, r.FMin, r.FMax)
				}
			}
		}
	}
}

// TestSpectrumMonotonePeak: a pure ramp in u has a spectrum falling from the
// lowest frequency; the peak is then the first bin, with no parabolic shift
// (the old interpolation extrapolated the rising side to a negative f).
func TestSpectrumMonotonePeak(t *testing.T) {
	t.Parallel()
	const m = 400
	u := make([]float64, m)
	y := make([]float64, m)
	for i := range u {
		u[i] = 1 + 4*float64(i)/(m-1)
		y[i] = 50 * u[i] * u[i]
	}
	sp := spectrum(u, y, m, 8, 0)
	df := sp.Freq[1]
	if sp.kp != sp.kmin || !(sp.fpk > 0) || math.Abs(sp.fpk-float64(sp.kmin)*df) > df/2 {
		t.Errorf("peak bin %d (range %d–%d), f = %g T, bin width %g T", sp.kp, sp.kmin, sp.kmax, sp.fpk, df)
	}
}
