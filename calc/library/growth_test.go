package library

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"testing/fstest"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

// TestGrowthFunctions: monolayers and RHEED rates. GaAs a = 5.65325 Å at 300 K and AlAs
// a = 5.6611 Å ([src:VURGAFTMAN2001]); one monolayer of (001) growth is a/2 (common
// practice), so 0.2826625 nm for GaAs; one RHEED period is one monolayer (Neave et al. 1983,
// from memory).
func TestGrowthFunctions(t *testing.T) {
	e := NewEnv()
	for _, c := range []struct {
		expr, unit string
		want       float64
	}{
		{"monolayer(GaAs)", "nm", 0.2826625},
		{`monolayer("AlAs")`, "nm", 0.283055},
		{"monolayer(Al0.3Ga0.7As)", "nm", 0.28278025},
		{"rheed_rate(3.5 s, GaAs)", "nm/s", 0.2826625 / 3.5},
		{"rheed_rate(1 s, GaAs)", "um/h", 0.2826625e-3 * 3600},
		// AlAs one period in 7 s, GaAs in 3.5 s: x = (1/7)/(1/7 + 2/7) = 1/3 exactly.
		{"al_fraction(rheed_rate(7 s, AlAs), rheed_rate(3.5 s, GaAs))", "", 1.0 / 3},
		{"al_fraction(1/(7 s), 1/(3.5 s))", "", 1.0 / 3},
		// A delta layer: 2.5e10 cm^-2 s^-1 for 100 s.
		{"delta_density(2.5e10 cm^-2 s^-1, 100 s)", "cm^-2", 2.5e12},
	} {
		q := value(t, e, c.expr).Q
		u := quantity.Unit{Scale: 1}
		if c.unit != "" {
			u = quantity.MustUnit(c.unit)
		}
		got, err := q.In(u)
		if err != nil || !testutil.WithinRel(got, c.want, 1e-12) {
			t.Errorf("%s = %v %s, %v; want %v", c.expr, got, c.unit, err, c.want)
		}
	}
	for _, c := range []struct{ expr, msg string }{
		{"monolayer(Si)", "no zincblende lattice constant"},
		{"rheed_rate(-3 s, GaAs)", "positive time"},
		{"rheed_rate(3 s, graphene)", "no zincblende"},
		{"al_fraction(1 T, 1 nm/s)", "dimension"},
	} {
		if _, err := e.Eval(c.expr); err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%s: %v, want an error with %q", c.expr, err, c.msg)
		}
	}
}

// TestRHEEDFromTrace: a synthetic trace (a falling background and a damped cosine of period
// 3.53 s, one monolayer per period) read from a data file gives the rate a monolayer of GaAs
// per 3.53 s.
func TestRHEEDFromTrace(t *testing.T) {
	var b bytes.Buffer
	b.WriteString("# growth: GaAs calibration, substrate 580 °C\ntime (s),I\n")
	r := rand.New(rand.NewPCG(3, 3))
	for i := 0; i <= 1200; i++ {
		ti := float64(i) / 20
		fmt.Fprintf(&b, "%.3f,%.5f\n", ti, 1-0.004*ti+0.25*math.Exp(-ti/30)*math.Cos(2*math.Pi*ti/3.53+0.4)+0.005*r.NormFloat64())
	}
	e := NewEnv(calc.WithFS(fstest.MapFS{"rheed.csv": {Data: b.Bytes()}}, "."))
	v, err := e.Eval(`rheed_rate(data("rheed.csv"), GaAs)`)
	if err != nil {
		t.Fatal(err)
	}
	res := v.(*calc.AnalysisResult)
	p, _ := res.Field("period")
	rate, _ := res.Field("rate")
	P := p.(calc.Quantity).Q
	if math.Abs(P.Value()-3.53) > 4*P.Uncertainty() || P.Uncertainty() > 0.01 {
		t.Errorf("period %v, want 3.53 s", quantity.Format(P))
	}
	if !testutil.WithinRel(rate.(calc.Quantity).Q.Value(), 0.2826625e-9/P.Value(), 1e-12) {
		t.Errorf("rate %v", calc.Display(rate))
	}
	if _, err := e.Eval(`rheed_rate(data("rheed.csv"), GaAs, time = "t")`); err == nil {
		t.Error("column t (a temperature by name) accepted as time")
	}
}

