package library

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"cleave/calc"
	"cleave/calc/transport"
	"cleave/internal/testutil"
)

// The instrument fixtures of calc/transport (testdata/instruments there): files as lock-in
// amplifiers and measurement scripts write them, generated from the Drude and low-field
// Shubnikov–de Haas model ([src:AFS1982], [src:CSF1989]) with n = 2.5e11 cm^-2,
// μ = 1e6 cm^2/(V s), 5 squares between the R_xx probes and a 10 nA excitation.
const instrumentDir = "../transport/testdata/instruments"

// rec builds a record from name, value pairs.
func rec(path string, kv ...any) *calc.Record { return calc.NewRecord(path, kv...) }

// instrumentFS is a notebook folder with the fixtures under data/ and their layouts under
// layouts/.
func instrumentFS(t *testing.T) fstest.MapFS {
	t.Helper()
	fsys := fstest.MapFS{}
	for _, dir := range []string{"", "layouts"} {
		es, err := os.ReadDir(filepath.Join(instrumentDir, dir))
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range es {
			if e.IsDir() {
				continue
			}
			b, err := os.ReadFile(filepath.Join(instrumentDir, dir, e.Name()))
			if err != nil {
				t.Fatal(err)
			}
			dst := "data/" + e.Name()
			if dir == "layouts" {
				dst = "layouts/" + e.Name()
			}
			fsys[dst] = &fstest.MapFile{Data: b}
		}
	}
	return fsys
}

// TestDataLayouts reads the fixtures through their layouts, named in the call or by the
// cooldown's data entry, and recovers the truth through the language.
func TestDataLayouts(t *testing.T) {
	cooldown := rec("cooldown",
		"data", calc.List{
			rec("", "file", calc.String("data/lockin_noI.tsv"), "layout", calc.String("lockin-excitation")),
			rec("", "file", calc.String("data/bare_mT.csv"), "layout", calc.String("bare-mT")),
		},
		"excitation", rec("", "current", qv("10 nA")))
	e := NewEnv(calc.WithFS(instrumentFS(t), "."), calc.WithResolver(stubResolver{"cooldown": cooldown}))
	for _, tc := range []struct{ load, what string }{
		{`data("data/lockin_pm1T.tsv", layout = "lockin-tsv")`, "a current column"},
		{`data("data/lockin_noI.tsv")`, "the cooldown's layout and excitation current"},
		{`data("data/bare_mT.csv")`, "the cooldown's layout, units from the layout"},
		{`data("data/preamp_noheader.dat", layout = "preamp-noheader")`, "no header, a preamplifier gain"},
		{`data("data/decimal_comma.txt", layout = "decimal-comma")`, "decimal commas"},
		{`data("data/sweep_mT_kOhm.csv")`, "sniffed"},
	} {
		t.Run(tc.what, func(t *testing.T) {
			lines := []string{
				"d = " + tc.load,
				`hall = hall_density(d, 0.05 T .. 0.4 T)`,
				`sdh = sdh_density(d, 0.4 T .. 1 T)`,
				`mu = mobility(sheet_resistance(zero_field(d, "Rxx"), 5), hall.n)`,
			}
			for i, l := range lines {
				if r := e.EvalLine(l, i+1); r.Err != nil {
					t.Fatalf("%s: %v", l, r.Err)
				}
			}
			testutil.CheckRel(t, "hall.n", value(t, e, "hall.n").Q.Value(), 2.5e15, 3e-3)
			testutil.CheckRel(t, "sdh.n", value(t, e, "sdh.n").Q.Value(), 2.5e15, 0.01)
			testutil.CheckRel(t, "mu", value(t, e, "mu").Q.Value(), 100, 5e-3)
		})
	}
	v, err := e.Eval(`data("data/lockin_pm1T.tsv", layout = "lockin-tsv")`)
	if err != nil {
		t.Fatal(err)
	}
	want := "data/lockin_pm1T.tsv: 1001 rows; field_T as B, X1_V, Y1_V, X2_V, Y2_V, I_nA, Rxx (Ohm), Rxx_Y (Ohm), Rxy (Ohm), Rxy_Y (Ohm); layout lockin-tsv; sha256:"
	if got := calc.Display(v); !strings.HasPrefix(got, want) {
		t.Errorf("display\n got %s\nwant %s…", got, want)
	}
}

