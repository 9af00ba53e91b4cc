package library

import (
	"fmt"
	"math"
	"strings"

	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// plateauFuncs are about the quantum Hall regime: the plateaus of a sweep with their filling
// factors and deviation from R_K/nu, the density from a Landau fan (the fields of R_xx
// minima against their filling factors), and the quantised resistance R_K/nu itself. The
// analyses and their sources are in calc/transport, the closed form in calc/physics.
func plateauFuncs() []calc.Func {
	return []calc.Func{
		{Name: "plateaus",
			Doc: "quantum Hall plateaus in R_xy with their filling factors and relative deviation from R_K/nu; with n= each is checked against the filling factor the density puts there",
			Params: []calc.Param{{Name: "d"}, {Name: "n", Default: calc.String("none")}, {Name: "fractions", Default: num(0)},
				{Name: "x", Default: calc.String("B")}, {Name: "y", Default: calc.String("Rxy")}, {Name: "rxx", Default: calc.String("Rxx")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				d, err := dataArg(a, 0)
				if err != nil {
					return nil, err
				}
				n, hasN, err := optQ(a, 1, dDensity, "a density")
				if err != nil {
					return nil, err
				}
				opt := transport.PlateauOptions{Fractions: qa(a, 2).Value() != 0}
				opt.XCol, _ = strArg(a, 3)
				opt.YCol, _ = strArg(a, 4)
				opt.RxxCol, _ = strArg(a, 5)
				if hasN {
					opt.Density = n.Value()
				}
				r, err := transport.Plateaus(d, opt)
				if err != nil {
					return nil, err
				}
				var list calc.List
				var names []string
				worst := 0.0
				for _, p := range r.Plateaus {
					nu := fmt.Sprint(p.P)
					if p.Q != 1 {
						nu = fmt.Sprintf("%d/%d", p.P, p.Q)
					}
					if p.Sign > 0 {
						names = append(names, nu)
					}
					worst = math.Max(worst, math.Abs(p.Deviation))
					list = append(list, calc.NewRecord("", "nu", num(p.Nu()), "from", calc.Q(quantity.New(p.BMin*float64(p.Sign), dField)),
						"to", calc.Q(quantity.New(p.BMax*float64(p.Sign), dField)), "Rxy", est(p.Rxy, dResistance),
						"deviation", num(p.Deviation), "rxx_near_zero", calc.String(fmt.Sprint(p.RxxNearZero))))
				}
				pos, neg := 0, 0
				var negNames []string
				for _, p := range r.Plateaus {
					if p.Sign > 0 {
						pos++
					} else {
						neg++
						nu := fmt.Sprint(p.P)
						if p.Q != 1 {
							nu = fmt.Sprintf("%d/%d", p.P, p.Q)
						}
						negNames = append(negNames, nu)
					}
				}
				var summary string
				switch {
				case pos > 0 && neg > 0:
					summary = fmt.Sprintf("nu = %s at +B (%d plateaus over ±B)", strings.Join(names, ", "), len(r.Plateaus))
				case pos > 0:
					summary = fmt.Sprintf("nu = %s (%d plateaus, +B only)", strings.Join(names, ", "), pos)
				default:
					summary = fmt.Sprintf("nu = %s (%d plateaus, -B only)", strings.Join(negNames, ", "), neg)
				}
				summary += fmt.Sprintf(", largest |R_xy - R_K/nu|/(R_K/nu) = %.1e", worst)
				if len(r.Plateaus) == 0 {
					summary = "no plateau found"
				}
				return withWarnings(newResult("plateaus", "summary", nil, "summary", calc.String(summary), "plateaus", list,
					"count", num(float64(len(r.Plateaus))), "max_deviation", num(worst)), r.Warnings), nil
			}},
		{Name: "landau_fan",
			Doc:    "Landau fan: fit nu = (h n/e)(1/B) + nu0 to the fields of R_xx minima (a list) and their filling factors (a list) → density n, slope and intercept nu0 (≈ 0, or a Berry phase)",
			Params: []calc.Param{{Name: "B"}, {Name: "nu"}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				b, sb, err := quantities(a, 0, dField, "fields")
				if err != nil {
					return nil, err
				}
				nu, _, err := quantities(a, 1, dNone, "filling factors")
				if err != nil {
					return nil, err
				}
				r, err := transport.LandauFan(b, nu, sb)
				if err != nil {
					return nil, err
				}
				res := withWarnings(newResult("landau_fan", "n", []string{"intercept"}, "n", est(r.Density, dDensity),
					"slope", est(r.Slope, dField), "intercept", est(r.Intercept, dNone),
					"points", num(float64(r.Points))), r.Warnings)
				res.Detail = &FanDetail{FanResult: r, B: b, SigmaB: sb, Nu: nu}
				return res, nil
			}},
		closedForm("hall_resistance", "R_K/nu", []calc.Param{req("nu", dNone)},
			func(a []calc.Value) (quantity.Quantity, error) { return physics.HallResistance(qa(a, 0)) }),
	}
}
