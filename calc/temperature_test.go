package calc

import (
	"path/filepath"
	"strings"
	"testing"

	"cleave/internal/testutil"
)

// TestGrowthUnitsThroughLanguage: the units of the growth and fabrication trade as a user
// writes them in a calc block, and what each line shows (T/K = t/°C + 273.15 exactly,
// [src:SI2019]; a monolayer of GaAs is a/2 = 0.28266 nm with a = 5.65325 Å,
// [src:VURGAFTMAN2001]).
func TestGrowthUnitsThroughLanguage(t *testing.T) {
	lines := []struct{ src, want string }{
		{"T_bake = 115 °C", "115.00 °C"},
		{"T_bake -> K", "388.15 K"},
		{"T_sub = 580 degC", "580.00 °C"},
		{"T_sub - T_bake", "465.00 K"},
		{"T_bake + 10 K", "125.00 °C"},
		{"-20 °C", "-20.000 °C"},
		{"-20 °C -> K", "253.15 K"},
		{"300 K -> °C", "26.850 °C"},
		{"k_B*T_bake -> meV", "33.448 meV"},
		{"1/T_bake", "0.0025763 K^-1"},
		{"2*(T_bake -> K)", "776.30 K"},
		{"115 ± 2 °C", "115.0 ± 2.0 °C"},
		{"ramp = 5 °C/min", "5.0000 K/min"},
		{"4000 rpm", "4000.0 rpm"},
		{"4000 rpm * 2", "133.33 Hz"},
		{"5 mTorr", "5.0000 mTorr"},
		{"3 inch", "3.0000 inch"},
		{"20 sccm", "20.000 sccm"},
		{"5 mL", "5.0000 mL"},
		{"50 Oe", "50.000 Oe"},
		{"1 T/min", "1.0000 T/min"},
		{"1 W/cm^2", "1000.0 mW/cm^2"},
		{"1 nm/s", "1.0000 nm/s"},
		{"1 ML(GaAs)", "0.28266 nm"},
		{"r = 0.8 ML(Al0.3Ga0.7As)/s", "0.22622 nm/s"},
		{"r -> um/h", "0.81441 um/h"},
		{"r -> Å/s", "2.2622 Å/s"},
		{"12 mW/cm^2 * 8 s", "96.000 mJ/cm^2"},
		{"2 ppm * 1e18 cm^-3", "2.0000e12 cm^-3"},
	}
	e := NewEnv()
	for i, l := range lines {
		r := e.EvalLine(l.src, i+1)
		if r.Err != nil {
			t.Errorf("%s: %v", l.src, r.Err)
			continue
		}
		if r.Display != l.want {
			t.Errorf("%s = %q, want %q", l.src, r.Display, l.want)
		}
	}
}

// TestTemperatureLanguageErrors: ambiguous arithmetic on absolute temperatures and units
// that cannot be read give positioned errors (testdata/temperature_errors.golden).
func TestTemperatureLanguageErrors(t *testing.T) {
	e := NewEnv()
	setup := []string{"a = 20 °C", "b = 30 °C", "d = b - a"}
	for i, l := range setup {
		if r := e.EvalLine(l, i+1); r.Err != nil {
			t.Fatal(r.Err)
		}
	}
	bad := []string{
		"a + b",
		"20 °C + 30 °C",
		"2 * a",
		"a / 2",
		"-a",
		"d - a",
		"d -> °C",
		"x = 5 ML",
		"x = 5 ML(Si)",
		"x = 20 °F",
		"x = 1.2 ML(GaAs/s",
	}
	var b strings.Builder
	for i, l := range bad {
		r := e.EvalLine(l, 10+i)
		if r.Err == nil {
			t.Errorf("%s: no error (shows %q)", l, r.Display)
			continue
		}
		b.WriteString(l + "\t" + r.Err.Error() + "\n")
	}
	testutil.GoldenString(t, filepath.Join("testdata", "temperature_errors.golden"), b.String())
}
