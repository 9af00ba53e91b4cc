package quantity

import (
	"cleave/internal/testutil"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

func TestFormatExact(t *testing.T) {
	tests := []struct {
		x    float64
		want string
	}{
		{0, "0"},
		{1, "1.0000"},
		{12.5, "12.500"},
		{-12.5, "-12.500"},
		{99999, "99999"},
		{99999.6, "1.0000e5"},
		{1e5, "1.0000e5"},
		{3e11, "3.0000e11"},
		{0.001, "0.0010000"},
		{0.00099999, "9.9999e-4"},
		{0.000999996, "0.0010000"},
		{1.23456e-20, "1.2346e-20"},
		{math.Inf(1), "Inf"},
		{math.Inf(-1), "-Inf"},
		{math.NaN(), "NaN"},
	}
	for _, tt := range tests {
		if got := formatExact(tt.x); got != tt.want {
			t.Errorf("formatExact(%g) = %q, want %q", tt.x, got, tt.want)
		}
	}
}

// refFormatExact is formatExact as it was written before it appended to a buffer, kept as
// the reference TestFormatExactMatchesReference compares with.
func refFormatExact(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nonFinite(x)
	}
	if x == 0 {
		return "0"
	}
	s := strconv.FormatFloat(x, 'e', 4, 64)
	mant, exp, _ := strings.Cut(s, "e")
	e, _ := strconv.Atoi(exp)
	if e >= 5 || e < -3 {
		return mant + "e" + strconv.Itoa(e)
	}
	return strconv.FormatFloat(x, 'f', max(0, 4-e), 64)
}

// TestFormatExactMatchesReference: formatExact, and FormatIn of exact quantities, write what
// the string-building version wrote, for random values over the whole range of float64
// (every decimal exponent, both signs, subnormals, the rounding edges of the scientific form).
func TestFormatExactMatchesReference(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	xs := []float64{0, math.Copysign(0, -1), 1, -1, 99999.4, 99999.5, 99999.96, 1e5, 0.001, 0.00099999, 0.000999996,
		math.MaxFloat64, -math.MaxFloat64, math.SmallestNonzeroFloat64, 0x1p-1022, 1e-310, math.Inf(1), math.NaN()}
	for range 20000 {
		x := math.Float64frombits(r.Uint64())
		xs = append(xs, x, math.Pow(10, float64(r.IntN(40)-20))*(r.Float64()*2-1))
	}
	for _, x := range xs {
		if got, want := formatExact(x), refFormatExact(x); got != want {
			t.Fatalf("formatExact(%v) = %q, want %q", x, got, want)
		}
	}
	m := MustUnit("mm")
	for _, x := range xs[:2000] {
		q := New(x, Length)
		got, err := FormatIn(q, m)
		v, _ := q.In(m)
		if want := refFormatExact(v) + " mm"; err != nil || got != want {
			t.Fatalf("FormatIn(%v m, mm) = %q, %v; want %q", x, got, err, want)
		}
	}
}

func TestFormatUncertain(t *testing.T) {
	tests := []struct {
		v, u float64
		want string
	}{
		{12.5, 0.2, "12.50 ± 0.20"},
		{3.0723e11, 4.1e9, "(3.072 ± 0.041)e11"},
		{-3.0723e11, 4.1e9, "(-3.072 ± 0.041)e11"},
		{1234, 123, "1230 ± 120"},
		{3, 50, "3 ± 50"},
		{0.1, 0.002, "0.1000 ± 0.0020"},
		{2.5, 0.0996, "2.50 ± 0.10"}, // the uncertainty rounds up to a new decade
		{0.0004, 0.5, "0.00 ± 0.50"},
		{1e-5, 3e-7, "(1.000 ± 0.030)e-5"},
		{0.02, 0.003, "0.0200 ± 0.0030"},
		{-0.001, 0.01, "-0.001 ± 0.010"},
		{-0.0001, 0.01, "0.000 ± 0.010"},
		{5e6, 5e6, "(5.0 ± 5.0)e6"},
		{1, 1e-18, "1.0000 ± 1.0000e-18"},
		{1, math.Inf(1), "1.0000 ± Inf"},
		// Subnormal numbers (below 2.2e-308): the last printed digit sits beyond 10^-308,
		// whose inverse power overflows (issue 13: "(N.aN ± 0.10)e-309").
		{0, 1e-310, "(0.0 ± 1.0)e-310"},
		{1e-310, 1e-311, "(1.00 ± 0.10)e-310"},
		{-3e-315, 2e-316, "(-3.00 ± 0.20)e-315"},
		{1e308, 1e307, "(1.00 ± 0.10)e308"},
	}
	for _, tt := range tests {
		if got := formatUncertain(tt.v, tt.u); got != tt.want {
			t.Errorf("formatUncertain(%g, %g) = %q, want %q", tt.v, tt.u, got, tt.want)
		}
	}
}

