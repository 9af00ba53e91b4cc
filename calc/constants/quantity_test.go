package constants

import (
	"math"
	"testing"

	"cleave/calc/quantity"
)

// Every unit string parses with the project's unit parser to the constant's dimension,
// with scale 1 (the values are in coherent SI).
func TestUnitsParse(t *testing.T) {
	for _, c := range All() {
		u, err := quantity.ParseUnit(c.Unit)
		if err != nil {
			t.Errorf("%s: ParseUnit(%q): %v", c.Symbol, c.Unit, err)
			continue
		}
		if u.D != c.Dim() || math.Abs(u.Scale-1) > 1e-15 {
			t.Errorf("%s: unit %q is %v scale %g, table dimension %v", c.Symbol, c.Unit, u.D, u.Scale, c.Dim())
		}
	}
}

func TestQuantity(t *testing.T) {
	for _, c := range All() {
		q := c.Quantity()
		if q.Value() != c.Value || q.Dim() != c.Dim() {
			t.Errorf("%s: Quantity() = %v %v, want %v %v", c.Symbol, q.Value(), q.Dim(), c.Value, c.Dim())
		}
		if c.Exact != !q.HasUncertainty() {
			t.Errorf("%s: exact=%v but HasUncertainty=%v", c.Symbol, c.Exact, q.HasUncertainty())
		}
		// The propagated uncertainty matches the published one to the rounding of its two
		// printed digits (CODATA 2018 values in TestValues).
		if u := q.Uncertainty(); math.Abs(u-c.Uncertainty) > 0.05*c.Uncertainty {
			t.Errorf("%s: Quantity uncertainty %g, table %g", c.Symbol, u, c.Uncertainty)
		}
	}
}

// Repeated use of a measured constant is the same input: m_e - m_e = 0 ± 0, and
// mu_B * m_e (= e hbar/2, exact) carries no uncertainty because mu_B is tied to m_e.
func TestQuantityCorrelation(t *testing.T) {
	me1, me2 := Q("m_e"), Q("me")
	d, err := quantity.Sub(me1, me2)
	if err != nil || d.Value() != 0 || d.Uncertainty() != 0 {
		t.Errorf("m_e - m_e = %v ± %v, %v; want exact 0", d.Value(), d.Uncertainty(), err)
	}
	p := quantity.Mul(Q("mu_B"), Q("m_e"))
	want := Q("e").Value() * Q("hbar").Value() / 2
	if rel := p.Uncertainty() / p.Value(); rel > 1e-15 {
		t.Errorf("mu_B m_e has relative uncertainty %g, want 0 (exactly e hbar/2)", rel)
	}
	if math.Abs(p.Value()-want)/want > 3*3.1e-10 {
		t.Errorf("mu_B m_e = %g, want e hbar/2 = %g", p.Value(), want)
	}
	// mu0 eps0 c^2 = 1: the product is exact because mu0 is tied to eps0.
	c := Q("c")
	one := quantity.Mul(quantity.Mul(Q("mu0"), Q("eps0")), quantity.Mul(c, c))
	if !one.Dim().IsDimensionless() || math.Abs(one.Value()-1) > 5e-10 || one.Uncertainty() > 1e-15 {
		t.Errorf("mu0 eps0 c^2 = %v ± %v (dim %v); want 1, exact, dimensionless", one.Value(), one.Uncertainty(), one.Dim())
	}
	// Independent measured constants are uncorrelated.
	if r := quantity.Correlation(Q("m_e"), Q("eps0")); r != 0 {
		t.Errorf("corr(m_e, eps0) = %v, want 0", r)
	}
}

func TestQPanicsOnUnknown(t *testing.T) {
	defer func() {
		if r := recover(); r == nil {
			t.Error("Q(\"nope\") did not panic")
		}
	}()
	Q("nope")
}

// TestValue: Value is Lookup's SI value (CODATA 2018 exact e and h, measured m_e) and
// panics on an unknown symbol.
func TestValue(t *testing.T) {
	for sym, want := range map[string]float64{"e": 1.602176634e-19, "h": 6.62607015e-34, "m_e": 9.1093837015e-31, "ħ": 6.62607015e-34 / (2 * math.Pi)} {
		if got := Value(sym); got != want {
			t.Errorf("Value(%q) = %v, want %v (CODATA 2018)", sym, got, want)
		}
	}
	defer func() {
		if recover() == nil {
			t.Error("Value(\"nope\") did not panic")
		}
	}()
	Value("nope")
}

// TestUnitTableAgrees: the quantity package keeps its own e and m_e for the units "eV" and
// "m_e" (it cannot import this package, which imports it); they must be this table's
// CODATA 2018 values exactly.
func TestUnitTableAgrees(t *testing.T) {
	if quantity.ElementaryCharge != Value("e") || quantity.ElectronMass != Value("m_e") {
		t.Errorf("quantity e %v, m_e %v; constants e %v, m_e %v", quantity.ElementaryCharge,
			quantity.ElectronMass, Value("e"), Value("m_e"))
	}
}