// TestDataLayoutErrors: what a user sees when a layout is missing, misnamed or needs what the
// cooldown does not record.
func TestDataLayoutErrors(t *testing.T) {
	e := NewEnv(calc.WithFS(instrumentFS(t), "."))
	for _, tc := range []struct{ line, want string }{
		{`data("data/lockin_pm1T.tsv", layout = "nope")`, `1:30: data: layout layouts/nope.yaml does not exist`},
		{`data("data/lockin_pm1T.tsv", layout = "../x")`, `1:30: data: bad argument: layout "../x": expected the name of a file in layouts/ without .yaml (letters, digits, '.', '_', '-')`},
		{`data("data/lockin_noI.tsv", layout = "lockin-excitation")`, "1:6: data: layouts/lockin-excitation.yaml:8:3: derive: Rxx: current: excitation needs the cooldown's excitation current (record `excitation: {current: 10 nA}` in the cooldown)"},
		{`hall_density(data("data/lockin_pm1T.tsv"), 0 T .. 1 T, y = "X2_V")`, "1:1: hall_density: data/lockin_pm1T.tsv:5:26: column \"X2_V\" is in V, a voltage; expected a resistance (Ohm) (volts are not ohms: a layout's `derive:` turns it into R = V/I)"},
		{`data("data/lockin_pm1T.tsv", offset = 2 K)`, "expected a field offset such as 2 mT"},
	} {
		r := e.EvalLine(tc.line, 1)
		if r.Err == nil || !strings.Contains(r.Err.Error(), tc.want) {
			t.Errorf("%s:\n got %v\nwant %s", tc.line, r.Err, tc.want)
		}
	}
}

// TestDataOffset: the cooldown's magnet offset (the true field when the magnet reads zero)
// is added to the field column, offset= overrides it, and results record it. The fixture
// was written by a magnet with a 2 mT remanent field.
func TestDataOffset(t *testing.T) {
	cooldown := rec("cooldown", "magnet", rec("", "offset", qv("2 mT")))
	e := NewEnv(calc.WithFS(instrumentFS(t), "."), calc.WithResolver(stubResolver{"cooldown": cooldown}))
	lines := []string{
		`d = data("data/offset_pm1T.csv")`,
		`raw = data("data/offset_pm1T.csv", offset = 0 T)`,
		`s = symmetrize(d)`,
		`hall = hall_density(s, 0.05 T .. 0.4 T)`,
	}
	for i, l := range lines {
		if r := e.EvalLine(l, i+1); r.Err != nil {
			t.Fatalf("%s: %v", l, r.Err)
		}
	}
	testutil.CheckRel(t, "d.offset", value(t, e, "d.offset").Q.Value(), 2e-3, 1e-12)
	testutil.CheckWithin(t, "raw.offset", value(t, e, "raw.offset").Q.Value(), 0, 0, 0)
	testutil.CheckRel(t, "hall.offset", value(t, e, "hall.offset").Q.Value(), 2e-3, 1e-12)
	// With the offset applied the ±B branches line up: no odd part in R_xx worth a warning.
	if v, _ := e.Eval("s"); strings.Contains(calc.Display(v), "warning") {
		t.Errorf("symmetrised with the offset: %s", calc.Display(v))
	}
	v, _ := e.Eval("d")
	if got := calc.Display(v); !strings.Contains(got, "; field offset 2.0000 mT added") {
		t.Errorf("display %s", got)
	}
}

// hallBarRecord is the geometry record of a six-probe bar as the notebook gives it.
func hallBarRecord() *calc.Record {
	pr := func(name, pos, side string) *calc.Record {
		return rec("", "name", calc.String(name), "position", qv(pos), "arm_width", qv("10 um"), "side", calc.String(side))
	}
	return rec("geometry", "width", qv("100 um"),
		"probes", calc.List{pr("2", "250 um", "top"), pr("3", "500 um", "top"), pr("4", "750 um", "top"),
			pr("8", "250 um", "bottom"), pr("7", "500 um", "bottom"), pr("6", "750 um", "bottom")},
		"contacts", rec("", "source", calc.String("1"), "drain", calc.String("5")))
}

