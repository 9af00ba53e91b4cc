package band

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// randomStack draws an invented stack: 2–6 layers of GaAs, Al(x)Ga(1−x)As (x ≤ 0.4) or
// thin AlAs, 2–80 nm thick, some bulk- or delta-doped with Si, over a 200 nm GaAs buffer,
// ending on any of the three bottoms.
func randomStack(rng *rand.Rand) Stack {
	var s Stack
	nl := 2 + rng.IntN(5)
	for i := 0; i < nl; i++ {
		m := "GaAs"
		th := float64(2+rng.IntN(79)) * 1e-9
		switch rng.IntN(6) {
		case 0, 1, 2:
			x := math.Round(rng.Float64()*40) / 100
			m = fmt.Sprintf("Al%.2fGa%.2fAs", x, 1-x)
		case 3:
			m, th = "AlAs", float64(1+rng.IntN(4))*1e-9
		}
		l := Layer{Material: m, ThicknessM: th}
		switch rng.IntN(4) {
		case 0:
			l.Doping = Doping{Species: "Si", Density: math.Pow(10, 23+rng.Float64()*1.5)}
		case 1:
			l.Doping = Doping{Species: "Si", Sheet: true, Density: math.Pow(10, 15+rng.Float64()*1.5)}
			if rng.IntN(2) == 0 {
				l.ThicknessM = 0
			}
		}
		s.Layers = append(s.Layers, l)
	}
	s.Layers = append(s.Layers, Layer{Material: "GaAs", ThicknessM: 200e-9, Doping: Doping{Species: "C", Density: 1e21}})
	s.Bottom.Kind = rng.IntN(3)
	return s
}

// TestRandomStacks: for seeded random stacks Solve either rejects the stack with a
// validation error or converges to a charge-neutral solution whose surface sits at the
// pinning barrier, whose subband occupations add up to the electron count, and whose regions
// hold every electron exactly once (properties).
func TestRandomStacks(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	count := 40
	if testing.Short() {
		count = 8
	}
	solved := 0
	for k := 0; k < count; k++ {
		st := randomStack(rng)
		r, err := Solve(st, Options{})
		if err != nil {
			if errors.Is(err, ErrNotConverged) {
				t.Errorf("stack %d %+v: %v", k, st.Layers, err)
			}
			continue
		}
		solved++
		if math.Abs(r.NeutralityError) > 1e11 {
			t.Errorf("stack %d: neutrality error %.3g cm^-2", k, r.NeutralityError/1e4)
		}
		if math.Abs(r.Ec[0]-DefaultPinningEV) > 1e-12 {
			t.Errorf("stack %d: surface at %g eV", k, r.Ec[0])
		}
		sum := 0.0
		for _, s := range r.Subbands {
			sum += s.N2D
		}
		if math.Abs(sum-r.TotalN2D) > 1e-9*math.Max(r.TotalN2D, 1e10) {
			t.Errorf("stack %d: Σ subbands %g, total %g", k, sum, r.TotalN2D)
		}
		regions := 0.0
		for _, g := range r.Regions {
			regions += g.N2D
		}
		if math.Abs(regions-r.TotalN2D) > 1e-9*math.Max(r.TotalN2D, 1e10) {
			t.Errorf("stack %d: Σ regions %g, total %g", k, regions, r.TotalN2D)
		}
	}
	t.Logf("%d of %d random stacks solved", solved, count)
	if solved < count/3 {
		t.Errorf("only %d of %d random stacks were valid; the generator needs attention", solved, count)
	}
}