// calWafer is a calibration wafer's record: one doped layer grown at one Si cell
// temperature (°C) and the density a Hall measurement found.
func calWafer(id string, points ...calc.Value) *calc.Record {
	return calc.NewRecord(id, "id", calc.String(id), "kind", calc.String("wafer"), "calibration", calc.List(points))
}

func calItem(cell string, T float64, n, rate string) *calc.Record {
	kv := []any{"cell", calc.String(cell), "cell_temperature", calc.Q(quantity.Celsius(T, 0)), "density", qv(n)}
	if rate != "" {
		kv = append(kv, "growth_rate", qv(rate))
	}
	return calc.NewRecord("", kv...)
}

// TestCellCalibration: synthetic calibration wafers made from N = A exp(−E_a/(k_B T)) with
// E_a = 4.2 eV and N(1150 °C) = 1e18 cm^-3 (T/K = t/°C + 273.15; k_B and e exact, CODATA
// 2018) give the activation energy back, and the calibration predicts the density and the
// flux at other cell temperatures.
func TestCellCalibration(t *testing.T) {
	const kB, e = 1.380649e-23, 1.602176634e-19
	N := func(tc float64) float64 { return 1e18 * math.Exp(-4.2*e/kB*(1/(tc+273.15)-1/1423.15)) }
	mk := func(id string, tc float64, rate string) *calc.Record {
		return calWafer(id, calItem("Si", tc, fmt.Sprintf("%.10g cm^-3", N(tc)), rate),
			calItem("Be", tc-300, "1e17 cm^-3", ""))
	}
	res := stubResolver{
		"w1": mk("C-1", 1100, "1 ML(GaAs)/s"), "w2": mk("C-2", 1150, "1 ML(GaAs)/s"), "w3": mk("C-3", 1200, "1 ML(GaAs)/s"),
		"d1": mk("C-1", 1100, ""), "d2": mk("C-2", 1150, ""), "d3": mk("C-3", 1200, ""),
		// a delta-doped calibration: sheet density over the shutter time
		"s1": calWafer("C-4", calc.NewRecord("", "cell", calc.String("Si"), "cell_temperature", calc.Q(quantity.Celsius(1150, 0)),
			"sheet_density", qv("2.8e12 cm^-2"), "time", qv("100 s"))),
		"plain": calc.NewRecord("", "id", calc.String("W-9"), "kind", calc.String("wafer")),
	}
	env := NewEnv(calc.WithResolver(res))
	for i, l := range []string{
		`cal = cell_calibration("Si", [w1, w2, w3])`,
		`dcal = cell_calibration("Si", [d1, d2, d3])`,
	} {
		if r := env.EvalLine(l, i+1); r.Err != nil {
			t.Fatalf("%s: %v", l, r.Err)
		}
	}
	for _, c := range []struct {
		expr, unit string
		want       float64
	}{
		{"cal.Ea", "eV", 4.2},
		{"dcal.Ea", "eV", 4.2},
		{"cell_density(dcal, 1150 °C).n", "cm^-3", 1e18},
		{"cell_density(cal, 1150 °C, rate = 1 ML(GaAs)/s).n", "cm^-3", 1e18},
		{"cell_density(cal, 1175 °C, rate = 2 ML(GaAs)/s).n", "cm^-3", N(1175) / 2},
		{"cell_density(dcal, 1448.15 K).n", "cm^-3", N(1175)},
		// flux = N r with r = 1 ML of GaAs per second, 0.2826625 nm/s
		{"cell_flux(cal, 1150 °C).flux", "cm^-2 s^-1", 1e18 * 0.2826625e-7},
		{"cell_flux(dcal, 1150 °C, rate = 1 ML(GaAs)/s).flux", "cm^-2 s^-1", 1e18 * 0.2826625e-7},
		{"delta_density(cell_flux(cal, 1150 °C), 10 s)", "cm^-2", 1e18 * 0.2826625e-7 * 10},
	} {
		got, err := value(t, env, c.expr).Q.In(quantity.MustUnit(c.unit))
		if err != nil || !testutil.WithinRel(got, c.want, 1e-9) {
			t.Errorf("%s = %v %s, %v; want %v", c.expr, got, c.unit, err, c.want)
		}
	}
	for _, c := range []struct{ expr, want string }{
		{"cal", "Ea = 4.2000 eV, T_min 1100.0 °C, T_max 1200.0 °C; warning: only 3 calibration points: the fit cannot show whether they follow the Arrhenius law"},
		{"cal.wafers", `["C-1", "C-2", "C-3"]`},
		{"cal.fitted", `"flux"`},
		{`cell_calibration("Si", [w1, d2, d3]).fitted`, `"density"`},
		{`cell_calibration("Si", [w1, d2, d3]).warnings`, `["only 3 calibration points: the fit cannot show whether they follow the Arrhenius law", "growth rates are given for some calibrations only: fitted the densities as measured"]`},
		{"cell_density(dcal, 1250 °C)", "n = 9.4730e18 cm^-3; warning: 1250.0 °C lies outside the calibrated cell temperatures 1100.0 °C .. 1200.0 °C: extrapolated"},
	} {
		v, err := env.Eval(c.expr)
		if err != nil || calc.Display(v) != c.want {
			t.Errorf("%s = %q, %v; want %q", c.expr, calc.Display(v), err, c.want)
		}
	}
	for _, c := range []struct{ expr, msg string }{
		{"cell_density(cal, 1150 °C)", "give the growth rate"},
		{`cell_calibration("Ga", [w1, w2])`, `no calibration of cell "Ga"`},
		{`cell_calibration("Si", [s1, d2, d3])`, "mix"},
		{`cell_calibration("Si", [w1, plain])`, "W-9 has no `calibration:`"},
		{"cell_density(3 T, 1150 °C)", "cell_calibration or arrhenius_fit"},
	} {
		if _, err := env.Eval(c.expr); err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%s: %v, want an error with %q", c.expr, err, c.msg)
		}
	}
}

