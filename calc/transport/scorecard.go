package transport

import (
	"fmt"
	"math"
	"slices"
)

// ScoreRow is one measured state of one device in one cooldown, as the
// notebook records it. Values are SI.
type ScoreRow struct {
	Cooldown    string   // cooldown id
	Device      string   // device id
	Illuminated bool     // measured after illumination (persistent photoconductivity)
	T           float64  // temperature, K
	Density     Estimate // n, m^-2
	Mobility    Estimate // μ, m^2/(V s)
}

// ConditionSummary summarises the rows of one condition.
type ConditionSummary struct {
	Condition string // "dark" or "illuminated"
	Rows      int
	Devices   []string // distinct device ids, sorted
	Cooldowns []string // distinct cooldown ids, sorted

	DensityMean, DensitySpread   float64 // mean and sample standard deviation, m^-2
	MobilityMean, MobilitySpread float64 // m^2/(V s)
	DensityMin, DensityMax       float64
	MobilityMin, MobilityMax     float64
	TMin, TMax                   float64 // K
}

// Scorecard collects rows for a wafer (or any group of devices) and
// summarises them per condition. It has no notebook dependency: the caller
// gathers the rows.
type Scorecard struct {
	Rows []ScoreRow
}

// Add appends a row after checking it: density and mobility must be > 0 and
// finite, T ≥ 0 (0 = not recorded).
func (s *Scorecard) Add(r ScoreRow) error {
	bad := func(e Estimate) bool { return !(e.Value > 0) || math.IsInf(e.Value, 0) || !(e.Uncertainty >= 0) }
	if bad(r.Density) || bad(r.Mobility) || !(r.T >= 0) {
		return fmt.Errorf("scorecard: cooldown %q device %q: n = %v, μ = %v, T = %g: density and mobility must be > 0, T ≥ 0: %w",
			r.Cooldown, r.Device, r.Density, r.Mobility, r.T, ErrBadArgument)
	}
	s.Rows = append(s.Rows, r)
	return nil
}

// Summary returns one summary per condition present, dark first. The spread
// is the sample standard deviation (0 for a single row): device-to-device
// and cooldown-to-cooldown scatter, which is what a wafer scorecard shows;
// the rows' own uncertainties are not folded in.
func (s *Scorecard) Summary() []ConditionSummary {
	var out []ConditionSummary
	for _, ill := range []bool{false, true} {
		var rows []ScoreRow
		for _, r := range s.Rows {
			if r.Illuminated == ill {
				rows = append(rows, r)
			}
		}
		if len(rows) == 0 {
			continue
		}
		c := ConditionSummary{Condition: "dark", Rows: len(rows),
			DensityMin: math.Inf(1), DensityMax: math.Inf(-1), MobilityMin: math.Inf(1), MobilityMax: math.Inf(-1),
			TMin: math.Inf(1), TMax: math.Inf(-1)}
		if ill {
			c.Condition = "illuminated"
		}
		ns := make([]float64, len(rows))
		ms := make([]float64, len(rows))
		for i, r := range rows {
			ns[i], ms[i] = r.Density.Value, r.Mobility.Value
			c.DensityMin, c.DensityMax = math.Min(c.DensityMin, ns[i]), math.Max(c.DensityMax, ns[i])
			c.MobilityMin, c.MobilityMax = math.Min(c.MobilityMin, ms[i]), math.Max(c.MobilityMax, ms[i])
			c.TMin, c.TMax = math.Min(c.TMin, r.T), math.Max(c.TMax, r.T)
			if !slices.Contains(c.Devices, r.Device) {
				c.Devices = append(c.Devices, r.Device)
			}
			if !slices.Contains(c.Cooldowns, r.Cooldown) {
				c.Cooldowns = append(c.Cooldowns, r.Cooldown)
			}
		}
		slices.Sort(c.Devices)
		slices.Sort(c.Cooldowns)
		c.DensityMean, c.DensitySpread = meanStd(ns)
		c.MobilityMean, c.MobilitySpread = meanStd(ms)
		out = append(out, c)
	}
	return out
}

func meanStd(x []float64) (float64, float64) {
	m := 0.0
	for _, v := range x {
		m += v
	}
	m /= float64(len(x))
	if len(x) < 2 {
		return m, 0
	}
	s := 0.0
	for _, v := range x {
		s += (v - m) * (v - m)
	}
	return m, math.Sqrt(s / float64(len(x)-1))
}
