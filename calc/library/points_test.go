package library

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/calc/transport"
)

func mustEval(t *testing.T, e *calc.Env, expr string) calc.Value {
	t.Helper()
	v, err := e.Eval(expr)
	if err != nil {
		t.Fatalf("%s: %v", expr, err)
	}
	return v
}

// Every fit exports its points and fitted curve: the table reads back with the same rows,
// and the fitted column reproduces the fit (for a straight line, the fitted values lie on
// one line whose slope is the result's).
func TestPoints(t *testing.T) {
	e := analysisEnv(t)
	e.Set("d", mustEval(t, e, `symmetrize(data("data/pm.csv"))`))
	for _, c := range []struct {
		expr    string
		columns string
		rows    int // 0: any number > 3
	}{
		{`hall_density(d, 0.05 T .. 0.5 T)`, "B,Rxy,Rxy_fit", 0},
		{`sdh_density(d, 0.15 T .. 1.2 T)`, "f,amplitude", 0},
		{`quantum_lifetime(d, 0.2 T .. 0.8 T, GaAs.mstar, 2.6e11 cm^-2)`, "B,inv_B,dingle,sigma,dingle_fit", 0},
		{`lk_mass([data("data/T0.csv"), data("data/T1.csv"), data("data/T2.csv"), data("data/T3.csv"), data("data/T4.csv")], 0.3 T .. 1.0 T)`, "B,T,A,sigma_A,A_fit", 0},
		{`landau_fan([1.077 T, 1.346 T, 1.795 T], [10, 8, 6])`, "B,sigma_B,inv_B,nu,nu_fit", 3},
		{`gate_capacitance([0 V, 0.1 V, 0.2 V], [2e11 cm^-2, 2.5e11 cm^-2, 3.05e11 cm^-2])`, "Vg,n,sigma_n,n_fit", 3},
		{`mobility_power_law([1e11 cm^-2, 2e11 cm^-2, 4e11 cm^-2], [1e5 cm^2/(V s), 1.8e5 cm^2/(V s), 3.3e5 cm^2/(V s)])`, "n,mu,mu_fit", 3},
	} {
		v := mustEval(t, e, c.expr)
		d, err := Points(v)
		if err != nil {
			t.Errorf("%s: %v", c.expr, err)
			continue
		}
		var names []string
		for _, col := range d.Columns {
			names = append(names, col.Name)
		}
		if got := strings.Join(names, ","); got != c.columns {
			t.Errorf("%s: columns %s, want %s", c.expr, got, c.columns)
		}
		if c.rows > 0 && d.Len() != c.rows || d.Len() < 3 {
			t.Errorf("%s: %d rows", c.expr, d.Len())
		}
		var b bytes.Buffer
		if err := transport.WriteCSV(&b, d); err != nil {
			t.Fatalf("%s: %v", c.expr, err)
		}
		back, err := transport.Read("points.csv", &b)
		if err != nil {
			t.Fatalf("%s: reading back: %v", c.expr, err)
		}
		if back.Len() != d.Len() || len(back.Columns) != len(d.Columns) {
			t.Errorf("%s: read back %d×%d, wrote %d×%d", c.expr, back.Len(), len(back.Columns), d.Len(), len(d.Columns))
		}
		for i, col := range d.Columns {
			for r, x := range col.Values {
				y := back.Columns[i].Values[r]
				if !(math.IsNaN(x) && math.IsNaN(y)) && math.Abs(x-y) > 1e-12*math.Abs(x) {
					t.Fatalf("%s: column %s row %d: %g read back as %g", c.expr, col.Name, r, x, y)
				}
			}
		}
	}
	// The Hall fit's fitted column is the line slope·B + intercept of the result.
	h := mustEval(t, e, `hall_density(d, 0.05 T .. 0.5 T)`)
	d, _ := Points(h)
	slope := mustEval(t, e, `hall_density(d, 0.05 T .. 0.5 T).slope`)
	s := d.Columns[2]
	b := d.Columns[0]
	got := (s.Values[len(s.Values)-1] - s.Values[0]) / (b.Values[len(b.Values)-1] - b.Values[0])
	if want := slope.(calc.Quantity).Q.Value(); math.Abs(got-want)/math.Abs(want) > 1e-9 {
		t.Errorf("fitted slope %g, result's %v", got, slope)
	}
	if _, err := Points(mustEval(t, e, `3 T`)); err == nil || !strings.Contains(err.Error(), "needs a data set") {
		t.Errorf("a quantity: %v", err)
	}
	if _, err := Points(mustEval(t, e, `compare_densities(hall_density(d, 0.05 T .. 0.5 T), sdh_density(d, 0.15 T .. 1.2 T))`)); err == nil || !strings.Contains(err.Error(), "no points") {
		t.Errorf("a comparison: %v", err)
	}
}