// TestArrheniusFitNoisy: the Arrhenius fit through the language recovers a known activation
// energy from noisy synthetic points within its uncertainty (a 4 σ bound: the test fails by
// chance with a probability below 1e-2 for 3 degrees of freedom, and the seed is fixed).
func TestArrheniusFitNoisy(t *testing.T) {
	const kB, e = 1.380649e-23, 1.602176634e-19
	r := rand.New(rand.NewPCG(8, 1))
	var Ts, ns []string
	for _, tc := range []float64{1050, 1100, 1150, 1200, 1250} {
		Ts = append(Ts, fmt.Sprintf("%g °C", tc))
		ns = append(ns, fmt.Sprintf("%.6g cm^-3", 3e17*math.Exp(-1.8*e/kB*(1/(tc+273.15)-1/1423.15))*(1+0.05*r.NormFloat64())))
	}
	v := value(t, NewEnv(), "arrhenius_fit(["+strings.Join(Ts, ", ")+"], ["+strings.Join(ns, ", ")+"]).Ea").Q
	got, _ := v.In(quantity.MustUnit("eV"))
	if sig := v.Uncertainty() / e; math.Abs(got-1.8) > 4*sig || sig > 0.3 {
		t.Errorf("E_a = %v eV ± %v, want 1.8", got, sig)
	}
}

// layerRow is a row of wafer.layers as the notebook gives it, with its growth fields.
func layerRow(name, material, thickness, doping string, kv ...any) *calc.Record {
	r := calc.NewRecord("", "layer", calc.String(name), "material", calc.String(material), "thickness", qv(thickness),
		"doping", calc.String(doping))
	r.Fields = append(r.Fields, calc.NewRecord("", kv...).Fields...)
	return r
}

