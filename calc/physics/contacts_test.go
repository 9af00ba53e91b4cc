package physics

import (
	"errors"
	"math"
	"strings"
	"testing"

	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

func mustQ(s string) quantity.Quantity {
	q, err := quantity.ParseQuantity(s)
	if err != nil {
		panic(err)
	}
	return q
}

// TestTransferLength checks the closed forms (Berger 1972; Reeves and Harrison 1982;
// Schroder, 3rd ed., ch. 3, from memory) with the worked check of the project's reference
// notes (computed there, not the book's): W = 100 µm, R_sh = 1000 Ohm, R_c = 5 Ohm give
// R_c W = 0.5 Ohm mm, L_T = 0.5 µm and ρ_c = 2.5e-6 Ohm cm². The line is then
// R_T = 10 Ohm + (1000 Ohm/100 µm) d.
func TestTransferLength(t *testing.T) {
	tl, err := TransferLength(mustQ("10 Ohm/um"), mustQ("10 Ohm"), mustQ("100 um"), quantity.New(0, quantity.Length))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		got  quantity.Quantity
		unit string
		want float64
	}{
		{"Rc", tl.Rc, "Ohm", 5},
		{"Rsh", tl.Rsh, "Ohm", 1000},
		{"RcW", tl.RcW, "Ohm mm", 0.5},
		{"LT", tl.LT, "um", 0.5},
		{"rho_c", tl.RhoC, "Ohm cm^2", 2.5e-6},
	} {
		v, err := c.got.In(quantity.MustUnit(c.unit))
		if err != nil || !testutil.WithinRel(v, c.want, 1e-12) {
			t.Errorf("%s = %v %s, %v; want %v", c.name, v, c.unit, err, c.want)
		}
	}
	if tl.Corrected {
		t.Error("no contact length given, yet corrected")
	}
}

// TestTransferLengthShortContacts: with the contact length L given, L_T solves
// L_x = L_T coth(L/L_T), the front resistance of a finite contact (Berger 1972). Made from a
// known L_T, the extrapolated L_x gives it back, and the uncertainty follows the implicit
// derivative (checked against a finite difference).
func TestTransferLengthShortContacts(t *testing.T) {
	const W, Rsh = 100e-6, 1000.0
	for _, c := range []struct{ LT, L float64 }{{2e-6, 3e-6}, {0.5e-6, 50e-6}, {5e-6, 2e-6}} {
		lx := c.LT / math.Tanh(c.L/c.LT)
		Rc := Rsh * lx / W
		slope := quantity.Uncertain(Rsh/W, 1e3, quantity.MustUnit("Ohm/m").D)
		tl, err := TransferLength(slope, quantity.New(2*Rc, quantity.MustUnit("Ohm").D), quantity.New(W, quantity.Length), quantity.New(c.L, quantity.Length))
		if err != nil {
			t.Fatal(err)
		}
		if !tl.Corrected || !testutil.WithinRel(tl.LT.Value(), c.LT, 1e-12) {
			t.Errorf("L = %v: L_T = %v, want %v", c.L, tl.LT.Value(), c.LT)
		}
		// dL_T/dslope by a finite difference of the whole chain.
		h := 1e-6 * slope.Value()
		tl2, _ := TransferLength(quantity.New(slope.Value()+h, slope.Dim()), quantity.New(2*Rc, quantity.MustUnit("Ohm").D), quantity.New(W, quantity.Length), quantity.New(c.L, quantity.Length))
		want := math.Abs((tl2.LT.Value() - tl.LT.Value()) / h * 1e3)
		if !testutil.WithinRel(tl.LT.Uncertainty(), want, 1e-4) {
			t.Errorf("L = %v: σ(L_T) = %v, finite difference %v", c.L, tl.LT.Uncertainty(), want)
		}
	}
}

func TestTransferLengthErrors(t *testing.T) {
	zero := quantity.New(0, quantity.Length)
	tl, err := TransferLength(mustQ("10 Ohm/um"), mustQ("-0.4 Ohm"), mustQ("100 um"), zero)
	if !errors.Is(err, ErrNoTransferLength) || tl.Rc.Value() != -0.2 || tl.Rsh.Value() != 1000 {
		t.Errorf("negative intercept: %+v, %v", tl, err)
	}
	if _, err := TransferLength(mustQ("10 Ohm"), mustQ("1 Ohm"), mustQ("100 um"), zero); !errors.Is(err, quantity.ErrDimMismatch) {
		t.Errorf("slope in Ohm: %v", err)
	}
	if _, err := TransferLength(mustQ("10 Ohm/um"), mustQ("1 Ohm"), mustQ("0 um"), zero); !errors.Is(err, quantity.ErrDomain) {
		t.Errorf("zero width: %v", err)
	}
}

