package transport_test

import (
	"fmt"
	"strings"

	"cleave/calc/transport"
)

func ExampleReadLayout() {
	// A lock-in export: "%" comments, tab-separated, voltages and a current column.
	const layout = `comments: ["%"]
delimiter: tab
columns:
  field_T: B
  I_nA: I
derive:
  Rxy: {x: X2_V, current: I_nA}
`
	const file = "% 2024-05-02 14:22:05\nfield_T\tX2_V\tI_nA\n0.1\t2.5e-6\t10\n0.2\t5.0e-6\t10\n"
	l, err := transport.ParseLayout("layouts/lockin.yaml", []byte(layout))
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := transport.ReadLayout("run7.tsv", strings.NewReader(file), l)
	if err != nil {
		fmt.Println(err)
		return
	}
	b, _ := d.Col("B")
	r, _ := d.Col("Rxy")
	fmt.Printf("%s %v, %s: %.6g %.6g %s\n", b.Name, b.Values, r.Name, r.Values[0], r.Values[1], r.Unit)
	fmt.Printf("%q\n", d.Meta[0].Value)
	// Output:
	// field_T [0.1 0.2], Rxy: 250 500 Ohm
	// "2024-05-02 14:22:05"
}

func ExampleSplitSweep() {
	// A sweep from -1 T to 1 T and back whose field reading trails the field by 3 mT.
	d, err := transport.Sweep(transport.SweepParams{Density: 2.5e15, Mobility: 100, MassRatio: 0.067,
		QuantumLifetime: 0.5e-12, Temperature: 0.3, Squares: 5, BStart: -1, BEnd: 1, Points: 1001,
		UpDown: true, Lag: 3e-3, Noise: 0.02, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	sp, err := transport.SplitSweep(d)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d up, %d down, lag %.2f mT\n", sp.Up.Len(), sp.Down.Len(), 1e3*sp.Lag.Value)
	// Output:
	// 1001 up, 1001 down, lag 3.00 mT
}