// TestGrowthCheck: rate × time against the table (a warning past the tolerance), the doping a
// calibration predicts for a bulk and a delta layer, and the stack with the grown thicknesses.
// The calibration is the synthetic one of TestCellCalibration (flux fitted, N(1150 °C) =
// 1e18 cm^-3 at 1 ML(GaAs)/s).
func TestGrowthCheck(t *testing.T) {
	const kB, e = 1.380649e-23, 1.602176634e-19
	N := func(tc float64) float64 { return 1e18 * math.Exp(-4.2*e/kB*(1/(tc+273.15)-1/1423.15)) }
	res := stubResolver{}
	for i, tc := range []float64{1100, 1150, 1200} {
		res[fmt.Sprintf("w%d", i)] = calWafer(fmt.Sprintf("C-%d", i), calItem("Si", tc, fmt.Sprintf("%.12g cm^-3", N(tc)), "1 ML(GaAs)/s"))
	}
	ml := 0.2826625 // nm, GaAs
	cells := func(kv ...any) *calc.Record { return calc.NewRecord("", kv...) }
	res["layers"] = calc.List{
		layerRow("cap", "GaAs", "10 nm", "", "time", qv("35 s"), "rate", qv("1 ML(GaAs)/s"), "grown", qv(fmt.Sprintf("%g nm", 35*ml)), "nominal", qv("10 nm")),
		layerRow("donors", "GaAs", "40 nm", "Si 1e18 cm^-3", "time", qv("141.5 s"), "rate", qv("1 ML(GaAs)/s"),
			"grown", qv(fmt.Sprintf("%g nm", 141.5*ml)), "nominal", qv("40 nm"), "cells", cells("Ga", calc.Q(quantity.Celsius(905, 0)), "Si", calc.Q(quantity.Celsius(1150, 0)))),
		layerRow("delta", "GaAs", "0 nm", "Si delta 2.5e12 cm^-2", "time", qv("100 s"), "cells", cells("Si", calc.Q(quantity.Celsius(1150, 0)))),
		layerRow("channel", "GaAs", "600 nm", ""),
	}
	env := NewEnv(calc.WithResolver(res))
	if r := env.EvalLine(`chk = growth_check(layers, cal = cell_calibration("Si", [w0, w1, w2]))`, 1); r.Err != nil {
		t.Fatal(r.Err)
	}
	// cap: 35 × 0.2826625 nm = 9.8932 nm, −1.07 % from 10 nm: within 5 %, over 1 %.
	// delta: flux N r = 1e18 cm^-3 × 0.2826625e-7 cm/s = 2.826625e10 cm^-2 s^-1, × 100 s.
	got := calc.Display(value2(t, env, "chk"))
	for _, s := range []string{"2 of 4 layers with rate × time beside a thickness; largest difference -1.1 % (cap)",
		"donors 1.0000e18 cm^-3 predicted, table 1.0000e18 cm^-3 (+0.0 %)", "delta 2.8266e12 cm^-2 predicted, table 2.5000e12 cm^-2 (+13.1 %)"} {
		if !strings.Contains(got, s) {
			t.Errorf("growth_check shows %q; want it to contain %q", got, s)
		}
	}
	if strings.Contains(got, "warning") {
		t.Errorf("warnings within 5 %%: %s", got)
	}
	if got := calc.Display(value2(t, env, "growth_check(layers, tolerance = 0.5 %).warnings")); got != `["cap: rate × time gives 9.8932 nm, the table 10.000 nm (-1.1 %)"]` {
		t.Errorf("warnings at 0.5 %%: %s", got)
	}
	// The stack for the solver: the grown thickness where the growth is logged.
	stack := value2(t, env, "chk.layers").(calc.List)
	th, _ := stack[0].(*calc.Record).Field("thickness")
	if !testutil.WithinRel(th.(calc.Quantity).Q.Value(), 35*ml*1e-9, 1e-12) {
		t.Errorf("cap in the stack: %s", calc.Display(th))
	}
	if _, err := env.Eval("growth_check(layers, cal = 3 T)"); err == nil || !strings.Contains(err.Error(), "cell_calibration") {
		t.Errorf("cal = 3 T: %v", err)
	}
}

func value2(t *testing.T, e *calc.Env, expr string) calc.Value {
	t.Helper()
	v, err := e.Eval(expr)
	if err != nil {
		t.Fatalf("%s: %v", expr, err)
	}
	return v
}
