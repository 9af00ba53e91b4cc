package quantity

import (
	"cleave/internal/testutil"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"
)

func must(q Quantity, err error) Quantity {
	if err != nil {
		panic(err)
	}
	return q
}

// TestCorrelations checks that derivatives are tracked per input, so that
// correlated terms cancel or add exactly.
func TestCorrelations(t *testing.T) {
	x := Uncertain(4, 0.2, Length)
	y := Uncertain(3, 0.1, Length)
	tests := []struct {
		name      string
		q         Quantity
		wantV     float64
		wantSigma float64
		wantExact bool
	}{
		{"x - x", must(Sub(x, x)), 0, 0, true},
		{"x + x = 2x", must(Add(x, x)), 8, 0.4, false},
		// x*x: relative uncertainty doubles, 2*0.05 = 0.1 of 16.
		{"x * x", Mul(x, x), 16, 1.6, false},
		{"x / x", Div(x, x), 1, 0, true},
		{"(x + y) - x", must(Sub(must(Add(x, y)), x)), 3, 0.1, false},
		// x - y independent: sqrt(0.2^2 + 0.1^2) (GUM, JCGM 100:2008 eq. 10, from memory).
		{"x - y", must(Sub(x, y)), 1, math.Sqrt(0.05), false},
		// x*y: relative uncertainties in quadrature: 12*sqrt(0.05^2 + (0.1/3)^2).
		{"x * y", Mul(x, y), 12, 12 * math.Hypot(0.05, 0.1/3), false},
		{"x * y / y", Div(Mul(x, y), y), 4, 0.2, false},
		{"-x + x", must(Add(x.Neg(), x)), 0, 0, true},
		{"3x - x - 2x", must(Sub(must(Sub(x.Scale(3), x)), x.Scale(2))), 0, 0, true},
		{"sqrt(x*x) = x", must(Sqrt(Mul(x, x))), 4, 0.2, false},
		{"x^-1 * x", Mul(must(Pow(x, -1)), x), 1, 0, true},
		{"0 * x", Mul(Scalar(0), x), 0, 0, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if !testutil.WithinRel(tt.q.Value(), tt.wantV, 1e-15) {
				t.Errorf("value %g, want %g", tt.q.Value(), tt.wantV)
			}
			if !testutil.WithinRel(tt.q.Uncertainty(), tt.wantSigma, 1e-14) {
				t.Errorf("uncertainty %g, want %g", tt.q.Uncertainty(), tt.wantSigma)
			}
			if tt.q.HasUncertainty() == tt.wantExact {
				t.Errorf("HasUncertainty() = %v, want %v", tt.q.HasUncertainty(), !tt.wantExact)
			}
		})
	}
}

// TestPropagationClosedForms compares first-order propagation through
// Pow, Sqrt and Apply with the closed-form derivatives.
func TestPropagationClosedForms(t *testing.T) {
	x := Uncertain(2, 0.01, Dimensionless)
	tests := []struct {
		name      string
		q         Quantity
		wantV     float64
		wantSigma float64
	}{
		// d(x^p)/dx = p x^(p-1).
		{"x^3", must(Pow(x, 3)), 8, 3 * 4 * 0.01},
		{"x^2.5", must(Pow(x, 2.5)), math.Pow(2, 2.5), 2.5 * math.Pow(2, 1.5) * 0.01},
		{"sqrt x", must(Sqrt(x)), math.Sqrt2, 0.5 / math.Sqrt2 * 0.01},
		{"x^0", must(Pow(x, 0)), 1, 0},
		// d(exp x)/dx = exp x; d(ln x)/dx = 1/x; d(sin x)/dx = cos x.
		{"exp x", must(Apply(x, math.Exp, math.Exp)), math.Exp(2), math.Exp(2) * 0.01},
		{"ln x", must(Apply(x, math.Log, func(v float64) float64 { return 1 / v })), math.Ln2, 0.005},
		{"sin x", must(Apply(x, math.Sin, math.Cos)), math.Sin(2), math.Abs(math.Cos(2)) * 0.01},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if !testutil.WithinRel(tt.q.Value(), tt.wantV, 1e-14) || !testutil.WithinRel(tt.q.Uncertainty(), tt.wantSigma, 1e-13) {
				t.Errorf("got %g ± %g, want %g ± %g", tt.q.Value(), tt.q.Uncertainty(), tt.wantV, tt.wantSigma)
			}
		})
	}
}

