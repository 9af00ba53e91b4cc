package transport

import "testing"

// TestCompareDensities: a parallel layer (two-carrier Drude, [src:IHN2010])
// raises the high-field Hall density above the SdH density of the main channel.
func TestCompareDensities(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name     string
		parallel *ParallelChannel
		want     bool
	}{
		{"single channel", nil, false},
		{"parallel layer 1e11 cm^-2", &ParallelChannel{Density: 1e15, Mobility: 0.5}, true},
	}
	for _, tc := range tests {
		p := gaas()
		p.Noise, p.Parallel, p.BEnd, p.Points = 0.5, tc.parallel, 3, 6001
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		h, err := HallDensity(d, "B", "Rxy", 2, 3)
		if err != nil {
			t.Fatal(err)
		}
		s, err := SdHDensity(d, 0.3, 1, 2)
		if err != nil {
			t.Fatal(err)
		}
		c := CompareDensities(h, s)
		if c.Disagree != tc.want || (c.Warning != nil) != tc.want {
			t.Errorf("%s: disagree = %v (rel %.3g, %v), want %v", tc.name, c.Disagree, c.RelDiff, c.Warning, tc.want)
		}
	}
}
