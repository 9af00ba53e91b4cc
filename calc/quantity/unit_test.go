package quantity

import (
	"cleave/internal/testutil"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// Sources used below:
//   - [SI9]: The International System of Units (SI Brochure), 9th ed., BIPM
//     2019: Table 4 (derived units with special names), Table 7 (prefixes),
//     Table 8 (non-SI units accepted for use with the SI). Table numbers from
//     memory.
//   - [CODATA18]: CODATA 2018 recommended values (Tiesinga, Mohr, Newell,
//     Taylor 2020; NIST web version 8.1), listed in calc/SOURCES.md
//     [src:CODATA2018].
//   - [CGS]: the gauss is 1e-4 T and the ångström 1e-10 m (SI Brochure, 8th
//     ed., 2006, Tables 8 and 9 (from memory)).
//   - [TORR]: 1 Torr = 101325/760 Pa by definition of the torr as 1/760 of
//     the standard atmosphere 101325 Pa (from memory).
var (
	dimMobility = Length.Pow(2).Div(dimVoltage.Mul(Time))
)

func TestUnitTable(t *testing.T) {
	tests := []struct {
		sym    string
		si     float64
		d      Dim
		source string
	}{
		{"m", 1, Length, "SI base unit"},
		{"cm", 1e-2, Length, "[SI9] Table 7 centi"},
		{"mm", 1e-3, Length, "[SI9] Table 7 milli"},
		{"um", 1e-6, Length, "[SI9] Table 7 micro"},
		{"µm", 1e-6, Length, "[SI9] Table 7 micro (micro sign U+00B5)"},
		{"μm", 1e-6, Length, "[SI9] Table 7 micro (Greek mu U+03BC)"},
		{"nm", 1e-9, Length, "[SI9] Table 7 nano"},
		{"Å", 1e-10, Length, "[CGS] ångström"},
		{"\u212B", 1e-10, Length, "[CGS] ångström (ANGSTROM SIGN)"},
		{"Angstrom", 1e-10, Length, "[CGS] ångström"},
		{"g", 1e-3, Mass, "SI base unit kg"},
		{"kg", 1, Mass, "SI base unit"},
		{"m_e", 9.1093837015e-31, Mass, "[CODATA18] electron mass"},
		{"s", 1, Time, "SI base unit"},
		{"ms", 1e-3, Time, "[SI9] Table 7"},
		{"ps", 1e-12, Time, "[SI9] Table 7"},
		{"min", 60, Time, "[SI9] Table 8"},
		{"h", 3600, Time, "[SI9] Table 8"},
		{"Hz", 1, dimFrequency, "[SI9] Table 4: Hz = s^-1"},
		{"kHz", 1e3, dimFrequency, "[SI9] Tables 4, 7"},
		{"GHz", 1e9, dimFrequency, "[SI9] Tables 4, 7"},
		{"T", 1, dimField, "[SI9] Table 4: T = kg s^-2 A^-1"},
		{"mT", 1e-3, dimField, "[SI9] Table 7: mT is millitesla, matched whole-unit first"},
		{"G", 1e-4, dimField, "[CGS] gauss"},
		{"Tesla", 1, dimField, "spelled out"}, {"tesla", 1, dimField, "spelled out"},
		{"kG", 0.1, dimField, "kilogauss"}, {"cm^2/Vs", 1e-4, MustUnit("m^2/(V s)").D, "the trade's spelling of cm^2/(V s)"},
		{"kG", 0.1, dimField, "[CGS] kilogauss"},
		{"K", 1, Temperature, "SI base unit"},
		{"mK", 1e-3, Temperature, "[SI9] Table 7"},
		{"J", 1, dimEnergy, "[SI9] Table 4: J = kg m^2 s^-2"},
		{"eV", 1.602176634e-19, dimEnergy, "[CODATA18] e exact, 1 eV = e × 1 V"},
		{"meV", 1.602176634e-22, dimEnergy, "[CODATA18] and [SI9] Table 7"},
		{"Ohm", 1, dimResistance, "[SI9] Table 4: Ω = kg m^2 s^-3 A^-2"},
		{"ohm", 1, dimResistance, "alias"},
		{"Ω", 1, dimResistance, "[SI9] symbol (Greek capital omega)"},
		{"\u2126", 1, dimResistance, "OHM SIGN"},
		{"kOhm", 1e3, dimResistance, "[SI9] Table 7"},
		{"kΩ", 1e3, dimResistance, "[SI9] Table 7"},
		{"MOhm", 1e6, dimResistance, "[SI9] Table 7"},
		{"Ohm/sq", 1, dimResistance, "per square is the number 1 (common practice)"},
		{"S", 1, dimResistance.Pow(-1), "[SI9] Table 4: S = Ω^-1"},
		{"V", 1, dimVoltage, "[SI9] Table 4: V = kg m^2 s^-3 A^-1"},
		{"mV", 1e-3, dimVoltage, "[SI9] Table 7"},
		{"A", 1, Current, "SI base unit ampere (not ångström)"},
		{"nA", 1e-9, Current, "[SI9] Table 7"},
		{"F", 1, dimCapacit, "[SI9] Table 4: F = kg^-1 m^-2 s^4 A^2"},
		{"nF", 1e-9, dimCapacit, "[SI9] Table 7"},
		{"C", 1, dimCharge, "[SI9] Table 4: C = A s"},
		{"W", 1, dimPower, "[SI9] Table 4: W = kg m^2 s^-3"},
		{"H", 1, dimInduct, "[SI9] Table 4: H = kg m^2 s^-2 A^-2"},
		{"Wb", 1, dimFlux, "[SI9] Table 4: Wb = kg m^2 s^-2 A^-1"},
		{"N", 1, dimForce, "[SI9] Table 4"},
		{"Pa", 1, dimPressure, "[SI9] Table 4: Pa = kg m^-1 s^-2"},
		{"mbar", 100, dimPressure, "[SI9] Table 8 (from memory): bar = 1e5 Pa"},
		{"Torr", 101325.0 / 760, dimPressure, "[TORR]"},
		{"rad", 1, Dimensionless, "[SI9] Table 4: rad = m/m"},
		{"sr", 1, Dimensionless, "[SI9] Table 4: sr = m^2/m^2"},
		{"deg", math.Pi / 180, Dimensionless, "[SI9] Table 8: 1° = π/180 rad"},
		{"%", 0.01, Dimensionless, "per cent (common practice)"},
		{"1", 1, Dimensionless, "the number one"},
		{"cm^-2", 1e4, Length.Pow(-2), "[SI9] Table 7: (1e-2)^-2 = 1e4"},
		{"cm^-3", 1e6, Length.Pow(-3), "[SI9] Table 7, cubed"},
		{"cm^2/(V s)", 1e-4, dimMobility, "[SI9] Table 7: (1e-2)^2 = 1e-4"},
		{"cm^2 V^-1 s^-1", 1e-4, dimMobility, "same unit, product form"},
		{"nF/cm^2", 1e-5, dimCapacit.Div(Length.Pow(2)), "[SI9] Table 7: 1e-9/1e-4"},
		{"Ohm/T", 1, dimResistance.Div(dimField), "Hall slope"},
		{"T^-1", 1, dimField.Pow(-1), "inverse field"},
		{"(m^2)^(1/2)", 1, Length, "rational power"},
		{"(cm^4)^(1/2)", 1e-4, Length.Pow(2), "rational power of a prefixed unit"},
		{"kg m^2 s^-2", 1, dimEnergy, "Dim.String form of J"},
		{"J·s", 1, dimEnergy.Mul(Time), "middle dot product"},
		{"J*s", 1, dimEnergy.Mul(Time), "star product"},
		{"meV / T", 1.602176634e-22, dimEnergy.Div(dimField), "spaces around /"},
		{" um ", 1e-6, Length, "surrounding spaces"},
		// Growth and fabrication units.
		{"°C", 1, Temperature, "[src:SI2019] 2.3.1: a Celsius degree is a kelvin (the offset is in Unit.Offset)"},
		{"degC", 1, Temperature, "ASCII spelling of °C"},
		{"\u2103", 1, Temperature, "DEGREE CELSIUS sign"},
		{"°C/min", 1.0 / 60, Temperature.Div(Time), "a ramp rate: °C in a compound unit is a difference"},
		{"inch", 0.0254, Length, "international inch, exactly 25.4 mm (NIST SP 811, from memory)"},
		{"in", 0.0254, Length, "same"},
		{"L", 1e-3, Length.Pow(3), "[SI9] Table 8: 1 L = 1 dm^3"},
		{"mL", 1e-6, Length.Pow(3), "[SI9] Tables 7, 8"},
		{"uL", 1e-9, Length.Pow(3), "[SI9] Tables 7, 8"},
		{"µL", 1e-9, Length.Pow(3), "[SI9] Tables 7, 8"},
		{"Oe", 79.57747154594767, Current.Div(Length), "CGS oersted, 1000/(4π) A/m ([SI 8th ed.] Table 9, from memory)"},
		{"kOe", 79577.47154594767, Current.Div(Length), "kilo-oersted"},
		{"ppm", 1e-6, Dimensionless, "parts per million"},
		{"ppb", 1e-9, Dimensionless, "parts per billion"},
		{"rpm", 1.0 / 60, dimFrequency, "one revolution per minute"},
		// p0 V/(R T0)/60 s with p0 = 101325 Pa, T0 = 273.15 K, R = N_A k_B = 8.31446261815324 J/(mol K)
		// (exact, CODATA 2018): 4.461503340547e-5 mol per standard cm^3 (computed).
		{"sccm", 7.43583890091172e-07, Amount.Div(Time), "standard cm^3 per minute (SEMI E12 standard conditions, from memory)"},
		{"slm", 7.43583890091172e-04, Amount.Div(Time), "standard litre per minute"},
		{"mTorr", 101325.0 / 760 / 1000, dimPressure, "[TORR] with the SI prefix milli"},
		{"ML(GaAs)", 0.2826625e-9, Length, "a/2 with a = 5.65325 Å [src:VURGAFTMAN2001] (common practice)"},
		{"ML(AlAs)/s", 0.283055e-9, Length.Div(Time), "a/2 with a = 5.6611 Å [src:VURGAFTMAN2001]"},
		{"ML(Al(0.3)Ga(0.7)As)", 0.28278025e-9, Length, "Vegard: a = 5.655605 Å"},
		{"T/min", 1.0 / 60, dimField.Div(Time), "sweep rate"},
		{"mW/cm^2", 10, dimPower.Div(Length.Pow(2)), "intensity: 1e-3/1e-4"},
		{"mJ/cm^2", 10, dimEnergy.Div(Length.Pow(2)), "dose"},
		{"uC/cm^2", 1e-2, dimCharge.Div(Length.Pow(2)), "e-beam dose: 1e-6/1e-4"},
		{"Ohm mm", 1e-3, dimResistance.Mul(Length), "contact resistance times width"},
		{"Ohm cm^2", 1e-4, dimResistance.Mul(Length.Pow(2)), "specific contact resistivity"},
		{"um/h", 1e-6 / 3600, Length.Div(Time), "growth rate"},
		{"Å/s", 1e-10, Length.Div(Time), "growth rate"},
	}
	for _, tt := range tests {
		t.Run(tt.sym, func(t *testing.T) {
			u, err := ParseUnit(tt.sym)
			if err != nil {
				t.Fatalf("ParseUnit(%q): %v", tt.sym, err)
			}
			if u.D != tt.d {
				t.Errorf("dimension %v, want %v (%s)", u.D, tt.d, tt.source)
			}
			if !testutil.WithinRel(u.Scale, tt.si, 4e-16) {
				t.Errorf("scale %.17g, want %.17g (%s)", u.Scale, tt.si, tt.source)
			}
		})
	}
}

// TestDerivedUnitIdentities checks the "expressed in other SI units" column
// of [SI9] Table 4, which fixes the dimensions independently of the table
// above.
func TestDerivedUnitIdentities(t *testing.T) {
	pairs := [][2]string{
		{"N", "kg m/s^2"}, {"J", "N m"}, {"W", "J/s"}, {"C", "A s"}, {"V", "W/A"},
		{"F", "C/V"}, {"Ohm", "V/A"}, {"S", "A/V"}, {"Wb", "V s"}, {"T", "Wb/m^2"},
		{"H", "Wb/A"}, {"Pa", "N/m^2"}, {"Hz", "s^-1"},
	}
	for _, p := range pairs {
		a, err1 := ParseUnit(p[0])
		b, err2 := ParseUnit(p[1])
		if err1 != nil || err2 != nil {
			t.Fatalf("%v %v", err1, err2)
		}
		if a.D != b.D || !testutil.WithinRel(a.Scale, b.Scale, 1e-15) {
			t.Errorf("%s = %v×%g, %s = %v×%g", p[0], a.D, a.Scale, p[1], b.D, b.Scale)
		}
	}
}

func TestParseUnitErrors(t *testing.T) {
	tests := []struct {
		in     string
		offset int
	}{
		{"", 0},
		{"   ", 0},
		{"kOhmz", 0},
		{"m s furlong", 4},
		{"cm^", 3},
		{"cm^x", 3},
		{"cm^2/V s", 4},    // ambiguous solidus
		{"J/K/mol", 1},     // two solidi
		{"m^(1/2)", 0},     // fractional dimension
		{"(m", 0},          // unclosed
		{"m)", 1},          // stray parenthesis
		{"m^(1/0)", 5},     // zero denominator
		{"m^(1/2", 6},      // unclosed exponent
		{"12 m", 0},        // a number other than 1
		{"(1/2)", 3},       // a number other than 1
		{"m^1000", 2},      // exponent too large
		{"m^100 m^100", 0}, // dimension out of range
		{"m $", 2},         // bad character
		{"msr", 0},         // the steradian takes no prefix here
		{"°F", 0},          // Fahrenheit is not supported
		{"m °K", 2},        // the kelvin has no degree sign
		{"ML", 0},          // a monolayer needs its material
		{"ML/s", 0},        // same, in a rate
		{"ML(GaAs", 2},     // unclosed
		{"ML(Si)", 3},      // not a zincblende III-V
		{"ML(Unobtainium)", 3},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			_, err := ParseUnit(tt.in)
			var ue *UnitError
			if !errors.As(err, &ue) || !errors.Is(err, ErrUnknownUnit) {
				t.Fatalf("ParseUnit(%q) error %v, want *UnitError", tt.in, err)
			}
			if ue.Offset != tt.offset {
				t.Errorf("offset %d, want %d (%v)", ue.Offset, tt.offset, err)
			}
			if ue.Msg == "" || ue.Input != tt.in {
				t.Errorf("error lacks detail: %+v", ue)
			}
		})
	}
}

