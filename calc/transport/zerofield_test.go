package transport

import (
	"errors"
	"math"
	"testing"
)

// TestZeroField: the model R_xx at B = 0 is squares/(n e μ) = 5 × 20.805 Ohm
// ([src:W9], [src:W12]: 1/(e·3e15) = 2080.5 Ohm/T, /μ = 100), and R_xy(0)
// equals 0 without pick-up. Tolerance 3σ of the local fit plus 1e-4 relative.
func TestZeroField(t *testing.T) {
	t.Parallel()
	const r0 = 5 * 2080.5 / 100
	cases := []struct {
		name     string
		start    float64
		col      string
		want     float64
		extrap   bool
		noise    float64
		points   int
		wantMore float64 // allowed extra relative error
	}{
		{"both signs, Rxx", -1, "Rxx", r0, false, 0.05, 20, 1e-4},
		{"both signs, Rxy", -1, "Rxy", 0, false, 0.05, 40, 0},
		{"one side from 0", 0, "Rxx", r0, false, 0.05, 20, 1e-4},
		{"one side from 0.05 T", 0.05, "Rxx", r0, true, 0.05, 20, 1e-4},
	}
	for _, c := range cases {
		p := gaas()
		p.BStart, p.Noise, p.Points = c.start, c.noise, 4001
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := ZeroField(d, c.col, WithPoints(c.points))
		if err != nil {
			t.Fatal(err)
		}
		tol := 3*r.Value.Uncertainty + c.wantMore*math.Abs(c.want)
		if math.Abs(r.Value.Value-c.want) > tol || !(r.Value.Uncertainty > 0) {
			t.Errorf("%s: %v, want %g ± %g", c.name, r.Value, c.want, tol)
		}
		if got := hasWarning(r.Warnings, WarnExtrapolated); got != c.extrap {
			t.Errorf("%s: extrapolation warning %v, want %v", c.name, got, c.extrap)
		}
		if r.Points != c.points {
			t.Errorf("%s: %d points", c.name, r.Points)
		}
	}
}

func TestZeroFieldErrors(t *testing.T) {
	t.Parallel()
	d := &Dataset{Name: "short.csv", Columns: []Column{
		{Name: "B", Values: []float64{0, 0.1, math.NaN(), 0.3}},
		{Name: "Rxx", Values: []float64{1, 2, 3, math.NaN()}},
	}}
	if _, err := ZeroField(d, "Rxx"); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("two usable points: %v", err)
	}
	if _, err := ZeroField(d, "Ryy"); !errors.Is(err, ErrUnknownColumn) {
		t.Errorf("unknown column: %v", err)
	}
	if _, err := ZeroField(d, "Rxx", WithField("H")); !errors.Is(err, ErrUnknownColumn) {
		t.Errorf("unknown field column: %v", err)
	}
}