// goldenCases are the inputs of testdata/format.golden: each line of the
// golden file is the input, a tab, and Format of the parsed quantity.
var goldenCases = []string{
	"20 um", "12.5 ± 0.2 um", "3.1e11 cm^-2", "(3.072 ± 0.041)e11 cm^-2", "0.067 m_e", "5",
	"2e6 cm^2/(V s)", "1.5 kOhm", "10 mT", "1 G", "2080.5 Ohm/T", "0.161199 T^-1", "1 eV", "15 eV",
	"3 Å", "250 nm", "0.5 um", "2 mm", "15 mm", "25 m", "38.094 ps", "1 ns", "5 us", "2 s", "20 mK",
	"4 GHz", "0.35 V", "-0.35 V", "10 nA", "2 uA", "114.22 nF/cm^2", "2.3723e5 m/s", "1.37294e8 m^-1",
	"57.883818060 ueV/T", "0.0861733 meV/K", "2.7988e10 cm^-2 meV^-1", "7.1290e11 cm^-2 V^-1",
	"25812.807459 Ohm", "3.874045865e-5 S", "1e18 cm^-3", "100 um^2", "1 Torr", "1 mol", "1 W/K",
	"0 um", "-Inf Ohm", "NaN", "45 deg", "10 %", "1.054571817e-34 J s", "8.8541878128e-12 F/m",
	"12.5 +/- 0.2 um", "100 ± 0 Ohm",
	"115 °C", "-20 degC", "1150 ± 2 °C", "1 T/min", "1 W/cm^2", "1 nm/s", "0.8 ML(GaAs)/s", "1 um/h",
	"90 mJ/cm^2", "20 sccm", "5 mL", "1 Oe", "3 inch", "5 ppm", "2.5e-6 Ohm cm^2", "4000 rpm", "5 mTorr",
}

func TestFormatGolden(t *testing.T) {
	var b strings.Builder
	for _, in := range goldenCases {
		q, err := ParseQuantity(in)
		if err != nil {
			t.Fatalf("ParseQuantity(%q): %v", in, err)
		}
		fmt.Fprintf(&b, "%s\t%s\n", in, Format(q))
	}
	testutil.GoldenString(t, filepath.Join("testdata", "format.golden"), b.String())
}

// TestFormatIdempotent: formatting a parsed Format output gives it back.
func TestFormatIdempotent(t *testing.T) {
	for _, in := range goldenCases {
		once := Format(must(ParseQuantity(in)))
		twice := Format(must(ParseQuantity(once)))
		if once != twice {
			t.Errorf("%q: %q then %q", in, once, twice)
		}
	}
}

// TestCustomaryTable checks that every display rule names units of its own
// dimension and that no two rules share a dimension (a duplicate key would
// silently replace an earlier rule).
func TestCustomaryTable(t *testing.T) {
	if len(displayRules) != len(displayTable) {
		t.Errorf("%d display rules from %d table rows: a duplicate dimension", len(displayRules), len(displayTable))
	}
	for d, r := range displayRules {
		for _, s := range append(r.steps, step{sym: r.zero}) {
			if u := parsedDisplay()[s.sym]; u.D != d {
				t.Errorf("rule for %v uses %q of dimension %v", d, s.sym, u.D)
			}
		}
	}
	// Dimensions without a rule fall back to SI base units.
	q := New(2, Dim{IdxMass: 1, IdxTemperature: -2})
	if got := Format(q); got != "2.0000 kg K^-2" {
		t.Errorf("fallback format %q", got)
	}
}

