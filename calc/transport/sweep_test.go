package transport

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"cleave/internal/testutil"
)

// TestFixtureLag: the up-down fixture was written with the field reading 4 mT behind the
// true field (rising branch B_true − 4 mT, falling B_true + 4 mT); SplitSweep finds the
// branches from the direction column and from the field alone, and recovers the lag.
func TestFixtureLag(t *testing.T) {
	d := readFixture(t, "updown_lag.csv", "", 0)
	for _, tc := range []struct {
		name string
		d    *Dataset
		src  string
	}{
		{"direction column", d, `the direction column "dir"`},
		{"field steps", withoutColumn(d, "dir"), "the field's own steps"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			sp, err := SplitSweep(tc.d)
			if err != nil {
				t.Fatal(err)
			}
			if sp.Source != tc.src || sp.Up.Len() != 1001 || sp.Down.Len() != 1001 {
				t.Errorf("source %q, %d up and %d down rows; want %q, 1001 each", sp.Source, sp.Up.Len(), sp.Down.Len(), tc.src)
			}
			if l := sp.Lag; math.Abs(l.Value-fxLag) > 3*l.Uncertainty+2e-5 {
				t.Errorf("lag %.4g ± %.2g mT, want %g mT", 1e3*l.Value, 1e3*l.Uncertainty, 1e3*fxLag)
			}
			if sp.Match < 0.99 || !hasWarning(sp.Warnings, WarnLag) || hasWarning(sp.Warnings, WarnHysteresis) {
				t.Errorf("match %.4f, warnings %v: want the lag explained and warned about", sp.Match, sp.Warnings)
			}
			// Each branch on its own gives the density; the field offset of each branch is ∓4 mT,
			// which a Hall slope does not see.
			for _, br := range []*Dataset{sp.Up, sp.Down} {
				h, err := HallDensity(br, "B", "Rxy", 0.05, 0.4)
				if err != nil {
					t.Fatal(err)
				}
				testutil.CheckRel(t, br.Name+" Hall density", h.Density.Value, fxDensity, 2e-3)
			}
		})
	}
	// A sweep one way only has nothing to split.
	one := readFixture(t, "magnet_kG_onesided.dat", "", 0)
	if _, err := SplitSweep(one); err == nil || !strings.Contains(err.Error(), "the sweep only rises") {
		t.Errorf("one-way sweep: %v", err)
	}
}

func withoutColumn(d *Dataset, name string) *Dataset {
	out := *d
	out.Columns = nil
	for _, c := range d.Columns {
		if c.Name != name {
			out.Columns = append(out.Columns, c)
		}
	}
	return &out
}

// TestFixtureChecks: CheckSweep finds each planted defect of spikes.csv at its field, the lag
// of the up-down sweep, and nothing on the clean fixtures.
func TestFixtureChecks(t *testing.T) {
	d := readFixture(t, "spikes.csv", "", 0)
	ws, err := CheckSweep(d)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{
		WarnSpike:        "1 one-point spike(s) in Rxx; the largest, +2",
		WarnNonMonotonic: "steps back 1 time(s) inside a sweep branch; the largest, 4 mT, at B = 0.598 T",
		WarnSaturated:    "Rxy stays at -2100 Ohm, its smallest value, for 80 rows from B = 0.842 T to 1 T",
	}
	for code, text := range want {
		found := false
		for _, w := range ws {
			if w.Code == code {
				found = true
				if !strings.Contains(w.Msg, text) {
					t.Errorf("%s: %q, want it to contain %q", code, w.Msg, text)
				}
			}
		}
		if !found {
			t.Errorf("no %s warning in %v", code, ws)
		}
	}
	if len(ws) != 3 || !strings.Contains(ws[0].Msg, "B = 0.37 T") {
		t.Errorf("want the three planted defects, the spike at 0.37 T: %v", ws)
	}
	lag, err := CheckSweep(readFixture(t, "updown_lag.csv", "", 0))
	if err != nil {
		t.Fatal(err)
	}
	if len(lag) != 1 || lag[0].Code != WarnLag {
		t.Errorf("up-down sweep: %v, want the lag warning alone", lag)
	}
	for _, f := range []string{"sweep_mT_kOhm.csv", "magnet_kG_onesided.dat", "offset_pm1T.csv"} {
		ws, err := CheckSweep(readFixture(t, f, "", 0))
		if err != nil || len(ws) != 0 {
			t.Errorf("%s: %v, %v; want no warnings", f, ws, err)
		}
	}
}

