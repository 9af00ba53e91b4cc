package library

import (
	"errors"
	"io/fs"
	"strings"
	"testing"
	"testing/fstest"
	"unicode/utf8"

	"cleave/calc"
	"cleave/calc/quantity"
)

var evalSeeds = []string{
	"x = 5 ± 0.1 T", "x - x", "fermi_energy(3e11 cm^-2, GaAs, gs=1)", "magnetic_length(0 T)",
	"landau_level(-3, 1 T, GaAs)", "dirac_landau_level(-2, 9 T, graphene)", "1 / 0", "0 ^ -1",
	"(-8)^(1/3)", "sqrt(2 m)", "ln(0)", "exp(1000)", `data("../x")`, `data("raw/a.csv").hash`,
	"device.width * 2", "vdp_sheet_resistance(0 Ohm, 0 Ohm)", "vdp_sheet_resistance(-1 Ohm, 5 Ohm)",
	"hall_resistance(0)", "filling_factor(3e11 cm^-2, -5 T)", "mean([])", "min(1 T, [2 T])",
	"1e308 * 1e308", "3.07(4)e400 cm^-2", "0.067 m_e -> meV", "[1, 2] -> T", "GaAs -> T",
	"Al1.5Ga-0.5As.mstar", "sdh_frequency(3e11 cm^-2, gs=0)", "E = 2 meV -> ueV",
	// the grammar's corners, as the parser's seeds have them
	"12.5 um ± 200 nm", "3.07(4)e11 cm^-2", "-x^2", "0 T .. 0.5 T", "[1, 2, [3]]",
	`fermi_energy(n, m=GaAs.mstar, gs=1)`, "E_F -> meV", "5 T / B", "(3.070 ± 0.040)e11 cm^-2",
	"Si(100).gv", `hall_density(data("raw/a.csv"), 0 T .. 1 T)`, `symmetrize(data("raw/a.csv"))`,
	`material("GaAs").mstar`, "expected_density([])", "landau_fan([1 T], [1])",
	// issue 11: layouts, sweeps, shapes, indexing
	`data("raw/a.csv", layout = "lockin")`, `data("raw/a.csv", layout = "../x")`, `data("raw/a.csv", offset = 2 mT)`,
	`split_sweep(data("raw/a.csv"))`, `check_sweep(data("raw/a.csv"))`, `split_sweep(data("raw/a.csv")).up`,
	"[1, 2][-1]", "[1][5]", `device["width"]`, "device.mask[0]", "squares()", "corbino_sigma(1 mS, 1 um, 0 um)",
	"vdp_contacts()", "1 meV -> K", "2 tesla", "1e6 cm^2/Vs", "fermi_energy(1e12 cm^-2, Si)", "fermi_energy(1e12 cm^-2, graphene)",
	// temperatures in °C and growth units
	"-20 °C", "20 °C + 30 °C", "2*(20 °C)", "(115 °C - 110 °C) -> degC", "mean(580 °C, 600 °C)",
	"0.8 ML(GaAs)/s", "ML(Al(0.3)Ga(0.7)As)", "5 ML(GaAs", "4000 rpm * 2", "1 ℃ -> K",
	// fabrication and growth
	"tlm([5 um, 10 um, 20 um], [60 Ohm, 110 Ohm, 210 Ohm], 100 um)", `tlm("TLM-A", [1 Ohm])`, "tlm(device)",
	"contact_resistance(3 kOhm, 2 kOhm, width = 0 um, reference = 0 Ohm)", `metal_thickness("Ti/Au 10/90 nm")`,
	"etch_rate(device)", "rheed_rate(0 s, GaAs)", "al_fraction(0 nm/s, 0 nm/s)", "arrhenius_fit([1 K, 1 K, 1 K], [1, 1, 1])",
	`cell_calibration("Si", [device])`, "growth_check([device])", "delta_density(1 cm^-2 s^-1, 1 s)",
}

// fuzzResolver is a notebook stand-in: an invented device with a width and a mask.
type fuzzResolver map[string]calc.Value

func (m fuzzResolver) Lookup(name string) (calc.Value, bool) { v, ok := m[name]; return v, ok }

// FuzzEval: evaluating any line with the whole library never panics, and every error is a
// *calc.Error on that line with a column inside the line (or just past its end).
func FuzzEval(f *testing.F) {
	for _, s := range evalSeeds {
		f.Add(s)
	}
	fsys := fstest.MapFS{
		"e/raw/a.csv":         {Data: []byte("B,R\n0,1\n")},
		"layouts/lockin.yaml": {Data: []byte("comments: [\"%\"]\nderive:\n  Rxx: {x: R, current: 10 nA}\n")},
		"e/up.csv":            {Data: []byte("../../x"), Mode: fs.ModeSymlink},
	}
	um := quantity.MustUnit("um")
	res := fuzzResolver{
		"device": calc.NewRecord("", "width", calc.Q(quantity.New(100*um.Scale, um.D)),
			"mask", calc.NewRecord("", "name", calc.String("HB-100"))),
	}
	f.Fuzz(func(t *testing.T, line string) {
		if !utf8.ValidString(line) || strings.ContainsAny(line, "\r\n") {
			t.Skip("a calc line is one line of UTF-8 text")
		}
		e := NewEnv(calc.WithFS(fsys, "e"), calc.WithResolver(res))
		e.EvalLine("x = 5 ± 0.1 T", 1)
		r := e.EvalLine(line, 2)
		if r.Err == nil {
			if (r.Kind == calc.Assign || r.Kind == calc.Expr) && r.Value == nil {
				t.Fatalf("%q: no error and no value", line)
			}
			return
		}
		var ce *calc.Error
		if !errors.As(r.Err, &ce) {
			t.Fatalf("%q: error %v is not a *calc.Error", line, r.Err)
		}
		if n := utf8.RuneCountInString(line); ce.Line != 2 || ce.Col < 1 || ce.Col > n+1 {
			t.Fatalf("%q: error at %d:%d, outside line 2 of %d characters: %v", line, ce.Line, ce.Col, n, ce)
		}
	})
}
