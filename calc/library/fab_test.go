package library

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

// stubResolver stands in for the notebook: names give records.
type stubResolver map[string]calc.Value

func (m stubResolver) Lookup(name string) (calc.Value, bool) { v, ok := m[name]; return v, ok }

func qv(s string) calc.Quantity {
	q, err := quantity.ParseQuantity(s)
	if err != nil {
		panic(err)
	}
	return calc.Q(q)
}

func lengths(ss ...string) calc.List {
	l := calc.List{}
	for _, s := range ss {
		l = append(l, qv(s))
	}
	return l
}

// fabEnv has a mask with a TLM pattern and a process step that measured it. The numbers are
// the worked check of the project's reference notes (computed there from R_T = 2R_c +
// R_sh d/W, Berger 1972 and Schroder, 3rd ed., ch. 3, from memory; not the book's own
// example): W = 100 µm, R_sh = 1000 Ohm, R_c = 5 Ohm, so R_T = 10 Ohm + 10 Ohm/µm · d.
func fabEnv() *calc.Env {
	pattern := calc.NewRecord("", "width", qv("100 um"), "gaps", lengths("5 um", "10 um", "20 um", "40 um", "80 um"))
	mask := calc.NewRecord("mask", "id", calc.String("HB100"), "tlm", calc.NewRecord("", "TLM-A", pattern))
	step := calc.NewRecord("", "kind", calc.String("tlm"), "pattern", calc.String("TLM-A"),
		"resistances", calc.List{qv("60 Ohm"), qv("110 Ohm"), qv("210 Ohm"), qv("410 Ohm"), qv("810 Ohm")})
	etch := calc.NewRecord("", "kind", calc.String("etch"), "time", qv("4 min"), "depth", qv("148 nm"))
	litho := calc.NewRecord("", "kind", calc.String("lithography"), "intensity", qv("12 mW/cm^2"), "exposure", qv("6 s"))
	metal := calc.NewRecord("", "kind", calc.String("metal"), "stack", calc.String("Ni/AuGe/Ni/Au 5/150/30/100 nm"))
	steps := calc.NewRecord("steps", "tlm_check", step, "mesa_etch", etch, "mesa_litho", litho, "ohmics", metal)
	return NewEnv(calc.WithResolver(stubResolver{"mask": mask, "steps": steps}))
}

// TestTLMThroughLanguage: the transfer-length method on the worked check, given as lists, as
// a pattern on the mask, and as a process step; the results in the trade's units.
func TestTLMThroughLanguage(t *testing.T) {
	e := fabEnv()
	for _, expr := range []string{
		"tlm([5 um, 10 um, 20 um, 40 um, 80 um], [60 Ohm, 110 Ohm, 210 Ohm, 410 Ohm, 810 Ohm], 100 um)",
		`tlm("TLM-A", [60 Ohm, 110 Ohm, 210 Ohm, 410 Ohm, 810 Ohm])`,
		"tlm(steps.tlm_check)",
	} {
		v, err := e.Eval(expr)
		if err != nil {
			t.Fatalf("%s: %v", expr, err)
		}
		r := v.(*calc.AnalysisResult)
		for _, c := range []struct {
			field, unit string
			want        float64
		}{{"Rc", "Ohm", 5}, {"Rc_W", "Ohm mm", 0.5}, {"LT", "um", 0.5}, {"Rsh", "Ohm", 1000}, {"rho_c", "Ohm cm^2", 2.5e-6}} {
			f, _ := r.Field(c.field)
			got, err := f.(calc.Quantity).Q.In(quantity.MustUnit(c.unit))
			if err != nil || !testutil.WithinRel(got, c.want, 1e-9) {
				t.Errorf("%s: %s = %v %s, want %v", expr, c.field, got, c.unit, c.want)
			}
		}
		if got := calc.Display(v); got != "Rc = 5.0000 Ohm, Rc_W 0.50000 Ohm mm, LT 500.00 nm, Rsh 1000.0 Ohm, rho_c 2.5000e-6 Ohm cm^2" {
			t.Errorf("%s shows %q", expr, got)
		}
	}
}

