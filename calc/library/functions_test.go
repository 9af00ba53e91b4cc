package library

import (
	"errors"
	"math"
	"os"
	"sort"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

func evalQ(t *testing.T, e *calc.Env, src string) quantity.Quantity {
	t.Helper()
	v, err := e.Eval(src)
	if err != nil {
		t.Fatalf("Eval(%q): %v", src, err)
	}
	q, ok := v.(calc.Quantity)
	if !ok {
		t.Fatalf("Eval(%q) = %s, want a quantity", src, v.Type())
	}
	return q.Q
}

// TestFunctionsThroughLanguage evaluates the functions as a user writes them and checks the
// worked values. Unless noted, the expected values are W1–W28 of calc/SOURCES.md (a case
// named "W9" is [src:W9]), computed from CODATA 2018 with the closed forms of Ando, Fowler,
// Stern, Rev. Mod. Phys. 54, 437 (1982) and the textbooks listed there. They carry 5-6
// significant figures, so the tolerance is 1e-4 relative.
func TestFunctionsThroughLanguage(t *testing.T) {
	tests := []struct {
		name, expr string
		unit       string
		want       float64
		tol        float64
	}{
		{"W1: l_B at 1 T", "magnetic_length(1 T)", "nm", 25.6556, 1e-5},
		{"W2: l_B at 10 T", "magnetic_length(B=10 T)", "nm", 8.11303, 1e-5},
		{"W3: hbar omega_c GaAs at 1 T", "cyclotron_energy(1 T, GaAs)", "meV", 1.72788, 1e-5},
		{"W3: omega_c GaAs at 1 T", "cyclotron_frequency(1 T, 0.067 m_e)", "s^-1", 2.6251e12, 1e-4},
		{"W3: half of hbar omega_c is the N=0 level", "landau_level(0, 1 T, GaAs.mstar)", "meV", 1.72788 / 2, 1e-5},
		{"W4: nu at 5 T", "filling_factor(3e11 cm^-2, 5 T)", "", 2.4814, 1e-4},
		{"W5: B at nu=1", "field_at_filling(3e11 cm^-2, 1)", "T", 12.407, 1e-4},
		{"W5: B at nu=2", "field_at_filling(3e11 cm^-2, nu=2)", "T", 6.2035, 1e-4},
		{"W6: E_F GaAs", "fermi_energy(3e11 cm^-2, 0.067 m_e)", "meV", 10.719, 1e-4},
		{"W7: k_F", "fermi_wavevector(3e11 cm^-2)", "m^-1", 1.37294e8, 1e-5},
		{"W7: v_F", "fermi_velocity(3e11 cm^-2, GaAs)", "m/s", 2.3723e5, 1e-4},
		{"W9: mobility from rho = 50 Ohm * 100 um/500 um", "mobility(sheet_resistance(50 Ohm, 500 um/100 um), 3e11 cm^-2)", "cm^2/(V s)", 2.0805e6, 1e-4},
		{"W10: tau_t", "transport_time(1e6 cm^2/(V s), 0.067 m_e)", "ps", 38.094, 1e-4},
		{"W11: mean free path", "mean_free_path(1e6 cm^2/(V s), 3e11 cm^-2)", "um", 9.0368, 1e-4},
		{"W13: van der Pauw symmetric", "vdp_sheet_resistance(10 Ohm, 10 Ohm)", "Ohm", 45.3236, 1e-5},
		{"W14: van der Pauw 10/20", "vdp_sheet_resistance(10 Ohm, 20 Ohm)", "Ohm", 65.285, 1e-4},
		{"W15: SdH frequency", "sdh_frequency(3e11 cm^-2)", "T", 6.2035, 1e-4},
		{"W18: Zeeman, |g| = 0.44", "zeeman_energy(1 T, 0.44)", "ueV", 25.469, 1e-4},
		{"W19: R_K/2", "hall_resistance(2)", "Ohm", 12906.403730, 1e-9},
		{"W26: graphene N=1 at 1 T", "dirac_landau_level(1, 1 T, graphene)", "meV", 36.283, 1e-4},
		{"W26: graphene N=1 at 10 T", "dirac_landau_level(1, 10 T, 1e6 m/s)", "meV", 114.74, 1e-4},
		{"W27: Si(100) E_F with gv=2", "fermi_energy(1e12 cm^-2, 0.19 m_e, gv=2)", "meV", 6.2997, 1e-4},
		{"W28: Ge holes E_F", "fermi_energy(2.2e11 cm^-2, 0.061 m_e)", "meV", 8.6337, 1e-4},
		{"W12: Hall density from a 2080.5 Ohm/T slope", "density_from_slope(2080.5 Ohm/T)", "cm^-2", 3.0000e11, 1e-4},
		{"sqrt of an area", "sqrt(16 um^2)", "um", 4, 1e-15},
		{"ln of e^2 (math)", "ln(exp(2))", "", 2, 1e-15},
		{"log10", "log10(1e5)", "", 5, 1e-15},
		{"abs", "abs(-3 T)", "T", 3, 0},
		{"min of list", "min([3 T, 1 T, 2 T])", "T", 1, 0},
		{"max of args", "max(3 T, 1 T, 2 T)", "T", 3, 0},
		{"mean", "mean(1 T, 2 T, 6 T)", "T", 3, 1e-15},
		// Absolute temperatures in °C: the mean is meaningful (T/K = t/°C + 273.15, [src:SI2019]).
		{"mean of °C", "mean(580 °C, 600 °C, 610 °C)", "°C", 596.66666666666667, 1e-13},
		{"min of °C", "min(580 °C, 600 °C)", "K", 853.15, 1e-15},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q := evalQ(t, NewEnv(), tc.expr)
			u := quantity.Unit{Scale: 1}
			if tc.unit != "" {
				u = quantity.MustUnit(tc.unit)
			}
			got, err := q.In(u)
			if err != nil {
				t.Fatalf("%s in %s: %v", tc.expr, tc.unit, err)
			}
			if !testutil.WithinRel(got, tc.want, tc.tol) {
				t.Errorf("%s = %.8g %s, want %.8g (tol %g)", tc.expr, got, tc.unit, tc.want, tc.tol)
			}
		})
	}
}

