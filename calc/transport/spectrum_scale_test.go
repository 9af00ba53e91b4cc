package transport

import (
	"math"
	"testing"
)

// TestSpectrumAmplitudeScale pins the documented scale of the SdH spectrum: a pure sinusoid
// of amplitude A in 1/B peaks at A (Ohm) under the Hann window, because the spectrum is
// divided by the window's coherent gain (the sum of its weights) and doubled for the
// one-sided spectrum: for w_i = sin²(π i/(m−1)), Σ w_i ≈ m/2 (a property of the Hann window,
// e.g. Harris, Proc. IEEE 66, 51 (1978), coherent gain 0.50). The edge-peak and noise checks
// compare amplitudes on this scale, so a change of scale (dropping the window but not its
// gain, or the factor 2) must fail here.
func TestSpectrumAmplitudeScale(t *testing.T) {
	const m = 1024
	for _, tc := range []struct {
		amp, periods float64
	}{
		{2, 20}, {0.5, 37}, {7, 64},
	} {
		u := make([]float64, m)
		y := make([]float64, m)
		U := 1.0 // 1/T over the window
		f := tc.periods / U
		for i := range u {
			u[i] = float64(i) * U / float64(m-1)
			y[i] = tc.amp * math.Cos(2*math.Pi*f*u[i])
		}
		sp := spectrum(u, y, m, 8, 0)
		peak := 0.0
		for k := sp.kmin; k <= sp.kmax; k++ {
			peak = math.Max(peak, sp.Amp[k])
		}
		if math.Abs(peak/tc.amp-1) > 0.02 {
			t.Errorf("amplitude %g, %g periods: spectrum peaks at %g, want %g within 2 %%", tc.amp, tc.periods, peak, tc.amp)
		}
		if math.Abs(sp.fpk-f) > 0.5*f/tc.periods {
			t.Errorf("amplitude %g: peak at %g T, want %g T", tc.amp, sp.fpk, f)
		}
	}
}
