package calc

import (
	"math"
	"math/rand/v2"
	"testing"

	"cleave/calc/quantity"
)

// TestDisplayReparses is a property test: what Display writes into a result region, read
// back as a calc expression, gives the same dimension, and a value and uncertainty that
// agree to the precision shown. Values are drawn from a seeded generator.
func TestDisplayReparses(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	units := []string{"T", "cm^-2", "cm^2/(V s)", "meV", "nm", "um", "Ohm", "ps", "K", "m_e", "", "m/s", "s^-1"}
	for i := 0; i < 2000; i++ {
		u := quantity.Unit{Scale: 1}
		if s := units[rng.IntN(len(units))]; s != "" {
			u = quantity.MustUnit(s)
		}
		v := math.Pow(10, rng.Float64()*16-8) * u.Scale
		if rng.IntN(4) == 0 {
			v = -v
		}
		var q quantity.Quantity
		if rng.IntN(2) == 0 {
			q = quantity.New(v, u.D)
		} else {
			q = quantity.Uncertain(v, math.Abs(v)*math.Pow(10, -1-rng.Float64()*4), u.D)
		}
		shown := Display(Q(q))
		back, err := NewEnv().Eval(shown)
		if err != nil {
			t.Fatalf("%s (from %g ± %g %s): %v", shown, q.Value(), q.Uncertainty(), q.Dim(), err)
		}
		bq := back.(Quantity).Q
		if bq.Dim() != q.Dim() {
			t.Fatalf("%s: dimension %s, want %s", shown, bq.Dim(), q.Dim())
		}
		// Exact values are shown to 5 significant figures; uncertain ones to the
		// uncertainty's second digit.
		tol := 6e-5 * math.Abs(q.Value())
		if q.HasUncertainty() {
			tol = 0.06 * q.Uncertainty()
			if d := math.Abs(bq.Uncertainty() - q.Uncertainty()); d > 0.06*q.Uncertainty() {
				t.Errorf("%s: uncertainty %g, want %g", shown, bq.Uncertainty(), q.Uncertainty())
			}
		}
		if d := math.Abs(bq.Value() - q.Value()); d > tol {
			t.Errorf("%s: value %g, want %g", shown, bq.Value(), q.Value())
		}
	}
}
