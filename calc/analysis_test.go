package calc

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"testing/fstest"

	"cleave/calc/transport"
)

// sweepFile writes a synthetic sweep (transport.Sweep: Drude transport and the low-field
// oscillating magnetoresistance with Lifshitz–Kosevich and Dingle damping) as CSV.
func sweepFile(t *testing.T, p transport.SweepParams, meta ...string) []byte {
	t.Helper()
	d, err := transport.Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	d.Meta = nil
	for i := 0; i+1 < len(meta); i += 2 {
		d.Meta = append(d.Meta, transport.KV{Key: meta[i], Value: meta[i+1]})
	}
	var b bytes.Buffer
	if err := transport.WriteCSV(&b, d); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// analysisEnv is an environment over a notebook folder holding synthetic data with known
// density 2.6e11 cm^-2, mobility 1.2e6 cm^2/(V s), m* = 0.067 m_e and tau_q = 1.5 ps.
func analysisEnv(t *testing.T) *Env {
	t.Helper()
	base := transport.SweepParams{Density: 2.6e15, Mobility: 120, MassRatio: 0.067, QuantumLifetime: 1.5e-12,
		Temperature: 0.3, Squares: 5, Noise: 0.05}
	fsys := fstest.MapFS{}
	pm := base
	pm.BStart, pm.BEnd, pm.Points, pm.Seed, pm.Pickup = -1.5, 1.5, 6001, 1, 0.02
	fsys["data/pm.csv"] = &fstest.MapFile{Data: sweepFile(t, pm, "T", "0.30 K")}
	for i, T := range []float64{0.3, 0.8, 1.5, 2.5, 4.2} {
		q := base
		q.Temperature, q.BStart, q.BEnd, q.Points, q.Seed = T, 0, 1.2, 4001, uint64(10+i)
		fsys[fmt.Sprintf("data/T%d.csv", i)] = &fstest.MapFile{Data: sweepFile(t, q, "T", fmt.Sprintf("%g K", T))}
	}
	qh := base
	qh.Temperature, qh.BStart, qh.BEnd, qh.Points, qh.Seed, qh.Plateaus, qh.QuantumLifetime = 0.03, 0, 9, 9001, 3, true, 3e-12
	fsys["data/qh.csv"] = &fstest.MapFile{Data: sweepFile(t, qh, "T", "30 mK")}
	return NewEnv(WithFS(fsys, "."))
}

func value(t *testing.T, e *Env, expr string) Quantity {
	t.Helper()
	v, err := e.Eval(expr)
	if err != nil {
		t.Fatalf("%s: %v", expr, err)
	}
	q, ok := v.(Quantity)
	if !ok {
		t.Fatalf("%s: %s, not a quantity", expr, Display(v))
	}
	return q
}

// TestAnalysesRecoverTruth runs every analysis through the language on synthetic data and
// checks it recovers the model's parameters. Tolerances: the noise (0.05 Ohm on ~100–1000 Ohm)
// makes the statistical errors tiny, so they are set by the methods' own biases, which the
// transport package's tests bound (Hall 1 %, SdH 1 %, LK mass 0.5 %, tau_q 3 %).
func TestAnalysesRecoverTruth(t *testing.T) {
	e := analysisEnv(t)
	lines := []string{
		`d = symmetrize(data("data/pm.csv"))`,
		`hall = hall_density(d, 0.05 T .. 0.5 T)`,
		`sdh = sdh_density(d, 0.15 T .. 1.2 T)`,
		`rho = sheet_resistance(zero_field(d, "Rxx"), 5)`,
		`mu = mobility(rho, hall.n)`,
		`sweeps = [data("data/T0.csv"), data("data/T1.csv"), data("data/T2.csv"), data("data/T3.csv"), data("data/T4.csv")]`,
		`lk = lk_mass(sweeps, 0.3 T .. 1.0 T)`,
		`lk2 = lk_mass(sweeps, 0.3 T .. 1.0 T, T = [0.3 K, 0.8 K, 1.5 K, 2.5 K, 4.2 K])`,
		`tq = quantum_lifetime(d, 0.2 T .. 0.8 T, GaAs, sdh.n, mu = mu)`,
		`qh = plateaus(data("data/qh.csv"), n = 2.6e11 cm^-2)`,
	}
	for i, l := range lines {
		if r := e.EvalLine(l, i+1); r.Err != nil {
			t.Fatalf("line %d %q: %v", i+1, l, r.Err)
		}
	}
	checks := []struct {
		expr      string
		want, tol float64
	}{
		{"hall.n", 2.6e15, 0.01},
		{"sdh.n", 2.6e15, 0.01},
		{"mu", 120, 0.01},
		{"lk.mass_ratio", 0.067, 0.005},
		{"lk2.mass_ratio", 0.067, 0.005},
		{"tq.tau_q", 1.5e-12, 0.03},
		// tau_t = mu m*/e (REFERENCE §2.5) and the Dingle ratio tau_t/tau_q with the truth above.
		{"tq.dingle_ratio", 120 * 0.067 * 9.1093837015e-31 / 1.602176634e-19 / 1.5e-12, 0.04},
	}
	for _, c := range checks {
		q := value(t, e, c.expr)
		if got := q.Q.Value(); math.Abs(got/c.want-1) > c.tol {
			t.Errorf("%s = %g, want %g within %g", c.expr, got, c.want, c.tol)
		}
	}
	if v, _ := e.Eval("hall.carriers"); Display(v) != `"electrons"` {
		t.Errorf("carriers = %s", Display(v))
	}
	// The plateau model is spin-degenerate: even filling factors, each within 1e-3 of R_K/nu.
	if v, _ := e.Eval("qh"); !strings.HasPrefix(Display(v), "nu = ") || strings.Contains(Display(v), "warning") {
		t.Errorf("plateaus: %s", Display(v))
	}
	if dev := value(t, e, "qh.max_deviation"); dev.Q.Value() > 1e-3 {
		t.Errorf("plateau deviation %g > 1e-3 (REFERENCE §6)", dev.Q.Value())
	}
}

func TestClosedFormAnalyses(t *testing.T) {
	e := NewEnv()
	tests := []struct {
		expr      string
		want, tol float64
	}{
		// REFERENCE §5 row 24: d = 100 nm, eps_r = 12.9 gives C = 114.22 nF/cm^2 =
		// 1.1422e-3 F/m^2 and dn/dV = 7.1290e11 cm^-2/V; the line through these points has them.
		{"gate_capacitance([0.1 V, 0.2 V, 0.3 V, 0.4 V], [0.71290e11 cm^-2, 1.42580e11 cm^-2, 2.13870e11 cm^-2, 2.85160e11 cm^-2]).C", 1.1422e-3, 1e-4},
		{"gate_capacitance([0.1 V, 0.2 V, 0.3 V, 0.4 V], [0.71290e11 cm^-2, 1.42580e11 cm^-2, 2.13870e11 cm^-2, 2.85160e11 cm^-2]).threshold", 0, 1e-9},
		// Row 12: a Hall slope of 2080.5 Ohm/T is n = 3.0000e11 cm^-2; from ±B readings at 1 T.
		{"vdp_hall_density(1 T, 2080.5 Ohm, -2080.5 Ohm).n", 3e15, 1e-4},
		// Row 5: nu = 2 at 6.2035 T and nu = 1 at 12.407 T for n = 3e11 cm^-2.
		{"landau_fan([12.407 T, 6.2035 T, 4.1357 T], [1, 2, 3]).n", 3e15, 1e-4},
		// mu ∝ n^1.5 exactly.
		{"mobility_power_law([1e11 cm^-2, 2e11 cm^-2, 4e11 cm^-2], [1e6 cm^2/(V s), 2.8284271e6 cm^2/(V s), 8e6 cm^2/(V s)]).alpha", 1.5, 1e-6},
	}
	for _, c := range tests {
		q := value(t, e, c.expr)
		got := q.Q.Value()
		if c.want == 0 {
			if math.Abs(got) > c.tol {
				t.Errorf("%s = %g, want 0", c.expr, got)
			}
		} else if math.Abs(got/c.want-1) > c.tol {
			t.Errorf("%s = %g, want %g", c.expr, got, c.want)
		}
	}
}

func TestAnalysisArgumentErrors(t *testing.T) {
	e := analysisEnv(t)
	e.EvalLine(`d = data("data/pm.csv")`, 1)
	tests := []struct{ line, want string }{
		{`hall_density(d, 0 V .. 1 V)`, "magnetic field"},
		{`hall_density(3 T, 0 T .. 1 T)`, "expected a data set"},
		{`hall_density(d, 0.05 T .. 0.5 T, y = "Rzz")`, "Rzz"},
		{`sdh_density(d, 0.15 T .. 1.2 T, gs = 1.5)`, "whole number"},
		{`compare_densities(1, 2)`, "hall_density"},
		{`lk_mass([d, 3 T], 0.3 T .. 1 T)`, "item 2"},
		{`lk_mass([d, d], 0.3 T .. 1 T, T = [1 K])`, "1 temperatures for 2"},
		{`quantum_lifetime(d, 0.2 T .. 0.8 T, GaAs, 3 T)`, "n"},
		{`landau_fan([1 T, 2 T], [2, 4])`, "at least 3"},
		{`hall_density(d, 1.4 T .. 1.4006 T)`, "points"},
	}
	for i, tc := range tests {
		r := e.EvalLine(tc.line, i+2)
		var ce *Error
		if r.Err == nil || !errors.As(r.Err, &ce) || !strings.Contains(r.Err.Error(), tc.want) {
			t.Errorf("%s: error %v, want a positioned error mentioning %q", tc.line, r.Err, tc.want)
		}
	}
}

// expected_density on a delta-doped stack with illustrative inputs (Al0.3Ga0.7As, a Si sheet
// 30 nm above the interface, under a 50 nm barrier and cap with a pinned surface, on a 1 µm
// buffer over a semi-insulating substrate): deeper donors leave fewer electrons in the well
// (Stern, Appl. Phys. Lett. 43, 974 (1983): n falls as E_D' rises), and the self-consistent
// and analytic densities stay within 10 % of each other.
func TestExpectedDensityDonorDepth(t *testing.T) {
	e := NewEnv()
	stack := layerTable([][4]string{
		{"cap", "GaAs", "10 nm", ""},
		{"barrier", "Al0.3Ga0.7As", "50 nm", ""},
		{"delta", "Al0.3Ga0.7As", "1 nm", "Si delta 2.5e12 cm^-2"},
		{"spacer", "Al0.3Ga0.7As", "30 nm", ""},
		{"channel", "GaAs", "1 um", "C 1e14 cm^-3"},
	})
	e.Set("layers", stack)
	prev := math.Inf(1)
	for _, d := range []string{"0.03 eV", "0.06 eV", "0.1 eV", "0.15 eV"} {
		v, err := e.Eval("expected_density(layers, donor_depth = " + d + ")")
		if err != nil {
			t.Fatalf("donor_depth %s: %v", d, err)
		}
		r := v.(*Result)
		n := fieldValue(t, r, "n")
		an := fieldValue(t, r, "analytic")
		if !(n < prev) {
			t.Errorf("donor_depth %s: n = %g, not below %g", d, n, prev)
		}
		if math.Abs(an/n-1) > 0.1 {
			t.Errorf("donor_depth %s: analytic %g vs self-consistent %g", d, an, n)
		}
		prev = n
	}
	if _, err := e.Eval("expected_density(layers, donor_depth = -0.1 eV)"); err == nil {
		t.Error("a negative donor depth was accepted")
	}
}

// layerTable builds a layer table as the notebook gives it: rows with layer, material,
// thickness and doping.
func layerTable(rows [][4]string) List {
	var l List
	for _, r := range rows {
		l = append(l, NewRecord("", "layer", String(r[0]), "material", String(r[1]), "thickness", String(r[2]), "doping", String(r[3])))
	}
	return l
}

func fieldValue(t *testing.T, r *Result, name string) float64 {
	t.Helper()
	v, ok := r.Field(name)
	if !ok {
		t.Fatalf("no field %s in %s", name, r.Display())
	}
	return v.(Quantity).Q.Value()
}
