package quantity

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"cleave/internal/testutil"
)

// TestCelsiusConversions: T/K = t/°C + 273.15 exactly ([src:SI2019], 2.3.1), both ways.
// The offset is exactly the float 273.15 (the value is the float sum t + 273.15), which is
// the decimal kelvin value to within one unit in the last place (-40 °C gives
// 233.14999999999998, one ulp below the float nearest 233.15).
func TestCelsiusConversions(t *testing.T) {
	tests := []struct {
		in     string
		kelvin float64
	}{
		{"0 °C", 273.15},
		{"-273.15 °C", 0},
		{"100 °C", 373.15},
		{"115 degC", 388.15},
		{"26.85 \u2103", 300},
		{"580 °C", 853.15},
		{"1150 °C", 1423.15},
		{"-40 °C", 233.15},
		{"25 °C ± 0.5 K", 298.15},
		{"(1.150 ± 0.002)e3 °C", 1423.15},
	}
	for _, tc := range tests {
		q, err := ParseQuantity(tc.in)
		if err != nil {
			t.Fatalf("%q: %v", tc.in, err)
		}
		tC, _ := ParseQuantity(strings.Fields(strings.Trim(tc.in, "("))[0])
		sum := tC.Value() + 273.15
		if strings.HasPrefix(tc.in, "(") {
			sum = 1150 + 273.15
		}
		if q.Value() != sum || !testutil.WithinRel(q.Value(), tc.kelvin, 2.3e-16) || q.Dim() != Temperature || q.Temp() != TempCelsius {
			t.Errorf("%q = %.17g K (%v, %v), want %.17g K, absolute", tc.in, q.Value(), q.Dim(), q.Temp(), tc.kelvin)
		}
		back, err := q.In(MustUnit("°C"))
		want, _ := ParseQuantity(strings.Fields(tc.in)[0])
		if strings.HasPrefix(tc.in, "(") {
			want = Scalar(1150)
		}
		if err != nil || !testutil.Within(back, want.Value(), 1e-12, 1e-13) {
			t.Errorf("%q back in °C = %v, %v; want %v", tc.in, back, err, want.Value())
		}
	}
	// An uncertainty in °C is a difference: ± 2 °C is ± 2 K.
	if q := must(ParseQuantity("115 ± 2 °C")); q.Uncertainty() != 2 || q.Value() != 388.15 {
		t.Errorf("115 ± 2 °C = %v ± %v K", q.Value(), q.Uncertainty())
	}
	// 300 K shown in °C: 26.85 °C.
	if got, err := FormatIn(New(300, Temperature), MustUnit("°C")); err != nil || got != "26.850 °C" {
		t.Errorf("300 K in °C: %q, %v", got, err)
	}
	// Celsius() builds the same value as the parser.
	if c := Celsius(115, 0); c.Value() != 388.15 || c.Temp() != TempCelsius {
		t.Errorf("Celsius(115) = %v %v", c.Value(), c.Temp())
	}
	// In a compound unit °C is a difference: no offset.
	if u := MustUnit("°C/min"); u.Offset != 0 {
		t.Errorf("°C/min has offset %v", u.Offset)
	}
	if u := MustUnit("°C^-1"); u.Offset != 0 {
		t.Errorf("°C^-1 has offset %v", u.Offset)
	}
}

// TestTemperatureArithmetic: the kinds of temperature combine as TempKind documents.
func TestTemperatureArithmetic(t *testing.T) {
	c20, c30 := Celsius(20, 0), Celsius(30, 0)
	k5 := New(5, Temperature)
	type result struct {
		kelvin float64
		kind   TempKind
	}
	ok := func(q Quantity, err error) result {
		if err != nil {
			t.Fatalf("unexpected error %v", err)
		}
		return result{q.Value(), q.Temp()}
	}
	diff := ok(Sub(c30, c20))
	tests := []struct {
		name string
		got  result
		want result
	}{
		{"°C + K", ok(Add(c20, k5)), result{298.15, TempCelsius}},
		{"K + °C", ok(Add(k5, c20)), result{298.15, TempCelsius}},
		{"°C - K", ok(Sub(c20, k5)), result{288.15, TempCelsius}},
		{"°C - °C", diff, result{10, TempDifference}},
		{"°C + difference", ok(Add(c20, New(diff.kelvin, Temperature).Marked(TempDifference))), result{303.15, TempCelsius}},
		{"K - °C", ok(Sub(New(300, Temperature), c20)), result{6.850000000000023, TempDifference}},
		{"difference + difference", ok(Add(New(1, Temperature).Marked(TempDifference), New(2, Temperature).Marked(TempDifference))), result{3, TempDifference}},
		{"K + K", ok(Add(k5, k5)), result{10, TempPlain}},
		{"°C × k_B-like", result{Mul(c20, New(2, Dim{IdxMass: 1})).Value(), Mul(c20, New(2, Dim{IdxMass: 1})).Temp()}, result{586.3, TempPlain}},
	}
	for _, tc := range tests {
		if !testutil.Within(tc.got.kelvin, tc.want.kelvin, 1e-12, 1e-12) || tc.got.kind != tc.want.kind {
			t.Errorf("%s = %v K %v, want %v K %v", tc.name, tc.got.kelvin, tc.got.kind, tc.want.kelvin, tc.want.kind)
		}
	}
	// Allowed scalings: by a dimensioned quantity, the reciprocal, a ratio, a power.
	for _, c := range []struct {
		op   string
		a, b Quantity
	}{
		{"*", c20, New(1.380649e-23, dimEnergy.Div(Temperature))},
		{"/", Scalar(1), c20},
		{"/", c20, c30},
		{"/", c20, New(1, Temperature)},
		{"*", New(2, Temperature).Marked(TempDifference), Scalar(3)},
	} {
		if err := CheckScaling(c.op, c.a, c.b); err != nil {
			t.Errorf("%v %s %v: %v", c.a, c.op, c.b, err)
		}
	}
	// -> K makes a thermodynamic temperature that may be scaled; -> °C an absolute one.
	k, err := c20.ExpressedIn(MustUnit("K"))
	if err != nil || k.Temp() != TempPlain || CheckScaling("*", Scalar(2), k) != nil {
		t.Errorf("20 °C -> K: %v %v", k.Temp(), err)
	}
	if c, err := New(300, Temperature).ExpressedIn(MustUnit("degC")); err != nil || c.Temp() != TempCelsius {
		t.Errorf("300 K -> degC: %v %v", c.Temp(), err)
	}
}

