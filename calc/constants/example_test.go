package constants_test

import (
	"fmt"

	"cleave/calc/constants"
)

func ExampleLookup() {
	rk, _ := constants.Lookup("R_K")
	fmt.Printf("%s = %.6f %s (exact: %v, %s)\n", rk.Symbol, rk.Value, rk.Unit, rk.Exact, constants.Edition)
	me, _ := constants.Lookup("m_e")
	fmt.Printf("%s = %.10e ± %.1e %s\n", me.Symbol, me.Value, me.Uncertainty, me.Unit)
	// Output:
	// R_K = 25812.807459 Ohm (exact: true, CODATA 2018)
	// m_e = 9.1093837015e-31 ± 2.8e-40 kg
}