// TestCustomaryOutOfRange: a value or uncertainty that would overflow, or
// lose digits to the subnormal range, in the customary unit is written in SI
// base units instead (found by FuzzParseQuantity: 1e300 g printed as Inf m_e).
func TestCustomaryOutOfRange(t *testing.T) {
	tests := []struct {
		q    Quantity
		want string
	}{
		{New(1e297, Mass), "1.0000e297 kg"},
		{Uncertain(1, 1e297, Mass), "(0.0 ± 1.0)e297 kg"},
		{New(1e-300, Mass), "1.0978e-270 m_e"},            // ordinary case: still m_e
		{New(1e-319, Length.Pow(-2)), "9.9999e-320 m^-2"}, // 1e-323 cm^-2 would be subnormal
	}
	for _, tc := range tests {
		if got := Format(tc.q); got != tc.want {
			t.Errorf("Format(%v %v) = %q, want %q", tc.q.Value(), tc.q.Dim(), got, tc.want)
		}
	}
}

func TestFormatIn(t *testing.T) {
	q := Uncertain(3.1e15, 2e13, Length.Pow(-2))
	got, err := FormatIn(q, MustUnit("m^-2"))
	if err != nil || got != "(3.100 ± 0.020)e15 m^-2" {
		t.Errorf("FormatIn = %q, %v", got, err)
	}
	if _, err := FormatIn(q, MustUnit("T")); !errors.Is(err, ErrDimMismatch) {
		t.Errorf("FormatIn(density, T) error %v", err)
	}
	if got, _ := FormatIn(Scalar(0.5), MustUnit("%")); got != "50.000 %" {
		t.Errorf("FormatIn(0.5, %%) = %q", got)
	}
}

func TestParseQuantity(t *testing.T) {
	tests := []struct {
		in       string
		v, sigma float64
		d        Dim
	}{
		{"20 um", 2e-5, 0, Length},
		{"20um", 2e-5, 0, Length},
		{"  20   um  ", 2e-5, 0, Length},
		{"12.5 ± 0.2 um", 12.5e-6, 0.2e-6, Length},
		{"12.5±0.2um", 12.5e-6, 0.2e-6, Length},
		{"12.5 +/- 0.2 um", 12.5e-6, 0.2e-6, Length},
		{"3.1e11 cm^-2", 3.1e15, 0, Length.Pow(-2)},
		{"3.1E11 cm^-2", 3.1e15, 0, Length.Pow(-2)},
		{"(3.072 ± 0.041)e11 cm^-2", 3.072e15, 0.041e15, Length.Pow(-2)},
		{"( 3.072 +/- 0.041 )e+11 cm^-2", 3.072e15, 0.041e15, Length.Pow(-2)},
		{"(1.5 ± 0.1) T", 1.5, 0.1, dimField},
		{"0.067 m_e", 0.067 * 9.1093837015e-31, 0, Mass},
		{"5", 5, 0, Dimensionless},
		{"-0.35 V", -0.35, 0, dimVoltage},
		{"−0.35 V", -0.35, 0, dimVoltage},
		{"+2 T", 2, 0, dimField},
		{".5 T", 0.5, 0, dimField},
		{"5. T", 5, 0, dimField},
		{"3 eV", 3 * 1.602176634e-19, 0, dimEnergy},
		{"3eV", 3 * 1.602176634e-19, 0, dimEnergy},
		{"2e6 cm^2/(V s)", 200, 0, dimMobility},
		{"1e400 m", math.Inf(1), 0, Length},
		{"12.5 um ± 0.2 um", 12.5e-6, 0.2e-6, Length},
		{"12.5 um +/- 200 nm", 12.5e-6, 0.2e-6, Length},
		{"12.5 um ± 0.2", 12.5e-6, 0.2e-6, Length},
		{"3.1e11 cm^-2 ± 2e9 cm^-2", 3.1e15, 2e13, Length.Pow(-2)},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			q, err := ParseQuantity(tt.in)
			if err != nil {
				t.Fatal(err)
			}
			if q.Dim() != tt.d || !testutil.WithinRel(q.Value(), tt.v, 1e-15) || !testutil.WithinRel(q.Uncertainty(), tt.sigma, 1e-14) {
				t.Errorf("got %g ± %g %v, want %g ± %g %v", q.Value(), q.Uncertainty(), q.Dim(), tt.v, tt.sigma, tt.d)
			}
		})
	}
}

