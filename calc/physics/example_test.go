package physics_test

import (
	"fmt"

	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// val builds an exact quantity from a number and a unit.
func val(v float64, unit string) quantity.Quantity {
	u := quantity.MustUnit(unit)
	return quantity.New(v*u.Scale, u.D)
}

func show(q quantity.Quantity, unit string) string {
	v, err := q.In(quantity.MustUnit(unit))
	if err != nil {
		return err.Error()
	}
	u, _ := quantity.New(q.Uncertainty(), q.Dim()).In(quantity.MustUnit(unit))
	s := fmt.Sprintf("%.5g", v)
	if u != 0 {
		s += fmt.Sprintf(" ± %.2g", u)
	}
	if unit != "1" {
		s += " " + unit
	}
	return s
}

func ExampleMagneticLength() {
	lB, _ := physics.MagneticLength(val(1, "T"))
	fmt.Println(show(lB, "nm"))
	// Output: 25.656 nm
}

func ExampleCyclotronEnergy() {
	// GaAs, m* = 0.067 m_e, at 2.0 ± 0.02 T (an uncertain input).
	B := quantity.Uncertain(2, 0.02, quantity.MustUnit("T").D)
	E, _ := physics.CyclotronEnergy(B, physics.EffectiveMass(0.067))
	fmt.Println(show(E, "meV"))
	_, err := physics.CyclotronEnergy(B, quantity.Scalar(0.067))
	fmt.Println(err)
	// Output:
	// 3.4558 ± 0.035 meV
	// cyclotron_energy: argument m: has dimension no unit (dimensionless), expected a mass (e.g. 0.067 m_e)
}

func ExampleFillingFactor() {
	n := val(3e11, "cm^-2")
	nu, _ := physics.FillingFactor(n, val(5, "T"))
	B1, _ := physics.FieldAtFilling(n, quantity.Scalar(1))
	fmt.Println(show(nu, "1"), show(B1, "T"))
	// Output: 2.4814 12.407 T
}

func ExampleVdpSheetResistance() {
	Rs, _ := physics.VdpSheetResistance(val(10, "Ohm"), val(20, "Ohm"))
	f, _ := physics.VdpFactor(val(10, "Ohm"), val(20, "Ohm"))
	fmt.Println(show(Rs, "Ohm"), show(f, "1"))
	// Output: 65.285 Ohm 0.96028
}

func ExampleHallBar() {
	// An invented bar: W = 100 um, probes at 300 and 550 um on each side.
	p := func(name string, x float64, side string) physics.Probe {
		return physics.Probe{Name: name, Position: val(x, "um"), ArmWidth: val(10, "um"), Side: side}
	}
	bar := physics.HallBar{Width: val(100, "um"), Probes: []physics.Probe{
		p("V1", 300, "top"), p("V2", 550, "top"), p("V3", 300, "bottom"), p("V4", 550, "bottom"),
	}}
	sq, _ := bar.Squares("V1", "V2")
	fmt.Println(show(sq, "1"))
	fmt.Println(bar.HallPairs())
	for _, w := range bar.Warnings() {
		fmt.Println(w)
	}
	// Output:
	// 2.5
	// [[V1 V3] [V2 V4]]
	// probes V1-V2 (top): spacing/width = 2.5, below the customary 3; the finite arm widths then weigh more on L/W and so on rho_xx = R_xx W/L
	// probes V3-V4 (bottom): spacing/width = 2.5, below the customary 3; the finite arm widths then weigh more on L/W and so on rho_xx = R_xx W/L
}

// The contact parameters from a transfer-length line R_T = 10 Ohm + 10 Ohm/um · d on pads
// 100 um wide: R_c = 5 Ohm, R_c W = 0.5 Ohm mm, L_T = 0.5 um, ρ_c = 2.5e-6 Ohm cm².
func ExampleTransferLength() {
	tl, err := physics.TransferLength(val(10e6, "Ohm/m"), val(10, "Ohm"), val(100, "um"), val(0, "um"))
	if err != nil {
		fmt.Println(err)
		return
	}
	rcw, _ := quantity.FormatIn(tl.RcW, quantity.MustUnit("Ohm mm"))
	lt, _ := quantity.FormatIn(tl.LT, quantity.MustUnit("um"))
	fmt.Println(tl.Rc, rcw, lt, tl.RhoC)
	// Output:
	// 5.0000 Ohm 0.50000 Ohm mm 0.50000 um 2.5000e-6 Ohm cm^2
}

func ExampleParseStack() {
	layers, err := physics.ParseStack("Ni/AuGe/Ni/Au 5/150/30/100 nm")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(len(layers), layers[1].Metal, layers[1].Thickness, physics.StackThickness(layers))
	_, err = physics.ParseStack("Ti/Au 10 nm")
	fmt.Println(err)
	// Output:
	// 4 AuGe 150.00 nm 285.00 nm
	// metal stack "Ti/Au 10 nm", column 7: 2 metals but 1 thicknesses: give one thickness per metal
}
