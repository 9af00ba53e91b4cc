package transport

import (
	"errors"
	"math"
	"testing"
)

// TestScorecard: invented rows for wafer devices D1, D2 over cooldowns CD-1,
// CD-2; means and sample standard deviations computed by hand.
func TestScorecard(t *testing.T) {
	t.Parallel()
	var s Scorecard
	rows := []ScoreRow{
		{"CD-1", "D1", false, 1.5, Estimate{2.0e15, 1e13}, Estimate{80, 1}},
		{"CD-1", "D2", false, 1.5, Estimate{2.2e15, 1e13}, Estimate{90, 1}},
		{"CD-2", "D1", false, 0.3, Estimate{2.4e15, 1e13}, Estimate{100, 1}},
		{"CD-2", "D1", true, 0.3, Estimate{3.1e15, 1e13}, Estimate{150, 1}},
	}
	for _, r := range rows {
		if err := s.Add(r); err != nil {
			t.Fatal(err)
		}
	}
	sum := s.Summary()
	if len(sum) != 2 || sum[0].Condition != "dark" || sum[1].Condition != "illuminated" {
		t.Fatalf("summary %+v", sum)
	}
	d := sum[0]
	// mean(2.0, 2.2, 2.4) = 2.2, sample sd = 0.2; mean(80, 90, 100) = 90, sd = 10.
	if math.Abs(d.DensityMean-2.2e15) > 1e3 || math.Abs(d.DensitySpread-0.2e15) > 1e3 ||
		math.Abs(d.MobilityMean-90) > 1e-9 || math.Abs(d.MobilitySpread-10) > 1e-9 {
		t.Errorf("dark: %+v", d)
	}
	if d.Rows != 3 || len(d.Devices) != 2 || len(d.Cooldowns) != 2 || d.TMin != 0.3 || d.TMax != 1.5 {
		t.Errorf("dark counts: %+v", d)
	}
	if il := sum[1]; il.Rows != 1 || il.DensitySpread != 0 || il.MobilityMean != 150 {
		t.Errorf("illuminated: %+v", il)
	}
	for _, bad := range []ScoreRow{
		{Cooldown: "CD-3", Device: "D1", Density: Estimate{0, 0}, Mobility: Estimate{1, 0}},
		{Cooldown: "CD-3", Device: "D1", Density: Estimate{1e15, 0}, Mobility: Estimate{math.Inf(1), 0}},
		{Cooldown: "CD-3", Device: "D1", T: -1, Density: Estimate{1e15, 0}, Mobility: Estimate{1, 0}},
	} {
		if err := s.Add(bad); !errors.Is(err, ErrBadArgument) {
			t.Errorf("bad row accepted: %+v (%v)", bad, err)
		}
	}
	if len(s.Rows) != 4 {
		t.Errorf("%d rows after bad adds", len(s.Rows))
	}
}
