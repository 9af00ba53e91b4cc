package quantity

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"sync"
	"testing"
)

var unitSeeds = []string{
	"m", "um", "µm", "cm^-2", "cm^2/(V s)", "kOhm", "Ω", "m_e", "Å", "A", "meV/T", "(m^2)^(1/2)",
	"kg m^2 s^-2", "J·s", "1/T", "cm^2/V s", "m^(1/2)", "", "((m))", "m^-(1)", "%", "deg", "°",
	"Torr", "mbar", "dam", "m^(-3/3)", "kg*m", "m^100 m^100", "\xff", "m^", "(",
	"°C", "degC/min", "\u2103", "°F", "°", "ML(GaAs)/s", "ML(Al(0.3)Ga(0.7)As)", "ML(", "ML()", "ML(Si)",
	"sccm", "rpm^2", "mTorr", "kOe", "uL", "inch", "ppm",
}

// checkUnitMemo: ParseUnit, the first time and from its memo, gives what parsing afresh gives:
// the same unit or the same error.
func checkUnitMemo(t *testing.T, s string) {
	t.Helper()
	want, wantErr := parseUnit(s)
	for i := range 2 {
		got, err := ParseUnit(s)
		if fmt.Sprintf("%+v %v", got, err) != fmt.Sprintf("%+v %v", want, wantErr) {
			t.Fatalf("ParseUnit(%q) call %d = %+v, %v; parsed afresh %+v, %v", s, i+1, got, err, want, wantErr)
		}
		if err != nil && fmt.Sprintf("%#v", err) != fmt.Sprintf("%#v", wantErr) {
			t.Fatalf("ParseUnit(%q) call %d: error %#v, parsed afresh %#v", s, i+1, err, wantErr)
		}
	}
}

// TestUnitMemo: the memo of parsed units changes no unit and no error, with texts padded
// with spaces, long texts (parsed each time) and texts parsed from many goroutines at once
// (run with -race).
func TestUnitMemo(t *testing.T) {
	texts := append(append([]string(nil), unitSeeds...), " T ", "T ", " cm^-2", strings.Repeat("m ", 40), "µm\t")
	for _, s := range texts {
		checkUnitMemo(t, s)
	}
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range 40 {
				s := texts[(g*7+i)%len(texts)]
				want, wantErr := parseUnit(s)
				got, err := ParseUnit(s)
				if fmt.Sprintf("%+v %v", got, err) != fmt.Sprintf("%+v %v", want, wantErr) {
					t.Errorf("ParseUnit(%q) = %+v, %v; want %+v, %v", s, got, err, want, wantErr)
					return
				}
			}
		}()
	}
	wg.Wait()
}

// FuzzParseUnit: ParseUnit never panics; an accepted unit has a positive
// (or at worst non-NaN) scale, and its dimension's SI string parses back to
// the same dimension with scale 1.
func FuzzParseUnit(f *testing.F) {
	for _, s := range unitSeeds {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		checkUnitMemo(t, s)
		u, err := ParseUnit(s)
		if err != nil {
			var ue *UnitError
			if !errors.As(err, &ue) || ue.Offset < 0 || ue.Offset > len(s) {
				t.Fatalf("ParseUnit(%q): bad error %v", s, err)
			}
			return
		}
		if math.IsNaN(u.Scale) || u.Scale < 0 {
			t.Fatalf("ParseUnit(%q): scale %g", s, u.Scale)
		}
		if u.D.IsDimensionless() {
			return
		}
		v, err := ParseUnit(u.D.String())
		if err != nil || v.D != u.D || v.Scale != 1 {
			t.Fatalf("ParseUnit(%q) = %v; its SI form %q gives %v, %v", s, u.D, u.D.String(), v, err)
		}
	})
}

// FuzzParseQuantity: ParseQuantity never panics, errors carry an offset
// inside the input, and a parsed quantity formats and re-parses to the same
// dimension and to its value within the printed precision.
func FuzzParseQuantity(f *testing.F) {
	for _, s := range goldenCases {
		f.Add(s)
	}
	for _, s := range []string{"(1 ± 2)e3 m", "1e-320 m", "1e308 km", "5e-324 ± 1e-300", "( 1 ± 1 )", "1 ± Inf", "-Inf ± 1 m", "+.e1", "12 um ± 1 T", "1 m +/- 2 cm"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		q, err := ParseQuantity(s)
		if err != nil {
			var ue *UnitError
			var se *SyntaxError
			switch {
			case errors.As(err, &ue):
				if ue.Offset < 0 || ue.Offset > len(s) {
					t.Fatalf("%q: offset %d", s, ue.Offset)
				}
			case errors.As(err, &se):
				if se.Offset < 0 || se.Offset > len(s) {
					t.Fatalf("%q: offset %d", s, se.Offset)
				}
			case errors.Is(err, ErrDimMismatch):
				// "12 um ± 1 T": value and uncertainty units disagree.
			default:
				t.Fatalf("%q: untyped error %v", s, err)
			}
			return
		}
		if u := q.Uncertainty(); math.IsInf(u, 0) || math.IsNaN(u) || math.IsInf(q.Value(), 0) {
			return // no precision to compare against
		}
		checkRoundTrip(t, q)
	})
}
