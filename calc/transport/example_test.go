package transport_test

import (
	"fmt"
	"strings"

	"cleave/calc/transport"
)

func ExampleRead() {
	const file = `# cooldown: CD-7 (invented)
# lock-in: 13 Hz, 10 nA
B (mT), Rxx (Ohm), Rxy (kOhm)
0,   20.8, 0.000
100, 20.9, -0.208
200, 21.1, -0.416
`
	d, err := transport.Read("cd7.csv", strings.NewReader(file))
	if err != nil {
		fmt.Println(err)
		return
	}
	b, _ := d.Col("b")
	rxy, _ := d.Col("Rxy")
	fmt.Println(d.Meta[0].Key, "=", d.Meta[0].Value)
	fmt.Println(b.Values, rxy.Values)
	_, err = d.Col("Ryy")
	fmt.Println(err)
	// Output:
	// cooldown = CD-7 (invented)
	// [0 0.1 0.2] [0 -208 -416]
	// cd7.csv:3:1: no column "Ryy"; available: B, Rxx, Rxy
}

func ExampleHallDensity() {
	d, err := transport.Sweep(transport.SweepParams{
		Density: 3e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 1e-12,
		Temperature: 1.5, BEnd: 1, Points: 1001, Noise: 0.5, Seed: 3,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := transport.HallDensity(d, "B", "Rxy", 0, 0.5)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("n = %.3f e11 cm^-2 (%s), %d warnings\n", r.Density.Value/1e15, r.Carriers, len(r.Warnings))
	// Output:
	// n = 3.000 e11 cm^-2 (electrons), 0 warnings
}

// A five-gap TLM pattern: the line gives twice the contact resistance at zero gap and the
// sheet resistance over the width as its slope.
func ExampleFitTLM() {
	gaps := []float64{5e-6, 10e-6, 20e-6, 40e-6, 80e-6} // m
	R := []float64{60.2, 109.7, 210.4, 409.9, 810.1}    // Ohm
	f, err := transport.FitTLM(gaps, R, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("2Rc = %.2f ± %.2f Ohm, Rsh/W = %.4f ± %.4f Ohm/um, %d warnings\n",
		f.Intercept.Value, f.Intercept.Uncertainty, f.Slope.Value*1e-6, f.Slope.Uncertainty*1e-6, len(f.Warnings))
	// Output:
	// 2Rc = 10.05 ± 0.21 Ohm, Rsh/W = 10.0002 ± 0.0051 Ohm/um, 0 warnings
}
