package library

import (
	"math"
	"strings"
	"testing"

	"cleave/internal/testutil"
)

// TestLanguageWhereUsersStumbled: the spellings and conversions new users try.
func TestLanguageWhereUsersStumbled(t *testing.T) {
	e := NewEnv()
	// [src:AFS1982]: E_F = 2πħ²n/(g_s g_v m*); Si(100) has g_v = 2 and m* = 0.19 m_e, so
	// 1e12 cm^-2 gives 6.2997 meV (half the single-valley value).
	hbar, me, q := 1.0545718176461565e-34, 9.1093837015e-31, 1.602176634e-19
	si := 2 * math.Pi * hbar * hbar * 1e16 / (2 * 2 * 0.19 * me) / q * 1e3
	for _, tc := range []struct {
		expr, unit string
		want       float64
	}{
		{"fermi_energy(1e12 cm^-2, Si)", "meV", si},
		{"fermi_energy(1e12 cm^-2, Si(100))", "meV", si},
		{"fermi_energy(1e12 cm^-2, Si, gv = 1)", "meV", 2 * si}, // an explicit gv wins
		{"fermi_energy(1e12 cm^-2, 0.19 m_e)", "meV", 2 * si},   // a bare mass: gs = 2, gv = 1
		// k_B = 1.380649e-23 J/K exactly (CODATA 2018): 1 meV/k_B = 11.6045 K.
		{"1 meV", "K", 1.602176634e-22 / 1.380649e-23},
		{"4.2 K", "meV", 4.2 * 1.380649e-23 / 1.602176634e-22},
		{"1.5 Tesla", "T", 1.5},
		{"2 tesla", "T", 2},
		{"5 kG", "T", 0.5},
		{"2 kOhm", "Ohm", 2000},
		{"3 ohm + 1 Ω + 1 Ohm", "Ohm", 5},
		{"1e6 cm^2/Vs", "m^2/(V s)", 100},
	} {
		if _, err := e.Eval(tc.expr + " -> " + tc.unit); err != nil {
			t.Errorf("%s: %v", tc.expr, err)
			continue
		}
		got := value(t, e, tc.expr+" -> "+tc.unit).Q
		g := got.Value()
		if tc.unit == "meV" {
			g /= 1.602176634e-22
		}
		testutil.CheckRel(t, tc.expr, g, tc.want, 1e-4)
	}
	for _, tc := range []struct{ expr, want string }{
		{"fermi_energy(1e12 cm^-2, graphene)", "graphene has no mstar (its fields: name, g, gs, gv, vF, carrier)"},
		{"AlAs.g", "AlAs has no g; its fields: name, mstar, eps_r, gs, gv, carrier"},
		{"1 meV -> T", "cannot show"},
	} {
		_, err := e.Eval(tc.expr)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want %q", tc.expr, err, tc.want)
		}
	}
}
