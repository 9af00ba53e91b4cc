package quantity_test

import (
	"fmt"
	"math"

	"cleave/calc/quantity"
)

func ExampleParseQuantity() {
	w, err := quantity.ParseQuantity("12.5 ± 0.2 um")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.4g ± %.4g %v\n", w.Value(), w.Uncertainty(), w.Dim())
	fmt.Println(quantity.Format(w))

	_, err = quantity.ParseQuantity("20 furlong")
	fmt.Println(err)
	// Output:
	// 1.25e-05 ± 2e-07 m
	// 12.50 ± 0.20 um
	// unit "20 furlong", offset 3: unknown unit "furlong" (expected a unit such as m, um, T, mT, G, K, eV, meV, Ohm, kOhm, V, A, s, Hz, m_e or 1)
}

func ExampleFormat() {
	n, _ := quantity.ParseQuantity("(3.072 ± 0.041)e11 cm^-2")
	mu, _ := quantity.ParseQuantity("2e6 cm^2/(V s)")
	l, _ := quantity.ParseQuantity("0.5 um")
	fmt.Println(quantity.Format(n))
	fmt.Println(quantity.Format(mu))
	fmt.Println(quantity.Format(l))
	s, _ := quantity.FormatIn(l, quantity.MustUnit("Å"))
	fmt.Println(s)
	// Output:
	// (3.072 ± 0.041)e11 cm^-2
	// 2.0000e6 cm^2/(V s)
	// 500.00 nm
	// 5000.0 Å
}

// A physics function attaches its partial derivatives with Derived: here the
// magnetic length l_B = sqrt(hbar/(e B)), with dl_B/dB = -l_B/(2B). At 1 T
// it is 25.6556 nm ([src:W1] in calc/SOURCES.md).
func ExampleDerived() {
	const hbar, e = 1.0545718176461565e-34, 1.602176634e-19 // CODATA 2018, exact
	B, _ := quantity.ParseQuantity("1.000 ± 0.010 T")
	lB := math.Sqrt(hbar / (e * B.Value()))
	l := quantity.Derived(lB, quantity.Length, []quantity.Quantity{B}, []float64{-lB / (2 * B.Value())})
	fmt.Println(quantity.Format(l))
	// Output:
	// 25.66 ± 0.13 nm
}

// Correlations are exact: the same input in two places cancels.
func ExampleSub() {
	x := quantity.Uncertain(4, 0.2, quantity.Length)
	y := quantity.Uncertain(3, 0.1, quantity.Length)
	sum, _ := quantity.Add(x, y)
	back, _ := quantity.Sub(sum, x)
	fmt.Println(back.Value(), back.Uncertainty())
	zero, _ := quantity.Sub(x, x)
	fmt.Println(zero.Value(), zero.HasUncertainty())
	// Output:
	// 3 0.1
	// 0 false
}

func ExampleParseUnit() {
	u, _ := quantity.ParseUnit("cm^2/(V s)")
	fmt.Println(u.Scale, u.D)
	_, err := quantity.ParseUnit("cm^2/V s")
	fmt.Println(err)
	// Output:
	// 0.0001 kg^-1 s^2 A
	// unit "cm^2/V s", offset 4: ambiguous '/': group the denominator in parentheses, e.g. "cm^2/(V s)"
}

// Frequencies are shown as s^-1 by Format (angular and cyclic frequencies
// share the dimension); Engineering picks a prefixed Hz where a cyclic
// frequency is meant.
func ExampleEngineering() {
	fc := quantity.New(4.1780e11, quantity.Time.Pow(-1))
	fmt.Println(quantity.Format(fc))
	u, _ := quantity.Engineering(fc, "Hz")
	s, _ := quantity.FormatIn(fc, u)
	fmt.Println(s)
	// Output:
	// 417.80 GHz
	// 417.80 GHz
}

// Temperatures in °C are absolute; their difference is in K; their sum is refused.
func ExampleCelsius() {
	bake := quantity.Celsius(115, 0)
	fmt.Println(bake, bake.Value())
	d, _ := quantity.Sub(quantity.Celsius(120, 0), bake)
	fmt.Println(d)
	_, err := quantity.Add(bake, bake)
	fmt.Println(err != nil)
	ml := quantity.MustUnit("ML(GaAs)")
	fmt.Println(quantity.New(ml.Scale, ml.D))
	// Output:
	// 115.00 °C 388.15
	// 5.0000 K
	// true
	// 0.28266 nm
}
