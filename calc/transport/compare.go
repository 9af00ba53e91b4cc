package transport

import (
	"fmt"
	"math"
)

// Comparison is the outcome of CompareDensities.
type Comparison struct {
	Diff     Estimate // n_Hall − n_SdH, m^-2, with the combined standard uncertainty
	RelDiff  float64  // (n_Hall − n_SdH)/n_SdH
	Disagree bool     // |Diff| > 2·combined σ and |RelDiff| > 5 %
	Warning  *Warning
}

// CompareDensities compares a Hall and an SdH density. They disagree when the
// difference exceeds twice the combined standard uncertainty (coverage factor
// k = 2) and also the 5 % practical tolerance (common practice).
// A Hall density above the SdH one points to a parallel channel (a doping
// layer, a second subband or a surface layer), since SdH counts only the
// quantised high-mobility channel [src:GRAYSON2005].
func CompareDensities(hall *HallResult, sdh *SdHResult) Comparison {
	h, s := hall.Density, sdh.Density
	c := Comparison{Diff: Estimate{h.Value - s.Value, math.Hypot(h.Uncertainty, s.Uncertainty)}}
	c.RelDiff = c.Diff.Value / s.Value
	c.Disagree = math.Abs(c.Diff.Value) > 2*c.Diff.Uncertainty && math.Abs(c.RelDiff) > 0.05
	if c.Disagree {
		hint := "Hall above SdH: parallel conduction, a second subband or a surface layer?"
		if c.Diff.Value < 0 {
			hint = "SdH above Hall: check the degeneracy g_s g_v, the field ranges and the Hall sign convention"
		}
		c.Warning = &Warning{WarnDisagree, fmt.Sprintf("n_Hall = %.4g, n_SdH = %.4g cm^-2 differ by %.1f %%: %s",
			h.Value/1e4, s.Value/1e4, 100*c.RelDiff, hint)}
	}
	return c
}
