package demo

import (
	"math"
	"testing"

	"cleave/calc"
	"cleave/notebook"
	"cleave/notebook/compute"
)

// TestFitsRecoverTheModel: the demo's sweeps are generated from known parameters
// (demoSweeps), and the cooldowns' fits, over the windows their calc blocks choose, give them
// back within three standard uncertainties. A window reaching into the fields where the
// oscillation is no longer small against ρ_xx biases the SdH density, the Dingle τ_q and the
// mass by many σ, which is what this guards.
func TestFitsRecoverTheModel(t *testing.T) {
	fsys := withSweeps(t, Scenario())
	nb, err := notebook.Load(fsys)
	if err != nil {
		t.Fatal(err)
	}
	envOf := func(p string) *calc.Env {
		f, ok := nb.File(p)
		if !ok {
			t.Fatalf("no %s in the scenario", p)
		}
		env, err := compute.FileEnv(fsys, nb, f)
		if err != nil {
			t.Fatal(err)
		}
		return env
	}
	const (
		cm2   = 1e4   // m^-2 per cm^-2
		cm2Vs = 1e-4  // m^2/(V s) per cm^2/(V s)
		ps    = 1e-12 // s
		me    = 9.1093837015e-31
	)
	cases := []struct {
		file, name string
		truth      float64 // SI, as demoSweeps generates it
	}{
		{"cooldowns/CD24-001.md", "n_H", 2.6e11 * cm2},
		{"cooldowns/CD24-001.md", "n_SdH", 2.6e11 * cm2},
		{"cooldowns/CD24-001.md", "m_LK", 0.067 * me},
		{"cooldowns/CD24-001.md", "tau_q", 1.5 * ps},
		{"cooldowns/CD24-001.md", "mu", 1.2e6 * cm2Vs}, // with the corrected probe spacing
		{"cooldowns/CD24-002.md", "n_H", 3.3e11 * cm2},
		{"cooldowns/CD24-002.md", "n_SdH", 3.3e11 * cm2},
		{"cooldowns/CD24-002.md", "mu", 1.8e6 * cm2Vs},
		{"cooldowns/CD24-003.md", "n_SdH", 2.9e11 * cm2}, // the 2D gas; the Hall density includes the parallel layer
		{"cooldowns/CD24-004.md", "n_H", 2.2e11 * cm2},
		{"cooldowns/CD24-004.md", "n_SdH", 2.2e11 * cm2},
		{"cooldowns/CD24-004.md", "mu", 2.5e6 * cm2Vs},
	}
	envs := map[string]*calc.Env{}
	for _, c := range cases {
		env := envs[c.file]
		if env == nil {
			env = envOf(c.file)
			envs[c.file] = env
		}
		v, err := env.Eval(c.name)
		if err != nil {
			t.Errorf("%s: %s: %v", c.file, c.name, err)
			continue
		}
		q, ok := v.(calc.Quantity)
		if !ok {
			t.Errorf("%s: %s is %s, not a quantity", c.file, c.name, calc.Display(v))
			continue
		}
		got, sigma := q.Q.Value(), q.Q.Uncertainty()
		if !(sigma > 0) {
			t.Errorf("%s: %s = %g has no uncertainty", c.file, c.name, got)
			continue
		}
		z := math.Abs(got-c.truth) / sigma
		t.Logf("%s: %s = %g ± %g, model %g: %.1f σ", c.file, c.name, got, sigma, c.truth, z)
		if !(z <= 3) {
			t.Errorf("%s: %s = %g ± %g, the model's %g is %.1f σ away", c.file, c.name, got, sigma, c.truth, z)
		}
	}
}