// TestMeanKeepsCorrelations: mean propagates uncertainties with their correlations (GUM,
// JCGM 100:2008, eq. 13), each literal an independent input.
func TestMeanKeepsCorrelations(t *testing.T) {
	e := NewEnv()
	for i, l := range []string{"x = 5 ± 0.1 T", "y = 5 ± 0.1 T"} {
		if r := e.EvalLine(l, i+1); r.Err != nil {
			t.Fatalf("%s: %v", l, r.Err)
		}
	}
	tests := []struct {
		expr     string
		val, unc float64
	}{
		{"mean(x, x)", 5, 0.1},              // correlated mean keeps sigma
		{"mean(x, y)", 5, 0.1 / math.Sqrt2}, // independent: sigma/sqrt(2)
	}
	for _, tc := range tests {
		q := evalQ(t, e, tc.expr)
		if !testutil.WithinRel(q.Value(), tc.val, 1e-12) || !testutil.WithinRel(q.Uncertainty(), tc.unc, 1e-12) {
			t.Errorf("%s = %g ± %g T, want %g ± %g", tc.expr, q.Value(), q.Uncertainty(), tc.val, tc.unc)
		}
	}
}

// TestFunctionErrors checks the positions and sentinels of errors in calls of library
// functions: the evaluator's dimension and argument checks with the library's parameters,
// and data()'s refusals at its argument.
func TestFunctionErrors(t *testing.T) {
	tests := []struct {
		line     string
		col      int
		sentinel error
	}{
		{"magnetic_length(5 m)", 17, quantity.ErrDimMismatch},
		{"magnetic_length(1 T, m=2)", 22, calc.ErrArgument},
		{"fermi_energy(3e11 cm^-2)", 1, calc.ErrArgument},
		{"magnetic_length(1 T, 2 T)", 22, calc.ErrArgument},
		{`data(5)`, 6, calc.ErrType},
		{`data("x.csv")`, 6, nil},
		{`data("/etc/passwd")`, 6, calc.ErrPath},
		{"sdh_frequency(3e11 cm^-2, gs=1.5)", 27, calc.ErrArgument},
		{"sqrt(2 m)", 6, nil},
		{"ln(0)", 4, nil},
		{"min()", 1, calc.ErrArgument},
		{"mean(1 T, 2 K)", 11, quantity.ErrDimMismatch}, // at the last of the gathered arguments,
		{`material("Unobtainium")`, 10, nil},
	}
	for _, tc := range tests {
		r := NewEnv().EvalLine(tc.line, 4)
		var ce *calc.Error
		if !errors.As(r.Err, &ce) {
			t.Errorf("%q: err = %v, want *calc.Error", tc.line, r.Err)
			continue
		}
		if ce.Line != 4 || ce.Col != tc.col {
			t.Errorf("%q: at %d:%d, want 4:%d (%v)", tc.line, ce.Line, ce.Col, tc.col, ce)
		}
		if tc.sentinel != nil && !errors.Is(r.Err, tc.sentinel) {
			t.Errorf("%q: %v is not %v", tc.line, r.Err, tc.sentinel)
		}
		if r.Display == "" || r.Value != nil {
			t.Errorf("%q: an error must show in the result region and give no value", tc.line)
		}
	}
}