// TestParseUnitValidEdgeCases: spellings that look odd but are valid.
func TestParseUnitValidEdgeCases(t *testing.T) {
	for _, s := range []string{"dam", "Tm", "A/Å", "eV/(m_e cm^2)", "1/T", "kg*m^2*s^-2", "m^+2", "m^−2"} {
		if _, err := ParseUnit(s); err != nil {
			t.Errorf("ParseUnit(%q): %v", s, err)
		}
	}
}

func TestMustUnitPanics(t *testing.T) {
	defer func() {
		r := recover()
		if s, ok := r.(string); !ok || len(s) < 10 || s[:10] != "quantity: " {
			t.Errorf("panic %v, want a message starting \"quantity: \"", r)
		}
	}()
	MustUnit("furlong")
}

func TestIn(t *testing.T) {
	// 1 T = 1e4 G ([CGS]).
	b := New(1, dimField)
	if got, err := b.In(MustUnit("G")); err != nil || !testutil.WithinRel(got, 1e4, 1e-15) {
		t.Errorf("1 T in G = %g, %v", got, err)
	}
	if _, err := b.In(MustUnit("m")); !errors.Is(err, ErrDimMismatch) {
		t.Errorf("1 T in m: error %v, want ErrDimMismatch", err)
	}
	// Exact decimal conversion: 2e-5 m is exactly 20 um.
	if got, _ := New(2e-5, Length).In(MustUnit("um")); got != 20 {
		t.Errorf("2e-5 m in um = %.17g, want 20", got)
	}
}

