package materials_test

import (
	"fmt"

	"cleave/calc/materials"
)

func ExampleLookup() {
	m, err := materials.Lookup("Al0.33Ga0.67As")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: x=%.2f m*=%.5f m_e eps_r=%.4f gs=%d gv=%d\n", m.Name, m.X, m.Mstar, m.EpsR, m.Gs, m.Gv)
	_, err = materials.Lookup("AlxGa1-xAs")
	fmt.Println(err != nil)
	// Output:
	// Al0.33Ga0.67As: x=0.33 m*=0.09439 m_e eps_r=11.9628 gs=2 gv=1
	// true
}

func ExampleParseAlloy() {
	el, x, err := materials.ParseAlloy("In0.53Ga0.47As")
	fmt.Println(el, x, err)
	// Output:
	// InGaAs 0.53 <nil>
}

func ExampleMaterial_Monolayer() {
	m, _ := materials.Lookup("GaAs")
	ml, _ := m.Monolayer()
	fmt.Printf("a = %.5f Å, one (001) monolayer = %.5f nm\n", m.A, ml*1e9)
	// Output:
	// a = 5.65325 Å, one (001) monolayer = 0.28266 nm
}
