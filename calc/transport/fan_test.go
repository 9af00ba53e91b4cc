package transport

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

func TestLandauFan(t *testing.T) {
	// [src:W5] (CODATA 2018 h and e): for n = 3.0e11 cm^-2 the filling factor
	// ν is reached at B = n h/(e ν): 12.407 T at ν = 1 and 6.2035 T at ν = 2.
	n := 3e15
	var B, nu []float64
	for _, v := range []float64{2, 4, 6, 8, 10} {
		B = append(B, n*hPl/(qe*v))
		nu = append(nu, v)
	}
	if math.Abs(B[0]-6.2035) > 1e-3 {
		t.Fatalf("B(ν=2) = %g, [src:W5] says 6.2035 T", B[0])
	}
	r, err := LandauFan(B, nu, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Density.Value/n-1) > 1e-9 || math.Abs(r.Intercept.Value) > 1e-9 {
		t.Errorf("n = %g, intercept %g; want %g and 0", r.Density.Value, r.Intercept.Value, n)
	}
	if len(r.Warnings) != 0 {
		t.Errorf("warnings on an exact fan: %v", r.Warnings)
	}

	// Graphene's Berry phase puts the fan's intercept at ν = 2 for ν = 4(N + 1/2)
	// [src:NOVOSELOV2005]: the fit reports it and warns.
	B, nu = nil, nil
	for _, N := range []float64{1, 2, 3, 4, 5} {
		v := 4 * (N + 0.5)
		B = append(B, n*hPl/(qe*(v-2))) // fields of a fan shifted by the phase
		nu = append(nu, v)
	}
	r, err = LandauFan(B, nu, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Intercept.Value-2) > 1e-6 || len(r.Warnings) != 1 || r.Warnings[0].Code != WarnFanIntercept {
		t.Errorf("shifted fan: intercept %g, warnings %v; want 2 and one fan-intercept warning", r.Intercept.Value, r.Warnings)
	}
}

// Field uncertainties are carried to 1/B; the density's uncertainty covers the truth.
func TestLandauFanNoisy(t *testing.T) {
	n := 2.2e15
	hits := 0
	for seed := uint64(1); seed <= 50; seed++ {
		rng := rand.New(rand.NewPCG(seed, 77))
		var B, nu, s []float64
		for _, v := range []float64{4, 6, 8, 10, 12, 14} {
			b := n * hPl / (qe * v)
			sb := 0.002 * b // 0.2 % field readings
			B = append(B, b+sb*rng.NormFloat64())
			nu = append(nu, v)
			s = append(s, sb)
		}
		r, err := LandauFan(B, nu, s)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.Density.Value-n) < 2*r.Density.Uncertainty {
			hits++
		}
	}
	// A residual-scaled covariance from 4 degrees of freedom: expect ≈ 85–95 % within 2σ.
	if hits < 40 {
		t.Errorf("truth within 2σ in %d of 50 seeds", hits)
	}
}

func TestLandauFanErrors(t *testing.T) {
	if _, err := LandauFan([]float64{1, 2}, []float64{2, 4}, nil); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("two points: %v", err)
	}
	if _, err := LandauFan([]float64{1, 2, 3}, []float64{2, 4}, nil); !errors.Is(err, ErrBadArgument) {
		t.Errorf("mismatched: %v", err)
	}
	if _, err := LandauFan([]float64{1, 0, 3}, []float64{2, 4, 6}, nil); !errors.Is(err, ErrBadArgument) {
		t.Errorf("zero field: %v", err)
	}
}