// TestTradeChecks runs worked values of calc/SOURCES.md ([src:W3] and so on)
// through the unit machinery (constants as in [CODATA18]).
func TestTradeChecks(t *testing.T) {
	const e, hbar, h = 1.602176634e-19, 1.0545718176461565e-34, 6.62607015e-34
	q := func(s string) Quantity { return must(ParseQuantity(s)) }
	in := func(x Quantity, u string) float64 { return mustIn(t, x, u) }
	charge := New(e, dimCharge)

	// [src:W3]: hbar e B/m* at 1 T with m* = 0.067 m_e is 1.72788 meV.
	E := Div(Mul(New(hbar, dimEnergy.Mul(Time)), Mul(charge, q("1 T"))), q("0.067 m_e"))
	if got := in(E, "meV"); !testutil.WithinRel(got, 1.72788, 1e-5) {
		t.Errorf("hbar omega_c = %g meV, want 1.72788", got)
	}
	// [src:W9]: mu = 1/(e n rho) with n = 3e11 cm^-2, rho = 10 Ohm is 2.0805e6 cm^2/(V s).
	mu := Div(Scalar(1), Mul(charge, Mul(q("3e11 cm^-2"), q("10 Ohm"))))
	if got := in(mu, "cm^2/(V s)"); !testutil.WithinRel(got, 2.0805e6, 1e-4) {
		t.Errorf("mu = %g cm^2/(V s), want 2.0805e6", got)
	}
	// [src:W4]: nu = n h/(e B) at 5 T is 2.4814, dimensionless.
	nu := Div(Mul(q("3e11 cm^-2"), New(h, dimEnergy.Mul(Time))), Mul(charge, q("50 kG")))
	if !nu.Dim().IsDimensionless() || !testutil.WithinRel(nu.Value(), 2.4814, 1e-4) {
		t.Errorf("nu = %v, want 2.4814", nu)
	}
	// [src:W15]: Delta(1/B) = 0.161199 T^-1, asked for explicitly.
	if got := in(q("1612.0 cm^2/(V s)"), "T^-1"); !testutil.WithinRel(got, 0.16120, 1e-12) {
		t.Errorf("1612 cm^2/(V s) in T^-1 = %g", got)
	}
}