// TestDirections: labels, numbers and the field's own turns.
func TestDirections(t *testing.T) {
	B := []float64{0, 0.1, 0.2, 0.3, 0.29, 0.31, 0.4, 0.3, 0.2, 0.1, 0, 0.1, 0.2}
	got := fieldDirections(B)
	want := []int{1, 1, 1, 1, 1, 1, 1, -1, -1, -1, -1, 1, 1}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("fieldDirections = %v, want %v (the 10 mT back-step is no turn)", got, want)
		}
	}
	nan := math.NaN()
	d := &Dataset{Name: "d", Columns: []Column{
		{Name: "B", Dim: DimField, Values: []float64{0, 1, 0}},
		{Name: "dir", Role: RoleDirection, Values: []float64{nan, nan, nan}, Text: []string{"Increasing", "ramp down", "sideways"}},
	}}
	if _, _, err := Directions(d, "B"); err == nil || !strings.Contains(err.Error(), `label "sideways" in row 3`) {
		t.Errorf("unknown label: %v", err)
	}
	d.Columns[1] = Column{Name: "dir", Role: RoleDirection, Values: []float64{1, -1, 0}}
	dir, _, err := Directions(d, "B")
	if err != nil || dir[0] != 1 || dir[1] != -1 || dir[2] != 0 {
		t.Errorf("numeric directions %v, %v", dir, err)
	}
}

// TestCheckSweepCleanData: on clean synthetic sweeps — low-field SdH, back and forth, and the
// quantum Hall model sampled more coarsely than its steps — the new checks raise nothing
// (a property over seeds; the model is Sweep's, [src:CSF1989]).
func TestCheckSweepCleanData(t *testing.T) {
	for seed := uint64(1); seed <= 12; seed++ {
		p := fxParams(seed)
		switch seed % 3 {
		case 1:
			p.UpDown = true
		case 2:
			p.Plateaus, p.BStart, p.BEnd, p.Points, p.Temperature, p.QuantumLifetime = true, -9, 9, 9001, 0.03, 3e-12
		}
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		ws, err := CheckSweep(d)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range ws {
			switch w.Code {
			case WarnSpike, WarnSaturated, WarnNonMonotonic, WarnLag, WarnHysteresis:
				t.Errorf("seed %d (%d points, %g to %g T, up-down %v, plateaus %v): %v", seed, p.Points, p.BStart, p.BEnd, p.UpDown, p.Plateaus, w)
			}
		}
	}
}

// TestHysteresis: a falling branch measured hotter (higher resistance: a lower mobility) is a
// difference no field lag explains.
func TestHysteresis(t *testing.T) {
	up := fxParams(31)
	down := fxParams(32)
	down.BStart, down.BEnd, down.Mobility = 1, -1, 0.97*fxMobility
	a, err := Sweep(up)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Sweep(down)
	if err != nil {
		t.Fatal(err)
	}
	d := &Dataset{Name: "hot.csv"}
	for i := range a.Columns {
		c := a.Columns[i]
		c.Values = append(append([]float64(nil), c.Values...), b.Columns[i].Values...)
		d.Columns = append(d.Columns, c)
	}
	sp, err := SplitSweep(d)
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(sp.Warnings, WarnHysteresis) {
		t.Errorf("no hysteresis warning: lag %v, match %.3f, residual %.3g Ohm, %v", sp.Lag, sp.Match, sp.Residual, sp.Warnings)
	}
}

// TestMedian: quickselect gives the element a full sort puts at len/2 (a property over
// random inputs with repeats).
func TestMedian(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 1; n < 200; n++ {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64(rng.IntN(n/3 + 1))
		}
		s := slices.Clone(x)
		slices.Sort(s)
		if got := median(x); got != s[n/2] {
			t.Fatalf("median of %v = %v, want %v", x, got, s[n/2])
		}
	}
}