// TestAll checks the library's list: every function once, with a doc line, and the set the
// README and LANGUAGE.md describe.
func TestAll(t *testing.T) {
	var names []string
	seen := map[string]bool{}
	for _, f := range All() {
		if seen[f.Name] {
			t.Errorf("%s is registered twice", f.Name)
		}
		seen[f.Name] = true
		if strings.TrimSpace(f.Doc) == "" {
			t.Errorf("%s has no Doc", f.Name)
		}
		if f.Call == nil {
			t.Errorf("%s has no Call", f.Name)
		}
		names = append(names, f.Name)
	}
	sort.Strings(names)
	want := []string{
		"abs", "al_fraction", "antisymmetrize", "arrhenius_fit", "bohr_radius", "cell_calibration",
		"cell_density", "cell_flux", "check_sweep", "compare_densities", "contact_resistance",
		"corbino_conductance", "corbino_sigma", "cos", "cyclotron_energy", "cyclotron_frequency", "data",
		"delta_density", "density_from_slope", "density_of_states", "dingle_factor",
		"dingle_temperature", "dirac_fermi_energy", "dirac_landau_level", "dose", "etch_depth",
		"etch_rate", "exp", "expected_density", "fermi_energy", "fermi_velocity", "fermi_wavevector",
		"field_at_filling", "filling_factor", "gate_capacitance", "growth_check", "hall_density",
		"hall_pairs", "hall_resistance", "landau_fan", "landau_level", "lk_mass", "ln", "log10",
		"magnetic_length", "material", "max", "mean", "mean_free_path", "metal_thickness", "min",
		"mobility", "mobility_power_law", "monolayer", "plateaus", "quantum_lifetime",
		"quantum_mobility", "rheed_rate", "sdh_density", "sdh_frequency", "sheet_resistance", "sin",
		"split_sweep", "sqrt", "squares", "symmetrize", "tanh", "thermal_damping", "tlm",
		"transport_time", "vdp_contacts", "vdp_hall_density", "vdp_sheet_resistance", "zeeman_energy",
		"zero_field",
	}
	if strings.Join(names, " ") != strings.Join(want, " ") {
		t.Errorf("All() has\n%v\nwant\n%v", names, want)
	}
	// NewEnv installs them all.
	if got := len(NewEnv().Funcs()); got != len(want) {
		t.Errorf("NewEnv has %d functions, want %d", got, len(want))
	}
}

// TestDocumented: every function is named in the README or in calc/LANGUAGE.md, the two
// places a user looks for it.
func TestDocumented(t *testing.T) {
	var docs strings.Builder
	for _, p := range []string{"../../README.md", "../LANGUAGE.md"} {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		docs.Write(b)
	}
	for _, f := range All() {
		if !strings.Contains(docs.String(), "`"+f.Name) {
			t.Errorf("%s is in neither README.md nor calc/LANGUAGE.md", f.Name)
		}
	}
}
