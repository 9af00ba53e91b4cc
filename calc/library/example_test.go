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

// A growth log and a fab run as calc lines: a RHEED rate, the Al fraction, a TLM fit and a
// cold contact check against it (invented numbers).
func ExampleNewEnv_growthAndFab() {
	env := library.NewEnv()
	block := []string{
		"r_GaAs = rheed_rate(1.25 s, GaAs)",
		"r_AlAs = rheed_rate(2.54 s, AlAs)",
		"al_fraction(r_AlAs, r_GaAs)",
		"tl = tlm([5 um, 10 um, 20 um, 40 um, 80 um], [51.8 Ohm, 89.6 Ohm, 168.9 Ohm, 323.2 Ohm, 636.4 Ohm], 100 um)",
		"contact_resistance(232 Ohm, 208 Ohm, width = 96 um, reference = tl).ratio",
		"T_anneal = 440 °C",
		"T_anneal + T_anneal",
	}
	for i, line := range block {
		fmt.Println(env.EvalLine(line, i+1).Display)
	}
	// Output:
	// 0.22613 nm/s
	// 0.11144 nm/s
	// 0.32982
	// Rc = 6.13 ± 0.29 Ohm, Rc_W 0.613 ± 0.029 Ohm mm, LT 786 ± 38 nm, Rsh 779.7 ± 1.4 Ohm, rho_c (4.82 ± 0.46)e-6 Ohm cm^2
	// 1.879 ± 0.089
	// 440.00 °C
	// error: 7:10: cannot add two absolute temperatures (440.00 °C + 440.00 °C): on the Celsius scale the sum has no meaning; to raise a temperature by an amount, write the amount in K (e.g. 440.00 °C + 10 K)
}
