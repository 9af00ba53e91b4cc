package plot_test

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"cleave/calc"
	"cleave/calc/library"
	"cleave/calc/plot"
	"cleave/calc/quantity"
	"cleave/calc/transport"
	"cleave/internal/testutil"
)

var keepPNG = flag.String("svgdir", "", "also write each figure to this folder (for looking at them)")

// sweepCSV is a synthetic sweep from the package's published model (low-field SdH form with
// Lifshitz–Kosevich and Dingle damping, Drude Hall) with known parameters: n = 3e11 cm^-2,
// μ = 1e6 cm^2/(V s), m* = 0.067 m_e, τ_q = 1.5 ps.
func sweepCSV(t testing.TB, temp float64, points int, bStart float64) []byte {
	t.Helper()
	d, err := transport.Sweep(transport.SweepParams{Density: 3e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 1.5e-12,
		Temperature: temp, Squares: 2.5, BStart: bStart, BEnd: 1.5, Points: points, Noise: 0.02, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := transport.WriteCSV(&b, d); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// env is a calc environment over a small in-memory notebook folder with the sweeps, the
// plot function of an entry at cooldowns/CD-1.md, and the records a block would read from
// the notebook (a mask, a layer table, a scorecard) set as names.
func env(t testing.TB) *calc.Env {
	t.Helper()
	fsys := fstest.MapFS{
		"sweep.csv": {Data: sweepCSV(t, 0.3, 4000, -1.5)},
	}
	for _, T := range []float64{0.3, 0.8, 1.5, 2.5, 4.2} {
		fsys[fmt.Sprintf("T%.1f.csv", T)] = &fstest.MapFile{Data: sweepCSV(t, T, 1200, 0)}
	}
	e := library.NewEnv(calc.WithFS(fsys, "."))
	e.Register(plot.Func("cooldowns/CD-1.md"))
	um := func(v float64) calc.Value { return calc.Q(quantity.New(v*1e-6, quantity.Length)) }
	var probes calc.List
	for _, p := range []struct {
		name string
		pos  float64
		side string
	}{{"2", 250, "top"}, {"3", 500, "top"}, {"4", 750, "top"}, {"8", 250, "bottom"}, {"7", 500, "bottom"}, {"6", 750, "bottom"}} {
		probes = append(probes, calc.NewRecord("", "name", calc.String(p.name), "position", um(p.pos), "arm_width", um(10), "side", calc.String(p.side)))
	}
	e.Set("mask", calc.NewRecord("mask", "id", calc.String("HB-T"), "width", um(100), "length", um(1000), "probes", probes,
		"contacts", calc.NewRecord("", "source", calc.String("1"), "drain", calc.String("5"))))
	nm := func(v float64) calc.Value { return calc.Q(quantity.New(v*1e-9, quantity.Length)) }
	layer := func(name, mat string, th float64, doping string) calc.Value {
		return calc.NewRecord("", "layer", calc.String(name), "material", calc.String(mat), "thickness", nm(th), "doping", calc.String(doping))
	}
	e.Set("layers", calc.List{layer("cap", "GaAs", 10, "-"), layer("donors", "Al0.33Ga0.67As", 40, "Si 1e18 cm^-3"),
		layer("spacer", "Al0.33Ga0.67As", 20, "-"), layer("channel", "GaAs", 200, "-")})
	dens := func(v, u float64) calc.Value {
		return calc.Q(quantity.Uncertain(v*1e4, u*1e4, quantity.Length.Pow(-2)))
	}
	mob := func(v, u float64) calc.Value {
		return calc.Q(quantity.Uncertain(v*1e-4, u*1e-4, quantity.MustUnit("cm^2/(V s)").D))
	}
	row := func(id string, ill bool, n, mu calc.Value) calc.Value {
		return calc.NewRecord("", "cooldown", calc.String(id), "illuminated", calc.String(fmt.Sprint(ill)), "n", n, "mu", mu)
	}
	e.Set("card", &calc.AnalysisResult{Kind: "scorecard", Main: "summary", Rec: calc.NewRecord("",
		"rows", calc.List{row("CD-1", false, dens(2.60e11, 0.01e11), mob(1.1e6, 0.05e6)), row("CD-2", true, dens(3.41e11, 0.02e11), mob(1.9e6, 0.1e6)),
			row("CD-3", false, dens(2.71e11, 0.03e11), mob(0.6e6, 0.04e6))},
		"summary", calc.String("dark (CD-1, CD-3); illuminated (CD-2)"))})
	return e
}

// The golden figures: one per kind, on small fixed inputs, through the language as a block
// would call them.
var figures = []struct {
	name, expr, kind string
}{
	{"sweep", `plot(symmetrize(data("sweep.csv")), "rxx", n = 3e11 cm^-2)`, "sweep"},
	{"sweep_raw", `plot(data("sweep.csv"))`, "sweep"},
	{"hall", `plot(hall_density(symmetrize(data("sweep.csv")), 0.05 T .. 0.5 T))`, "hall"},
	{"spectrum", `plot(sdh_density(symmetrize(data("sweep.csv")), 0.15 T .. 1.2 T))`, "spectrum"},
	{"dingle", `plot(quantum_lifetime(symmetrize(data("sweep.csv")), 0.2 T .. 1.2 T, GaAs.mstar, 3e11 cm^-2, T = 0.3 K))`, "dingle"},
	{"mass", `plot(lk_mass([data("T0.3.csv"), data("T0.8.csv"), data("T1.5.csv"), data("T2.5.csv"), data("T4.2.csv")], 0.4 T .. 1.2 T))`, "mass"},
	// B_ν = n h/(e ν) for n = 3e11 cm^-2: 12.41 T/ν
	{"fan", `plot(landau_fan([1.034 ± 0.01 T, 1.241 ± 0.01 T, 1.551 ± 0.01 T, 2.068 ± 0.02 T], [12, 10, 8, 6]))`, "fan"},
	{"fan_density", `plot(3.0e11 cm^-2, "fan")`, "fan"},
	{"band", `plot(expected_density(layers))`, "band"},
	{"band_profile", `plot(expected_density(layers).profile, "profile")`, "band"},
	{"hallbar", `plot(mask)`, "hallbar"},
	{"scorecard", `plot(card, expected = 2.9e11 cm^-2)`, "scorecard"},
	{"gate", `plot(gate_capacitance([-0.4 V, -0.2 V, 0 V, 0.2 V], [1.1e11 ± 0.02e11 cm^-2, 1.9e11 ± 0.02e11 cm^-2, 2.6e11 ± 0.02e11 cm^-2, 3.4e11 ± 0.03e11 cm^-2]))`, "gate"},
	{"power_law", `plot(mobility_power_law([1e11 cm^-2, 2e11 cm^-2, 3e11 cm^-2, 4e11 cm^-2], [0.5e6 cm^2/(V s), 0.95e6 cm^2/(V s), 1.3e6 cm^2/(V s), 1.75e6 cm^2/(V s)]))`, "power_law"},
}

func TestGolden(t *testing.T) {
	e := env(t)
	for _, f := range figures {
		t.Run(f.name, func(t *testing.T) {
			v, err := e.Eval(f.expr)
			if err != nil {
				t.Fatal(err)
			}
			fig, ok := v.(*plot.Figure)
			if !ok {
				t.Fatalf("%s gave a %s", f.expr, v.Type())
			}
			if fig.Kind != f.kind {
				t.Errorf("kind %q, want %q", fig.Kind, f.kind)
			}
			if !bytes.HasPrefix(fig.SVG, []byte("<?xml")) || !bytes.Contains(fig.SVG, []byte("</svg>")) {
				t.Fatalf("not an SVG document: %.80q", fig.SVG)
			}
			for _, bad := range []string{"<script", "javascript:", "onload", "<image", "@font-face"} {
				if bytes.Contains(fig.SVG, []byte(bad)) {
					t.Errorf("the figure contains %q", bad)
				}
			}
			if *keepPNG != "" {
				_ = os.WriteFile(filepath.Join(*keepPNG, f.name+".svg"), fig.SVG, 0o644)
			}
			testutil.Golden(t, filepath.Join("testdata", f.name+".svg"), fig.SVG)
		})
	}
}

// Same value, same bytes: a second environment draws every figure again identically.
func TestDeterministic(t *testing.T) {
	a, b := env(t), env(t)
	for _, f := range figures {
		va, err := a.Eval(f.expr)
		if err != nil {
			t.Fatal(err)
		}
		vb, err := b.Eval(f.expr)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(va.(*plot.Figure).SVG, vb.(*plot.Figure).SVG) {
			t.Errorf("%s: two drawings differ", f.name)
		}
		if calc.Display(va) != calc.Display(vb) {
			t.Errorf("%s: %q vs %q", f.name, calc.Display(va), calc.Display(vb))
		}
	}
}

func TestResultText(t *testing.T) {
	e := env(t)
	r := e.EvalLine(`p = plot(mask, "bar")`, 1)
	if r.Err != nil {
		t.Fatal(r.Err)
	}
	path, hash, ok := plot.ParseResult(r.Display)
	if !ok || path != "plots/CD-1/bar.svg" || len(hash) != 12 {
		t.Fatalf("result %q parsed as %q %q %v", r.Display, path, hash, ok)
	}
	if fig := r.Value.(*plot.Figure); !strings.HasPrefix(fig.Hash(), hash) {
		t.Errorf("hash %s is not the SVG's %s", hash, fig.Hash())
	}
	if v, err := e.Eval("p.path"); err != nil || calc.Display(v) != `"plots/CD-1/bar.svg"` {
		t.Errorf("p.path = %v, %v", v, err)
	}
	for _, text := range []string{"plot plots/../x.svg sha256:0123456789ab", "plot plots/a/b.svg", "plot /etc/x.svg sha256:0123456789ab",
		"plot plots/a/b/c.svg sha256:0123456789ab", "n = 3 cm^-2", "plot plots/a/.svg sha256:0123456789ab"} {
		if p, _, ok := plot.ParseResult(text); ok {
			t.Errorf("ParseResult(%q) accepted %q", text, p)
		}
	}
}

func TestErrors(t *testing.T) {
	e := env(t)
	for _, c := range []struct{ expr, want string }{
		{`plot(3 T)`, "not plottable"},
		{`plot("text")`, "not plottable"},
		{`plot(mask, "../evil")`, "letters, digits"},
		{`plot(mask, "a b")`, "letters, digits"},
		{`plot(mask, 3)`, "name must be a string"},
		{`plot(data("sweep.csv"), n = 3 T)`, "n must be a density"},
		{`plot(card, expected = 3 T)`, "expected must be a density"},
		{`plot(card, expected = mask)`, "expected must be a density"},
		{`plot(hall_resistance(2))`, "not plottable"},
	} {
		_, err := e.Eval(c.expr)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.expr, err, c.want)
		}
	}
	if _, err := plot.Draw(calc.String("x"), plot.Options{}); !errors.Is(err, plot.ErrNotPlottable) {
		t.Errorf("Draw(string): %v", err)
	}
}

// Decimation keeps every bucket's extremes: the minimum and maximum of the curve survive,
// the points stay in their order, and no point is invented.
func TestDecimateKeepsExtrema(t *testing.T) {
	for _, n := range []int{10, 999, 10_000, 123_457} {
		x := make([]float64, n)
		y := make([]float64, n)
		for i := range x {
			x[i] = float64(i)
			y[i] = math.Sin(float64(i)*0.37) + 0.3*math.Sin(float64(i)*float64(i)*1e-5)
		}
		y[n/3] = 50 // a spike
		y[2*n/3] = -50
		got := plot.Decimate(x, y, 1000)
		if n > 1000 && len(got) > 1000 {
			t.Errorf("n=%d: %d points kept, want ≤ 1000", n, len(got))
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for i, p := range got {
			if i > 0 && p.X <= got[i-1].X {
				t.Fatalf("n=%d: order broken at %d", n, i)
			}
			if y[int(p.X)] != p.Y {
				t.Fatalf("n=%d: point %v is not on the curve", n, p)
			}
			lo, hi = math.Min(lo, p.Y), math.Max(hi, p.Y)
		}
		if lo != -50 || hi != 50 {
			t.Errorf("n=%d: extremes %g, %g; want -50, 50", n, lo, hi)
		}
	}
	if got := plot.Decimate([]float64{0, 1, math.NaN(), 3}, []float64{1, math.NaN(), 2, 3}, 100); len(got) != 2 {
		t.Errorf("NaN points kept: %v", got)
	}
}

// One plot of a 10^6-point sweep (the target is < 0.5 s; DEVELOPERS.md has the figure).
func BenchmarkSweep1e6(b *testing.B) {
	d, err := transport.Sweep(transport.SweepParams{Density: 3e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 1.5e-12,
		Temperature: 0.3, BStart: -9, BEnd: 9, Points: 1_000_000, Noise: 0.02, Seed: 3, Plateaus: true})
	if err != nil {
		b.Fatal(err)
	}
	v := &library.DataSet{D: d}
	b.ResetTimer()
	for b.Loop() {
		if _, err := plot.Draw(v, plot.Options{Density: 3e15}); err != nil {
			b.Fatal(err)
		}
	}
}
