package transport

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// TestParallelPlateW24: d = 100 nm, ε_r = 12.9 (GaAs, [src:IOFFE1996]):
// C = 114.22 nF/cm² = 1.1422e-3 F/m², dn/dV = 7.1290e11 cm^-2/V, n = 3.5645e11
// cm^-2 at V_g − V_th = 0.5 V ([src:W24], CODATA 2018 ε_0 and e).
func TestParallelPlateW24(t *testing.T) {
	t.Parallel()
	c := ParallelPlateCapacitance(12.9, 100e-9)
	for _, k := range []struct {
		name      string
		got, want float64
	}{
		{"C", c, 1.1422e-3},
		{"dn/dV", c / qe, 7.1290e15},
		{"n at 0.5 V", c * 0.5 / qe, 3.5645e15},
	} {
		if math.Abs(k.got-k.want) > 1e-4*k.want {
			t.Errorf("%s = %.6g, want %.6g", k.name, k.got, k.want)
		}
	}
}

// TestGateCapacitanceRecovery: synthetic n = C(V_g − V_th)/e with the row-24
// capacitance, V_th = −0.35 V and 2e13 m^-2 (2e9 cm^-2) Gaussian noise on n;
// C and V_th within 4σ and the σ below 0.5 % and 5 mV (20 points over 0.8 V).
func TestGateCapacitanceRecovery(t *testing.T) {
	t.Parallel()
	C := ParallelPlateCapacitance(12.9, 100e-9)
	rng := rand.New(rand.NewPCG(11, 12))
	var vg, n []float64
	for i := 0; i < 20; i++ {
		v := -0.3 + 0.04*float64(i)
		vg = append(vg, v)
		n = append(n, C*(v+0.35)/qe+2e13*rng.NormFloat64())
	}
	r, err := GateCapacitance(vg, n, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Capacitance.Value-C) > 4*r.Capacitance.Uncertainty || r.Capacitance.Uncertainty > 0.005*C {
		t.Errorf("C = %v, want %g", r.Capacitance, C)
	}
	if math.Abs(r.Threshold.Value+0.35) > 4*r.Threshold.Uncertainty || r.Threshold.Uncertainty > 5e-3 {
		t.Errorf("V_th = %v, want -0.35", r.Threshold)
	}
	if len(r.Warnings) != 0 {
		t.Errorf("warnings %v", r.Warnings)
	}
	// A density that saturates above 0.2 V bends the line.
	for i, v := range vg {
		if v > 0.2 {
			n[i] = C*(0.55+0.2*(v-0.2))/qe + 2e13*rng.NormFloat64()
		}
	}
	r, err = GateCapacitance(vg, n, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r.Warnings, WarnGateCurvature) {
		t.Errorf("no curvature warning: %v", r.Warnings)
	}
}

// TestMobilityPowerLaw: μ = 50 m^2/(V s)·(n/1e15)^α·exp(0.02 N(0,1)) for
// α = 1.5 and 0.7 (remote-impurity and flatter regimes; [src:DSH2013]);
// α within 4σ, σ < 0.05.
func TestMobilityPowerLaw(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(3, 4))
	for _, alpha := range []float64{1.5, 0.7} {
		var n, mu []float64
		for i := 0; i < 15; i++ {
			d := 5e14 * math.Pow(1.15, float64(i))
			n = append(n, d)
			mu = append(mu, 50*math.Pow(d/1e15, alpha)*math.Exp(0.02*rng.NormFloat64()))
		}
		// A point outside the range that breaks the law must be ignored.
		n = append(n, 1e17)
		mu = append(mu, 1)
		r, err := MobilityPowerLaw(n, mu, 0, 1e16)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.Alpha.Value-alpha) > 4*r.Alpha.Uncertainty || r.Alpha.Uncertainty > 0.05 || r.Points != 15 {
			t.Errorf("α = %v (%d points), want %g", r.Alpha, r.Points, alpha)
		}
		want := 50 * math.Pow(r.NRef/1e15, alpha)
		if math.Abs(r.Prefactor.Value-want) > 4*r.Prefactor.Uncertainty+0.01*want {
			t.Errorf("μ(n_ref) = %v, want %g", r.Prefactor, want)
		}
	}
}

func TestGateErrors(t *testing.T) {
	t.Parallel()
	if _, err := GateCapacitance([]float64{1, 2}, []float64{1, 2, 3}, nil); !errors.Is(err, ErrBadArgument) {
		t.Errorf("length mismatch: %v", err)
	}
	if _, err := GateCapacitance([]float64{1, 2}, []float64{1, 2}, nil); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("two points: %v", err)
	}
	if _, err := GateCapacitance([]float64{1, 2, math.NaN()}, []float64{1, 2, 3}, nil); !errors.Is(err, ErrBadArgument) {
		t.Errorf("NaN: %v", err)
	}
	if _, err := GateCapacitance([]float64{1, 2, 3}, []float64{5, 5, 5}, nil); !errors.Is(err, ErrBadArgument) {
		t.Errorf("flat: %v", err)
	}
	if _, err := MobilityPowerLaw([]float64{1, 2, 3}, []float64{1, 2}, 0, 10); !errors.Is(err, ErrBadArgument) {
		t.Errorf("length mismatch: %v", err)
	}
	if _, err := MobilityPowerLaw([]float64{1, 2, 3}, []float64{1, -2, 3}, 0, 10); !errors.Is(err, ErrBadArgument) {
		t.Errorf("negative mobility: %v", err)
	}
	if _, err := MobilityPowerLaw([]float64{1, 2, 30}, []float64{1, 2, 3}, 0, 10); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("two in range: %v", err)
	}
	if _, err := MobilityPowerLaw([]float64{1, 2, 3}, []float64{1, 2, 3}, 5, 1); !errors.Is(err, ErrBadArgument) {
		t.Errorf("reversed range: %v", err)
	}
}