// TestHallSignConventions: the carriers are the wafer's; the slope's sign is read with the
// cooldown's wiring against the mask (or its stated convention), and a disagreement warns.
// The synthetic data are ρ_xy itself (electrons: negative slope, [src:IHN2010]); with the
// current 1 → 5 from the source end, R_xy = V7 − V3 (7 on the bottom side) is +ρ_xy and
// V3 − V7 is −ρ_xy (physics.TestHallOrientation works the sign out by hand).
func TestHallSignConventions(t *testing.T) {
	p := fxSweep()
	fsys := fstest.MapFS{"data/pm.csv": &fstest.MapFile{Data: sweepFile(t, p)}}
	wafer := rec("wafer", "id", calc.String("W9"), "carrier", calc.String("electrons"))
	for _, tc := range []struct {
		name      string
		cooldown  *calc.Record
		warn      bool
		measured  string
		basisPart string
	}{
		{"wired as rho_xy", rec("cooldown", "wiring", rec("", "current", calc.String("1 -> 5"), "Rxy", calc.String("7 - 3"))), false, "electrons", "R_xy = V7 − V3"},
		{"wired the other way", rec("cooldown", "wiring", rec("", "current", calc.String("1 -> 5"), "Rxy", calc.String("3 - 7"))), true, "holes", "R_xy = V3 − V7"},
		{"current reversed too", rec("cooldown", "wiring", rec("", "current", calc.String("5 -> 1"), "Rxy", calc.String("3 - 7"))), false, "electrons", "from the drain end"},
		{"field down", rec("cooldown", "wiring", rec("", "current", calc.String("1 -> 5"), "Rxy", calc.String("7 - 3")),
			"convention", rec("", "field", calc.String("down"))), true, "holes", "B down"},
		{"stated convention wins", rec("cooldown", "wiring", rec("", "current", calc.String("1 -> 5"), "Rxy", calc.String("3 - 7")),
			"convention", rec("", "electrons", calc.String("negative"))), false, "electrons", "the cooldown's convention"},
		{"no wiring: default", rec("cooldown"), false, "electrons", "default convention"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			e := NewEnv(calc.WithFS(fsys, "."), calc.WithResolver(stubResolver{"cooldown": tc.cooldown, "wafer": wafer, "geometry": hallBarRecord()}))
			if r := e.EvalLine(`hall = hall_density(data("data/pm.csv"), 0.05 T .. 0.4 T)`, 1); r.Err != nil {
				t.Fatal(r.Err)
			}
			v, _ := e.Eval("hall")
			if got := strings.Contains(calc.Display(v), "records electrons"); got != tc.warn {
				t.Errorf("warning %v, want %v: %s", got, tc.warn, calc.Display(v))
			}
			if c, _ := e.Eval("hall.carriers"); calc.Display(c) != `"electrons"` {
				t.Errorf("carriers %s, want the wafer's", calc.Display(c))
			}
			if m, _ := e.Eval("hall.measured_carriers"); calc.Display(m) != `"`+tc.measured+`"` {
				t.Errorf("measured carriers %s, want %s", calc.Display(m), tc.measured)
			}
			if b, _ := e.Eval("hall.convention"); !strings.Contains(calc.Display(b), tc.basisPart) {
				t.Errorf("convention %s, want it to mention %q", calc.Display(b), tc.basisPart)
			}
		})
	}
}

// fxSweep is the fixtures' model (n = 2.5e11 cm^-2, μ = 1e6 cm^2/(V s)) over ±1 T.
func fxSweep() transport.SweepParams {
	return transport.SweepParams{Density: 2.5e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 0.5e-12,
		Temperature: 0.3, Squares: 5, BStart: -1, BEnd: 1, Points: 1001, Noise: 0.02, Seed: 7}
}