// TestTLMUncertaintiesAreCorrelated: the uncertainty tlm gives L_T = R_c W/R_sh (a ratio of
// the fit's intercept and slope, which are correlated) matches the scatter of L_T over
// synthetic patterns with known R_c = 12 Ohm, R_sh = 350 Ohm, W = 50 µm and 0.5 Ohm of noise
// (the model of the TLM fit above). With a residual-scaled covariance the mean of σ² over
// the patterns estimates the variance.
func TestTLMUncertaintiesAreCorrelated(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 4))
	gaps := []float64{5, 10, 20, 40, 80}
	var lts []float64
	var s2 float64
	const n = 1500
	for range n {
		var rs []string
		for _, g := range gaps {
			rs = append(rs, fmt.Sprintf("%.6f Ohm", 24+350*g/50+0.5*r.NormFloat64()))
		}
		v, err := NewEnv().Eval("tlm([5 um, 10 um, 20 um, 40 um, 80 um], [" + strings.Join(rs, ", ") + "], 50 um)")
		if err != nil {
			t.Fatal(err)
		}
		lt, _ := v.(*calc.AnalysisResult).Field("LT")
		q := lt.(calc.Quantity).Q
		lts = append(lts, q.Value())
		s2 += q.Uncertainty() * q.Uncertainty() / n
	}
	var m, v float64
	for _, x := range lts {
		m += x / n
	}
	for _, x := range lts {
		v += (x - m) * (x - m) / (n - 1)
	}
	if ratio := math.Sqrt(s2 / v); ratio < 0.9 || ratio > 1.1 {
		t.Errorf("σ(L_T) from the fit / scatter of L_T = %.3f, want 1 (true L_T = %.4g m, mean %.4g)", ratio, 12*50e-6/350, m)
	}
}

// TestFabFunctions: the closed forms through the language, with numbers and with steps.
func TestFabFunctions(t *testing.T) {
	e := fabEnv()
	for _, c := range []struct{ expr, want string }{
		{"etch_rate(148 nm, 4 min)", "37.000 nm/min"},
		{"etch_rate(steps.mesa_etch)", "37.000 nm/min"},
		{"etch_depth(etch_rate(steps.mesa_etch), 3 min)", "111.00 nm"},
		{"dose(12 mW/cm^2, 6 s)", "72.000 mJ/cm^2"},
		{"dose(steps.mesa_litho)", "72.000 mJ/cm^2"},
		{`metal_thickness("Ni/AuGe/Ni/Au 5/150/30/100 nm")`, "285.00 nm"},
		{"metal_thickness(steps.ohmics)", "285.00 nm"},
		// R_c = (R_2t − R_ch)/2 (common practice): (3.3 kOhm − 3 kOhm)/2 = 150 Ohm; × 100 µm = 15 Ohm mm.
		{"contact_resistance(3.3 kOhm, 3 kOhm)", "Rc = 150.00 Ohm"},
		{"contact_resistance(3.3 kOhm, 3 kOhm, width = 100 um, reference = tlm(steps.tlm_check))", "Rc = 150.00 Ohm, Rc_W 15.000 Ohm mm, ratio 30.000; warning: 30 times the reference: a contact that freezes out, or a bad contact on this pair"},
		{"contact_resistance(2.9 kOhm, 3 kOhm)", "Rc = -50.000 Ohm; warning: the channel's resistance exceeds the two-terminal one: R_channel overestimated (squares, sheet resistance) or the readings are from different temperatures"},
	} {
		v, err := e.Eval(c.expr)
		if err != nil {
			t.Errorf("%s: %v", c.expr, err)
			continue
		}
		if got := calc.Display(v); got != c.want {
			t.Errorf("%s = %q, want %q", c.expr, got, c.want)
		}
	}
}

// TestTLMErrors: what tlm says when its inputs are incomplete.
func TestTLMErrors(t *testing.T) {
	e := fabEnv()
	for _, c := range []struct{ expr, msg string }{
		{"tlm([5 um, 10 um, 20 um], [1 Ohm, 2 Ohm, 3 Ohm])", "contact width is missing"},
		{"tlm([5 um, 10 um, 20 um])", "resistances are missing"},
		{`tlm("TLM-B", [1 Ohm, 2 Ohm, 3 Ohm])`, `no TLM pattern "TLM-B"; it has: TLM-A`},
		{"tlm([5 um, 10 T, 20 um], [1 Ohm, 2 Ohm, 3 Ohm], 1 um)", "gaps item 2"},
		{"tlm(steps.mesa_etch)", "neither gaps nor a pattern"},
		{"tlm(3 T)", "list of lengths"},
	} {
		if _, err := e.Eval(c.expr); err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("%s: %v, want an error with %q", c.expr, err, c.msg)
		}
	}
	// A bare library environment has no mask: a pattern name says so.
	if _, err := NewEnv().Eval(`tlm("TLM-A", [1 Ohm, 2 Ohm, 3 Ohm])`); err == nil || !strings.Contains(err.Error(), "has no `tlm:` patterns") {
		t.Errorf("no mask: %v", err)
	}
}