// TestTemperatureErrors: ambiguous arithmetic and a difference in °C are refused with
// messages that say why and what to write instead (testdata/temperature_errors.golden).
func TestTemperatureErrors(t *testing.T) {
	c20, c30 := Celsius(20, 0), Celsius(30, 0)
	d10 := must(Sub(c30, c20))
	cases := []struct {
		name string
		err  error
	}{
		{"°C + °C", second(Add(c20, c30))},
		{"difference - °C", second(Sub(d10, c20))},
		{"2 × °C", CheckScaling("*", Scalar(2), c20)},
		{"°C × 2", CheckScaling("*", c20, Scalar(2))},
		{"°C / 2", CheckScaling("/", c20, Scalar(2))},
		{"-°C", CheckNegate(c20)},
		{"difference in °C", second(d10.In(MustUnit("°C")))},
		{"difference -> °C", second(d10.ExpressedIn(MustUnit("degC")))},
	}
	var b strings.Builder
	for _, c := range cases {
		if !errors.Is(c.err, ErrAmbiguousTemperature) {
			t.Errorf("%s: error %v, want ErrAmbiguousTemperature", c.name, c.err)
			continue
		}
		fmt.Fprintf(&b, "%s\t%v\n", c.name, c.err)
	}
	testutil.GoldenString(t, filepath.Join("testdata", "temperature_errors.golden"), b.String())
	if err := CheckNegate(d10); err != nil {
		t.Errorf("negating a difference: %v", err)
	}
}

func second[T any](_ T, err error) error { return err }

// TestDisplayForms: compound quantities in the trade's forms (issue examples).
func TestDisplayForms(t *testing.T) {
	tests := []struct{ in, want string }{
		{"1 T/min", "1.0000 T/min"},
		{"1 W/cm^2", "1000.0 mW/cm^2"},
		{"1 nm/s", "1.0000 nm/s"},
		{"1 um/h", "0.27778 nm/s"},
		{"2.3723e5 m/s", "2.3723e5 m/s"},
		{"120 mJ/cm^2", "120.00 mJ/cm^2"},
		{"250 uC/cm^2", "250.00 uC/cm^2"},
		{"2.5e-6 Ohm cm^2", "2.5000e-6 Ohm cm^2"},
		{"5 mL", "5.0000 mL"},
		{"115 °C", "115.00 °C"},
		{"115 ± 2 degC", "115.0 ± 2.0 °C"},
		{"20 sccm", "20.000 sccm"},
		{"4000 rpm", "66.667 Hz"}, // the customary unit; a literal keeps rpm through Unit.Keep
		{"1 Oe", "79.577 A/m"},
		{"3 inch", "76.200 mm"},
	}
	for _, tc := range tests {
		if got := Format(must(ParseQuantity(tc.in))); got != tc.want {
			t.Errorf("Format(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
	for _, s := range []string{"rpm", "Torr", "mTorr", "Oe", "kOe", "inch", "ppm", "sccm"} {
		if u, err := ParseUnit(s); err != nil || !u.Keep {
			t.Errorf("%s: Keep = %v, %v", s, u.Keep, err)
		}
	}
	for _, s := range []string{"rpm^2", "Torr/s", "m", "1/rpm"} {
		if MustUnit(s).Keep {
			t.Errorf("%s keeps", s)
		}
	}
}