func TestPowDimensions(t *testing.T) {
	area := New(4e-12, Length.Pow(2))
	side, err := Sqrt(area)
	if err != nil || side.Dim() != Length || !testutil.WithinRel(side.Value(), 2e-6, 1e-15) {
		t.Errorf("Sqrt(4 um^2) = %v, %v", side, err)
	}
	if _, err := Sqrt(New(1, Length)); !errors.Is(err, ErrNonIntegerDim) {
		t.Errorf("Sqrt(1 m) error %v, want ErrNonIntegerDim", err)
	}
	if _, err := Pow(New(2, Length), 1.0/3); !errors.Is(err, ErrNonIntegerDim) {
		t.Errorf("Pow(m, 1/3) error %v, want ErrNonIntegerDim", err)
	}
	if q, err := Pow(New(8, Length.Pow(3)), 1.0/3); err != nil || q.Dim() != Length || !testutil.WithinRel(q.Value(), 2, 1e-15) {
		t.Errorf("Pow(8 m^3, 1/3) = %v, %v", q, err)
	}
	if _, err := Pow(New(2, Length.Pow(100)), 2); !errors.Is(err, ErrNonIntegerDim) {
		t.Errorf("Pow(m^100, 2) error %v, want an out-of-range error", err)
	}
	if _, err := Sqrt(Scalar(-1)); !errors.Is(err, ErrDomain) {
		t.Errorf("Sqrt(-1) error %v, want ErrDomain", err)
	}
	if q, err := Pow(Scalar(-2), 3); err != nil || q.Value() != -8 {
		t.Errorf("Pow(-2, 3) = %v, %v", q, err)
	}
}

func TestApplyErrors(t *testing.T) {
	if _, err := Apply(New(1, Length), math.Exp, math.Exp); !errors.Is(err, ErrDimMismatch) {
		t.Errorf("exp(1 m) error %v, want ErrDimMismatch", err)
	}
	if _, err := Apply(Scalar(-1), math.Log, func(v float64) float64 { return 1 / v }); !errors.Is(err, ErrDomain) {
		t.Errorf("log(-1) error %v, want ErrDomain", err)
	}
}

func TestAddSubDimMismatch(t *testing.T) {
	n := New(3e15, Length.Pow(-2))
	for _, f := range []func(a, b Quantity) (Quantity, error){Add, Sub} {
		if _, err := f(n, New(1, Length.Pow(-3))); !errors.Is(err, ErrDimMismatch) {
			t.Errorf("got %v, want ErrDimMismatch", err)
		}
	}
}

func TestDivByZero(t *testing.T) {
	q := Div(New(1, Length), New(0, Time))
	if !math.IsInf(q.Value(), 1) || q.Dim() != Length.Div(Time) {
		t.Errorf("1 m / 0 s = %v", q)
	}
}

// TestDerived builds the Hall density n = 1/(e |slope|) through Derived and
// checks it against [src:W12] (2080.5 Ohm/T gives 3.0000e11 cm^-2)
// and its uncertainty against the closed form sigma_n = n sigma_s/s.
func TestDerived(t *testing.T) {
	slope := Uncertain(2080.5, 20.805, dimResistance.Div(dimField))
	s := slope.Value()
	n := Derived(1/(ElementaryCharge*s), Length.Pow(-2), []Quantity{slope}, []float64{-1 / (ElementaryCharge * s * s)})
	if got, _ := n.In(MustUnit("cm^-2")); !testutil.WithinRel(got, 3.0000e11, 1e-4) {
		t.Errorf("n = %g cm^-2, want 3.0000e11 ([src:W12])", got)
	}
	if !testutil.WithinRel(n.Uncertainty()/n.Value(), 0.01, 1e-12) {
		t.Errorf("relative uncertainty %g, want 0.01", n.Uncertainty()/n.Value())
	}
	// Derived with a repeated input sums its partials: f = x + x.
	x := Uncertain(1, 0.5, Dimensionless)
	f := Derived(2, Dimensionless, []Quantity{x, x}, []float64{1, 1})
	if f.Uncertainty() != 1 {
		t.Errorf("Derived(x + x) uncertainty %g, want 1", f.Uncertainty())
	}
	g := Derived(0, Dimensionless, []Quantity{x, x}, []float64{1, -1})
	if g.HasUncertainty() {
		t.Errorf("Derived(x - x) keeps an uncertainty %g", g.Uncertainty())
	}
}

