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