// TestContactResistance: R_c = (R_2t − R_ch)/n (common practice).
func TestContactResistance(t *testing.T) {
	rc, err := ContactResistance(mustQ("3.3 kOhm"), mustQ("3000 Ohm"), 2)
	if err != nil || !testutil.WithinRel(rc.Value(), 150, 1e-12) {
		t.Errorf("R_c = %v, %v", rc, err)
	}
	if _, err := ContactResistance(mustQ("3.3 kOhm"), mustQ("3 T"), 2); !errors.Is(err, quantity.ErrDimMismatch) {
		t.Errorf("field as channel: %v", err)
	}
	if _, err := ContactResistance(mustQ("3.3 kOhm"), mustQ("3 Ohm"), 0); !errors.Is(err, quantity.ErrDomain) {
		t.Errorf("no contacts: %v", err)
	}
}

// TestFabClosedForms: rate = depth/time, depth = rate·time, dose = intensity·time.
func TestFabClosedForms(t *testing.T) {
	r, _ := EtchRate(mustQ("148 nm"), mustQ("4 min"))
	if v, _ := r.In(quantity.MustUnit("nm/min")); !testutil.WithinRel(v, 37, 1e-12) {
		t.Errorf("etch rate %v nm/min", v)
	}
	d, _ := EtchDepth(r, mustQ("3 min"))
	if v, _ := d.In(quantity.MustUnit("nm")); !testutil.WithinRel(v, 111, 1e-12) {
		t.Errorf("depth %v nm", v)
	}
	dose, _ := Dose(mustQ("12 mW/cm^2"), mustQ("6 s"))
	if v, _ := dose.In(quantity.MustUnit("mJ/cm^2")); !testutil.WithinRel(v, 72, 1e-12) {
		t.Errorf("dose %v mJ/cm^2", v)
	}
	if _, err := EtchRate(mustQ("148 nm"), mustQ("0 s")); !errors.Is(err, quantity.ErrDomain) {
		t.Errorf("zero etch time: %v", err)
	}
	if _, err := Dose(mustQ("12 mW"), mustQ("6 s")); !errors.Is(err, quantity.ErrDimMismatch) {
		t.Errorf("power for intensity: %v", err)
	}
}

func TestParseStack(t *testing.T) {
	l, err := ParseStack("Ni/AuGe/Ni/Au 5/150/30/100 nm")
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, x := range l {
		names = append(names, x.Metal)
	}
	if strings.Join(names, "/") != "Ni/AuGe/Ni/Au" || !testutil.WithinRel(StackThickness(l).Value(), 285e-9, 1e-12) {
		t.Errorf("%v, total %v", names, StackThickness(l))
	}
	if l, err := ParseStack("  Ti/Au 0.01/0.09 um "); err != nil || !testutil.WithinRel(StackThickness(l).Value(), 100e-9, 1e-12) {
		t.Errorf("Ti/Au in um: %v %v", l, err)
	}
	for _, c := range []struct {
		in  string
		col int
	}{
		{"", 1},
		{"Ni/AuGe 5/150", 14},
		{"Ni/AuGe 5 nm", 9},
		{"Ni/AuGe/Au 5/150 nm", 12},
		{"Ni/ 5 nm", 4},
		{"Ti/Au 10/90 Ohm", 13},
		{"Ti/Au 10/90 furlong", 13},
		{"5/10 nm", 1},
		{"Ti/Au 10/x nm", 10},
	} {
		_, err := ParseStack(c.in)
		var se *StackError
		if !errors.As(err, &se) {
			t.Errorf("%q: %v, want a StackError", c.in, err)
			continue
		}
		if got := utf8Col(se); got != c.col {
			t.Errorf("%q: column %d, want %d (%v)", c.in, got, c.col, err)
		}
	}
}

func utf8Col(e *StackError) int { return len([]rune(e.Input[:e.Offset])) + 1 }

// FuzzParseStack: the stack parser never panics, errors point inside the input, and a
// parsed stack has one positive-or-zero length per metal.
func FuzzParseStack(f *testing.F) {
	for _, s := range []string{"Ni/AuGe/Ni/Au 5/150/30/100 nm", "Ti/Au 10/90 nm", "", "/", "Au 1e3 nm", "Au 5 ML(GaAs)", "Ni/ 5 nm", "Ä/Ö 1/2 µm", "Ti/Au 10/90 Ohm"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		l, err := ParseStack(s)
		if err != nil {
			var se *StackError
			if !errors.As(err, &se) || se.Offset < 0 || se.Offset > len(s) {
				t.Fatalf("%q: %v", s, err)
			}
			_ = se.Error()
			return
		}
		if len(l) == 0 {
			t.Fatalf("%q: no layers and no error", s)
		}
		for _, x := range l {
			if x.Metal == "" || x.Thickness.Dim() != quantity.Length || !(x.Thickness.Value() >= 0) {
				t.Fatalf("%q: layer %+v", s, x)
			}
		}
	})
}
