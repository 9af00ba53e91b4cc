package library_test

import (
	"fmt"
	"strings"

	"cleave/calc"
	"cleave/calc/library"
	"cleave/calc/quantity"
)

// A calc block from an invented cooldown of device D-7: each line's result-region text.
func ExampleNewEnv() {
	env := library.NewEnv()
	block := []string{
		"# Hall bar D-7, cooldown 2",
		"n = 3.1e11 cm^-2",
		"B = 5 T",
		"nu = filling_factor(n, B)",
		"E_F = fermi_energy(n, GaAs.mstar) # spin-degenerate, one valley",
		"l_B = magnetic_length(B) -> nm",
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

// One expression, as `cleave eval` evaluates it, with an uncertainty carried through.
func ExampleNewEnv_eval() {
	env := library.NewEnv()
	v, err := env.Eval("cyclotron_energy(2.00 ± 0.01 T, 0.067 m_e) -> meV")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(calc.Display(v))
	_, err = env.Eval("magnetic_length(3 m)")
	fmt.Println(err)
	// Output:
	// 3.456 ± 0.017 meV
	// 1:17: magnetic_length: argument B must be kg s^-2 A^-1 (T), found m
}

// The library's functions beside one's own: All gives them to calc.WithFuncs (an Env made
// so has no data loader unless calc.WithDataLoader adds one, ReadData for instance).
func ExampleAll() {
	squares := calc.Func{Name: "squares_d7", Doc: "squares between probes 2 and 4 of the invented device D-7",
		Call: func(_ *calc.Env, _ []calc.Value) (calc.Value, error) {
			return calc.Q(quantity.Scalar(500.0 / 100.0)), nil // 500 um between the probes, 100 um wide
		}}
	env := calc.NewEnv(calc.WithFuncs(library.All()...), calc.WithFuncs(squares))
	v, err := env.Eval("sheet_resistance(52.3 ± 0.2 Ohm, squares_d7())")
	fmt.Println(calc.Display(v), err)
	// Output:
	// 10.460 ± 0.040 Ohm <nil>
}
