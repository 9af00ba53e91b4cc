package quantity

import "testing"

func BenchmarkParseUnit(b *testing.B) {
	for b.Loop() {
		if _, err := ParseUnit("cm^2/(V s)"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkParseQuantity(b *testing.B) {
	for b.Loop() {
		if _, err := ParseQuantity("(3.072 ± 0.041)e11 cm^-2"); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkMulUncertain(b *testing.B) {
	x := Uncertain(3e15, 3e13, Length.Pow(-2))
	y := Uncertain(2e2, 1, Length.Pow(2).Div(dimVoltage.Mul(Time)))
	for b.Loop() {
		_ = Mul(x, y)
	}
}

// BenchmarkMulManyInputs multiplies two quantities that each depend on 50
// inputs (a fit result, say), half of them shared.
func BenchmarkMulManyInputs(b *testing.B) {
	ins := make([]Quantity, 75)
	for i := range ins {
		ins[i] = Uncertain(1, 0.01, Dimensionless)
	}
	ones := make([]float64, 50)
	for i := range ones {
		ones[i] = 1
	}
	x := Derived(50, Dimensionless, ins[:50], ones)
	y := Derived(50, Dimensionless, ins[25:], ones)
	for b.Loop() {
		_ = Mul(x, y)
	}
}

func BenchmarkFormat(b *testing.B) {
	q := Uncertain(3.0723e15, 4.1e13, Length.Pow(-2))
	for b.Loop() {
		_ = Format(q)
	}
}

func BenchmarkFormatExact(b *testing.B) {
	q := New(1.25e-5, Length)
	for b.Loop() {
		_ = Format(q)
	}
}
