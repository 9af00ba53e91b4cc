package quantity

import (
	"errors"
	"math/rand/v2"
	"testing"
)

func TestDimString(t *testing.T) {
	tests := []struct {
		name string
		d    Dim
		want string
	}{
		{"dimensionless", Dimensionless, ""},
		{"length", Length, "m"},
		{"sheet density", Length.Pow(-2), "m^-2"},
		// J = kg m^2 s^-2 (SI Brochure, 9th ed., Table 4).
		{"energy", dimEnergy, "kg m^2 s^-2"},
		// m^2/(V s) = kg^-1 s^2 A (V = kg m^2 s^-3 A^-1, SI Brochure Table 4).
		{"mobility", MustUnit("cm^2/(V s)").D, "kg^-1 s^2 A"},
		{"all base units", Dim{1, 1, 1, 1, 1, 1, 1}, "kg m s A K mol cd"},
		{"extreme exponents", Dim{-128, 127}, "kg^127 m^-128"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := tt.d.String(); got != tt.want {
				t.Errorf("String() = %q, want %q", got, tt.want)
			}
		})
	}
}

func randDim(r *rand.Rand, lim int) Dim {
	var d Dim
	for i := range d {
		d[i] = int8(r.IntN(2*lim+1) - lim)
	}
	return d
}

// TestDimAlgebra checks the group laws of dimensions on random exponents:
// (a b)/b = a, a b = b a, a^n = a·a·…·a, a^n a^m = a^(n+m).
func TestDimAlgebra(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for range 2000 {
		a, b := randDim(r, 8), randDim(r, 8)
		if got := a.Mul(b).Div(b); got != a {
			t.Fatalf("(%v)(%v)/(%v) = %v", a, b, b, got)
		}
		if a.Mul(b) != b.Mul(a) {
			t.Fatalf("Mul not commutative for %v, %v", a, b)
		}
		n, m := r.IntN(7)-3, r.IntN(7)-3
		rep := Dimensionless
		for range max(n, -n) {
			if n > 0 {
				rep = rep.Mul(a)
			} else {
				rep = rep.Div(a)
			}
		}
		if got := a.Pow(n); got != rep {
			t.Fatalf("(%v)^%d = %v, repeated product gives %v", a, n, got, rep)
		}
		if a.Pow(n).Mul(a.Pow(m)) != a.Pow(n+m) {
			t.Fatalf("(%v)^%d (%v)^%d != (%v)^%d", a, n, a, m, a, n+m)
		}
		if a.Div(a) != Dimensionless || !a.Div(a).IsDimensionless() {
			t.Fatalf("%v/%v not dimensionless", a, a)
		}
	}
}

// TestDimStringParses checks that Dim.String is accepted by ParseUnit and
// names the same dimension with scale 1.
func TestDimStringParses(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for range 2000 {
		d := randDim(r, 6)
		if d.IsDimensionless() {
			continue
		}
		u, err := ParseUnit(d.String())
		if err != nil {
			t.Fatalf("ParseUnit(%q): %v", d.String(), err)
		}
		if u.D != d || u.Scale != 1 {
			t.Fatalf("ParseUnit(%q) = %v scale %g, want %v scale 1", d.String(), u.D, u.Scale, d)
		}
	}
}

func TestMulChecked(t *testing.T) {
	if _, ok := (Dim{100}).MulChecked(Dim{27}); !ok {
		t.Error("100+27 reported as overflow")
	}
	if _, ok := (Dim{100}).MulChecked(Dim{28}); ok {
		t.Error("100+28 not reported as overflow")
	}
	if _, ok := (Dim{0, -100}).MulChecked(Dim{0, -29}); ok {
		t.Error("-100-29 not reported as overflow")
	}
}

func TestDimError(t *testing.T) {
	_, err := Add(New(1, Length), New(1, Time))
	var de *DimError
	if !errors.As(err, &de) || !errors.Is(err, ErrDimMismatch) {
		t.Fatalf("Add(m, s) error = %v, want *DimError wrapping ErrDimMismatch", err)
	}
	if de.Op != "+" || de.Left != Length || de.Right != Time {
		t.Errorf("DimError = %+v", de)
	}
	if want := `dimension mismatch in "+": m vs s`; err.Error() != want {
		t.Errorf("message %q, want %q", err.Error(), want)
	}
}