func mustIn(t *testing.T, q Quantity, u string) float64 {
	t.Helper()
	v, err := q.In(MustUnit(u))
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func TestEngineering(t *testing.T) {
	tests := []struct {
		v    float64
		d    Dim
		base string
		want string
	}{
		// f_c = 417.80 GHz per T for GaAs [src:W3].
		{4.178e11, dimFrequency, "Hz", "GHz"},
		{17.7, dimFrequency, "Hz", "Hz"},
		{1e-8, Current, "A", "nA"},
		{-2.5e-7, Current, "A", "nA"},
		{25812.807, dimResistance, "Ohm", "kOhm"},
		{1e-30, Length, "m", "fm"},
		{0, dimField, "T", "T"},
	}
	for _, tt := range tests {
		u, err := Engineering(New(tt.v, tt.d), tt.base)
		if err != nil || u.Symbol != tt.want {
			t.Errorf("Engineering(%g, %q) = %q, %v; want %q", tt.v, tt.base, u.Symbol, err, tt.want)
		}
	}
	if _, err := Engineering(New(1, Length), "Hz"); !errors.Is(err, ErrDimMismatch) {
		t.Errorf("length in Hz: %v", err)
	}
	if _, err := Engineering(New(1, Mass), "m_e"); !errors.Is(err, ErrUnknownUnit) {
		t.Errorf("m_e takes no prefix: %v", err)
	}
}

// TestUnitCompositionProperty composes random symbols from the table with
// random integer powers, products and one quotient, and checks that the
// parsed unit's scale and dimension are the product of the parts'.
func TestUnitCompositionProperty(t *testing.T) {
	syms := []string{"m", "cm", "um", "nm", "Å", "g", "kg", "m_e", "s", "ps", "min", "A", "nA", "K", "mK",
		"Hz", "GHz", "N", "Pa", "J", "eV", "meV", "W", "C", "V", "mV", "F", "nF", "Ohm", "kOhm", "S",
		"Wb", "T", "mT", "G", "H", "mol", "cd", "Torr", "bar"}
	r := rand.New(rand.NewPCG(5, 6))
	for range 3000 {
		var parts []string
		scale, d := 1.0, Dimensionless
		n := 1 + r.IntN(4)
		for k := range n {
			s := syms[r.IntN(len(syms))]
			p := r.IntN(7) - 3
			if p == 0 {
				p = 1
			}
			u := MustUnit(s)
			text := s
			if p != 1 {
				text = fmt.Sprintf("%s^%d", s, p)
			}
			sep := " "
			if k == n-1 && n > 1 && r.IntN(2) == 0 {
				sep, p = "/", -p
			} else if r.IntN(3) == 0 {
				sep = "*"
			}
			if k > 0 {
				parts = append(parts, sep)
			}
			parts = append(parts, text)
			scale *= math.Pow(u.Scale, float64(p))
			d = d.Mul(u.D.Pow(p))
		}
		in := strings.Join(parts, "")
		u, err := ParseUnit(in)
		if err != nil {
			t.Fatalf("ParseUnit(%q): %v", in, err)
		}
		if u.D != d || !testutil.WithinRel(u.Scale, scale, 1e-13) {
			t.Fatalf("ParseUnit(%q) = %v × %g, want %v × %g", in, u.D, u.Scale, d, scale)
		}
	}
}