func TestParseQuantityErrors(t *testing.T) {
	tests := []struct {
		in      string
		offset  int
		unitErr bool
	}{
		{"", 0, false},
		{"um", 0, false},
		{"12.5 ± um", 8, false},
		{"12.5 ± -0.2 um", 0, false},
		{"(12.5 um", 6, false},
		{"(12.5 ± 0.2 um", 0, false},
		{"(12.5 ± 0.2)e um", 13, false},
		{"20 furlong", 3, true},
		{"20 cm^2/V s", 7, true},
		{"- 5", 0, false},
		{"12.5 um ± x", 11, false},
		{"12.5 um ± 0.2 furlong", 15, true},
		{"12.5 furlong ± 0.2 um", 5, true},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			_, err := ParseQuantity(tt.in)
			var off int
			var ue *UnitError
			var se *SyntaxError
			switch {
			case tt.unitErr && errors.As(err, &ue):
				off = ue.Offset
				if ue.Input != tt.in {
					t.Errorf("Input %q", ue.Input)
				}
			case !tt.unitErr && errors.As(err, &se) && errors.Is(err, ErrSyntax):
				off = se.Offset
			default:
				t.Fatalf("error %v (%T)", err, err)
			}
			if off != tt.offset {
				t.Errorf("offset %d, want %d: %v", off, tt.offset, err)
			}
		})
	}
	if _, err := ParseQuantity("12.5 um ± 0.2 T"); !errors.Is(err, ErrDimMismatch) {
		t.Errorf("mixed-dimension uncertainty: %v", err)
	}
}

// randomQuantity draws a quantity of a customary dimension over many decades.
func randomQuantity(r *rand.Rand) Quantity {
	dims := make([]Dim, 0, len(displayRules)+1)
	for d := range displayRules {
		dims = append(dims, d)
	}
	dims = append(dims, Dim{IdxMass: 2, IdxAmount: -1})
	// Map iteration order is random; sort for a reproducible draw.
	sortDims(dims)
	d := dims[r.IntN(len(dims))]
	v := math.Pow(10, r.Float64()*60-30) * float64(1-2*r.IntN(2))
	if r.IntN(2) == 0 {
		return New(v, d)
	}
	return Uncertain(v, math.Abs(v)*math.Pow(10, r.Float64()*8-7), d)
}

func sortDims(ds []Dim) {
	for i := 1; i < len(ds); i++ {
		for j := i; j > 0 && ds[j].String() < ds[j-1].String(); j-- {
			ds[j], ds[j-1] = ds[j-1], ds[j]
		}
	}
}

// checkRoundTrip asserts that Format(q) parses back to q's dimension, to
// its value within the printed precision, and to its uncertainty within the
// rounding of two significant figures.
func checkRoundTrip(t *testing.T, q Quantity) {
	t.Helper()
	s := Format(q)
	p, err := ParseQuantity(s)
	if err != nil {
		t.Fatalf("Format gave %q, which does not parse: %v", s, err)
	}
	if p.Dim() != q.Dim() {
		t.Fatalf("%q: dimension %v, want %v", s, p.Dim(), q.Dim())
	}
	v, pv := q.Value(), p.Value()
	if math.IsNaN(v) || math.IsInf(v, 0) {
		if !(math.IsNaN(v) && math.IsNaN(pv)) && v != pv {
			t.Fatalf("%q: %g, want %g", s, pv, v)
		}
		return
	}
	u := q.Uncertainty()
	// Exact: 5 significant figures, so half a unit in the 5th digit.
	tol := 5e-5 * math.Abs(v) * 1.0000001
	cu := Customary(q)
	if q.HasUncertainty() && fromSI(u, cu.Scale) < 1e-8*math.Abs(fromSI(v, cu.Scale)) {
		// A relative uncertainty below 1e-8 is written like an exact value
		// (see the package documentation): the text carries no uncertainty.
		if p.HasUncertainty() {
			t.Fatalf("%q: relative uncertainty %g printed, want an exact-looking value", s, u/math.Abs(v))
		}
	} else if q.HasUncertainty() {
		// The value is rounded to the last digit of a 2-digit uncertainty:
		// at most 0.05 u (plus 0.5e-16 |v| for binary rounding).
		tol = max(0.051*u, tol*(u/math.Abs(v))) + 1e-15*math.Abs(v)
		if math.Log10(math.Abs(v)/u) > 15 {
			tol = 5e-5 * math.Abs(v) * 1.0000001
		}
		if pu := p.Uncertainty(); math.Abs(pu-u) > 0.0501*u {
			t.Fatalf("%q: uncertainty %g, want %g", s, pu, u)
		}
	}
	if math.Abs(pv-v) > tol {
		t.Fatalf("%q: value %.17g, want %.17g (tol %g)", s, pv, v, tol)
	}
}

func TestFormatRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	for range 20000 {
		checkRoundTrip(t, randomQuantity(r))
	}
}
