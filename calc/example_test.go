package calc_test

import (
	"fmt"
	"strings"

	"cleave/calc"
	"cleave/calc/quantity"
)

// A calc block from an invented cooldown of device D-7, in the language alone (constants,
// materials, units, arithmetic): each line's result-region text. The functions that name
// these formulas come from calc/library.
func ExampleEnv_EvalLine() {
	env := calc.NewEnv()
	block := []string{
		"# Hall bar D-7, cooldown 2",
		"n = 3.1e11 cm^-2",
		"B = 5 T",
		"nu = n*h/(e*B)",
		"E_F = pi*hbar^2*n/GaAs.mstar -> meV # spin-degenerate, one valley",
		"l_B = (hbar/(e*B))^0.5 -> nm",
		"E_F + B",
	}
	for i, line := range block {
		r := env.EvalLine(line, i+1)
		fmt.Println(strings.TrimSpace(r.Kind.String() + " " + r.Display))
	}
	// Output:
	// comment
	// assign 3.1000e11 cm^-2
	// assign 5.0000 T
	// assign 2.5641
	// assign 11.076 meV
	// assign 11.474 nm
	// expr error: 7:5: cannot add kg m^2 s^-2 (energy) and kg s^-2 A^-1 (T): the dimensions differ
}

// A function of one's own, registered with WithFuncs: its parameter's dimension is checked
// before the call, and the error points at the argument.
func ExampleWithFuncs() {
	area := quantity.MustUnit("m^2").D
	squareSide := calc.Func{Name: "side", Doc: "the side of a square of area A",
		Params: []calc.Param{{Name: "A", Dim: &area}},
		Call: func(_ *calc.Env, args []calc.Value) (calc.Value, error) {
			s, err := quantity.Sqrt(args[0].(calc.Quantity).Q)
			return calc.Q(s), err
		}}
	env := calc.NewEnv(calc.WithFuncs(squareSide))
	v, err := env.Eval("side(2.5e-3 ± 0.1e-3 mm^2) -> um")
	fmt.Println(calc.Display(v), err)
	_, err = env.Eval("side(3 m)")
	fmt.Println(err)
	// Output:
	// 50.0 ± 1.0 um <nil>
	// 1:6: side: argument A must be m^2, found m
}