func TestParsePair(t *testing.T) {
	for _, tc := range []struct{ in, a, b string }{
		{"1 -> 5", "1", "5"}, {"1->5", "1", "5"}, {"1 → 5", "1", "5"}, {"3 - 7", "3", "7"}, {"3-7", "3", "7"},
		{"A-1 - B-2", "A-1", "B-2"}, {"S to D", "S", "D"}, {"2, 4", "2", "4"},
	} {
		a, b, ok := ParsePair(tc.in)
		if !ok || a != tc.a || b != tc.b {
			t.Errorf("ParsePair(%q) = %q, %q, %v; want %q, %q", tc.in, a, b, ok, tc.a, tc.b)
		}
	}
	for _, in := range []string{"", "3", "-7", "3 -"} {
		if a, b, ok := ParsePair(in); ok {
			t.Errorf("ParsePair(%q) = %q, %q: want no pair", in, a, b)
		}
	}
}

// TestSweepsThroughTheLanguage: split_sweep recovers the 4 mT lag of the up-down fixture and
// each branch gives the density; check_sweep names the planted defects; one-sided sweeps are
// labelled as such.
func TestSweepsThroughTheLanguage(t *testing.T) {
	e := NewEnv(calc.WithFS(instrumentFS(t), "."))
	lines := []string{
		`sp = split_sweep(data("data/updown_lag.csv"))`,
		`up = hall_density(sp.up, 0.05 T .. 0.4 T)`,
		`down = sdh_density(sp.down, 0.4 T .. 1 T)`,
		`chk = check_sweep(data("data/spikes.csv"))`,
		`one = symmetrize(data("data/magnet_kG_onesided.dat"))`,
		`h1 = hall_density(one, 0.05 T .. 0.4 T)`,
	}
	for i, l := range lines {
		if r := e.EvalLine(l, i+1); r.Err != nil {
			t.Fatalf("%s: %v", l, r.Err)
		}
	}
	lag := value(t, e, "sp.lag").Q
	if math.Abs(lag.Value()-4e-3) > 3*lag.Uncertainty()+2e-5 {
		t.Errorf("lag %v ± %v, want 4 mT", lag.Value(), lag.Uncertainty())
	}
	testutil.CheckRel(t, "up.n", value(t, e, "up.n").Q.Value(), 2.5e15, 3e-3)
	testutil.CheckRel(t, "down.n", value(t, e, "down.n").Q.Value(), 2.5e15, 0.01)
	if v, _ := e.Eval("sp"); !strings.HasPrefix(calc.Display(v), "lag = 3.99960 ± 0.00019 mT; warning: the field reading lags the field by 4 mT") {
		t.Errorf("split_sweep shows %s", calc.Display(v))
	}
	if testutil.CheckWithin(t, "sp.points_up", value(t, e, "sp.points_up").Q.Value(), 1001, 0, 0) {
		testutil.CheckWithin(t, "sp.points_down", value(t, e, "sp.points_down").Q.Value(), 1001, 0, 0)
	}
	if v, _ := e.Eval("chk"); !strings.HasPrefix(calc.Display(v), "3 warning(s)") || !strings.Contains(calc.Display(v), "at B = 0.37 T") {
		t.Errorf("check_sweep shows %s", calc.Display(v))
	}
	v, _ := e.Eval("one")
	if got := calc.Display(v); !strings.Contains(got, "(one-sided, 0 to 1 T: not symmetrised, there is no other polarity)") || strings.Contains(got, "±B") {
		t.Errorf("one-sided symmetrize shows %s", got)
	}
	if s, _ := e.Eval("h1.sweep"); calc.Display(s) != `"one-sided, 0 to 1 T"` {
		t.Errorf("hall sweep %s", calc.Display(s))
	}
	if r := e.EvalLine(`split_sweep(data("data/magnet_kG_onesided.dat"))`, 9); r.Err == nil || !strings.Contains(r.Err.Error(), "the sweep only rises") {
		t.Errorf("one-way split: %v", r.Err)
	}
}

// FuzzParsePair: reading a wiring entry never panics, and a pair it reads has two trimmed,
// non-empty names.
func FuzzParsePair(f *testing.F) {
	for _, s := range []string{"1 -> 5", "3 - 7", "A-1 - B-2", "S to D", "→", "- -", "1 -> -> 2", "a,b,c"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		a, b, ok := ParsePair(s)
		if !ok {
			return
		}
		if a == "" || b == "" || a != strings.TrimSpace(a) || b != strings.TrimSpace(b) {
			t.Fatalf("ParsePair(%q) = %q, %q", s, a, b)
		}
	})
}