func TestDerivedPanicsOnLengthMismatch(t *testing.T) {
	defer func() {
		if r := recover(); r == nil {
			t.Error("no panic")
		}
	}()
	Derived(1, Dimensionless, []Quantity{Scalar(1)}, nil)
}

func TestCovariance(t *testing.T) {
	x := Uncertain(4, 0.2, Dimensionless)
	y := Uncertain(3, 0.1, Dimensionless)
	s := must(Add(x, y))
	d := must(Sub(x, y))
	// cov(x+y, x-y) = var x - var y.
	if got, want := Covariance(s, d), 0.04-0.01; !testutil.WithinRel(got, want, 1e-14) {
		t.Errorf("cov = %g, want %g", got, want)
	}
	if got := Correlation(x, x.Scale(-3)); !testutil.WithinRel(got, -1, 1e-15) {
		t.Errorf("corr(x, -3x) = %g, want -1", got)
	}
	if got := Correlation(x, y); got != 0 {
		t.Errorf("corr(x, y) = %g, want 0", got)
	}
}

// TestMonteCarlo checks first-order propagation against sampling for a
// function that is linear in its inputs, f = 2x - 3y + x (x, y Gaussian),
// where the first-order result is exact. Seeded; 1e5 draws give a sample
// standard deviation within about 0.5 % of the truth.
func TestMonteCarlo(t *testing.T) {
	x := Uncertain(1, 0.3, Dimensionless)
	y := Uncertain(2, 0.2, Dimensionless)
	f := must(Add(must(Sub(x.Scale(2), y.Scale(3))), x))
	r := rand.New(rand.NewPCG(7, 8))
	draws := make([]float64, 100000)
	for i := range draws {
		xv := 1 + 0.3*r.NormFloat64()
		yv := 2 + 0.2*r.NormFloat64()
		draws[i] = 3*xv - 3*yv
	}
	sd := stat.StdDev(draws, nil)
	if !testutil.WithinRel(f.Uncertainty(), sd, 0.02) {
		t.Errorf("propagated %g, sampled %g", f.Uncertainty(), sd)
	}
	if want := math.Hypot(0.9, 0.6); !testutil.WithinRel(f.Uncertainty(), want, 1e-14) {
		t.Errorf("propagated %g, want %g", f.Uncertainty(), want)
	}
}

// TestUncertaintyExtremeScales: SI values of electron masses and
// densities must not underflow or overflow in the sum of squares.
func TestUncertaintyExtremeScales(t *testing.T) {
	a := Uncertain(9e-31, 3e-200, Mass)
	b := Uncertain(9e-31, 4e-200, Mass)
	if got := must(Add(a, b)).Uncertainty(); !testutil.WithinRel(got, 5e-200, 1e-14) {
		t.Errorf("tiny: %g, want 5e-200", got)
	}
	c := Uncertain(1e300, 3e200, Mass)
	d := Uncertain(1e300, 4e200, Mass)
	if got := must(Add(c, d)).Uncertainty(); !testutil.WithinRel(got, 5e200, 1e-14) {
		t.Errorf("huge: %g, want 5e200", got)
	}
}

func TestUncertainSign(t *testing.T) {
	if q := Uncertain(1, -0.5, Dimensionless); q.Uncertainty() != 0.5 {
		t.Errorf("Uncertain(1, -0.5) uncertainty %g", q.Uncertainty())
	}
	if q := Uncertain(1, 0, Dimensionless); q.HasUncertainty() {
		t.Error("Uncertain(1, 0) has an uncertainty")
	}
	var zero Quantity
	if zero.Value() != 0 || !zero.Dim().IsDimensionless() || zero.HasUncertainty() {
		t.Errorf("zero value %#v", zero)
	}
}

// TestImmutable: operations must not change their operands' derivatives.
func TestImmutable(t *testing.T) {
	x := Uncertain(2, 0.1, Dimensionless)
	y := Uncertain(3, 0.2, Dimensionless)
	s := must(Add(x, y))
	before := s.Uncertainty()
	_ = Mul(s, s)
	_ = s.Scale(7)
	_ = must(Sub(s, x))
	_ = Derived(1, Dimensionless, []Quantity{s, x}, []float64{3, -1})
	if s.Uncertainty() != before || x.Uncertainty() != 0.1 {
		t.Errorf("operand changed: %g -> %g", before, s.Uncertainty())
	}
}
