package compute

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/notebook"
	"cleave/notebook/calcblock"
)

// A wafer's scorecard gathers what its descendants' cooldowns measured: for each cooldown,
// the density (by default the name n_SdH, else n_H) and the mobility (mu) its calc blocks
// compute, sorted into dark and illuminated by the cooldown's `illumination` field, with its
// base temperature. The cooldowns are evaluated afresh, so a scorecard never reads a stale
// result region; their dependencies become the scorecard's, qualified by the cooldown's id.

// maxNesting bounds how deep scorecards may evaluate other entries (a cooldown's block that
// asks for a scorecard of its own ancestors would otherwise recurse).
const maxNesting = 2

type scoreRow struct {
	id          string
	illuminated bool
	T           calc.Value
	Ttext       string // the temperature as the cooldown records it ("0.30 K")
	n, mu       calc.Value
	nH, nSdH    calc.Value // the Hall and SdH densities, when the cooldown defines n_H and n_SdH
}

func (r *resolver) scorecard(env *calc.Env, densityName, mobilityName string) (calc.Value, error) {
	if r.e == nil {
		return nil, errors.New("this file is not an entry")
	}
	if r.depth >= maxNesting {
		return nil, errors.New("nested too deep (a scorecard inside a cooldown that a scorecard reads)")
	}
	// Which cooldowns count is itself a dependency (a new cooldown makes the result stale),
	// and so is everything each one reads, its own text first.
	var rows []scoreRow
	for _, d := range r.v.measuredBy(r.e) {
		f, ok := r.v.nb.File(d.Path)
		if !ok {
			continue
		}
		r.v.readEntry(d)
		cenv, err := r.evalFile(f)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", d.ID, err)
		}
		row := scoreRow{id: d.ID, illuminated: illuminated(d)}
		if q, err := d.Quantity("base_temperature"); err == nil {
			row.T = calc.Q(q)
			row.Ttext, _ = d.Text("base_temperature")
		}
		for _, name := range strings.Split(densityName, "|") {
			if v, ok := cenv.Var(name); ok {
				row.n = v
				break
			}
		}
		row.mu, _ = cenv.Var(mobilityName)
		row.nH, _ = cenv.Var("n_H")
		row.nSdH, _ = cenv.Var("n_SdH")
		if row.n == nil && row.mu == nil {
			continue // a cooldown without these results (yet)
		}
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		return nil, fmt.Errorf("no cooldown below %s computes %s or %s", r.e.ID, densityName, mobilityName)
	}
	return scoreValue(rows), nil
}

// illuminated reads a cooldown's illumination field: absent, empty or "none" means dark.
func illuminated(e *notebook.Entry) bool {
	n, ok := e.Field("illumination")
	if !ok {
		return false
	}
	if n.Kind == 0 || (n.Value != "" && strings.EqualFold(strings.TrimSpace(n.Value), "none")) {
		return false
	}
	return n.Value != "" || len(n.Content) > 0
}

// evalFile evaluates every calc line of another file in a fresh environment whose reads are
// recorded with this evaluation's.
func (r *resolver) evalFile(f *notebook.File) (*calc.Env, error) {
	blocks, err := r.v.run.blocks(f)
	if err != nil {
		return nil, err
	}
	env := newEnv(r.v, f, r.depth+1)
	for _, l := range calcblock.CodeLines(blocks) {
		env.EvalLine(l.Input(), l.LineNo)
	}
	return env, nil
}

// scoreValue summarises the rows by condition.
func scoreValue(rows []scoreRow) calc.Value {
	var kv []any
	var parts []string
	for _, cond := range []struct {
		name string
		ill  bool
	}{{"dark", false}, {"illuminated", true}} {
		var ns, mus, nHs, nSdHs []quantity.Quantity
		var ids []string
		var Ts []string
		for _, r := range rows {
			if r.illuminated != cond.ill {
				continue
			}
			ids = append(ids, r.id)
			if q, ok := r.n.(calc.Quantity); ok {
				ns = append(ns, q.Q)
			}
			if q, ok := r.mu.(calc.Quantity); ok {
				mus = append(mus, q.Q)
			}
			if q, ok := r.nH.(calc.Quantity); ok {
				nHs = append(nHs, q.Q)
			}
			if q, ok := r.nSdH.(calc.Quantity); ok {
				nSdHs = append(nSdHs, q.Q)
			}
			if r.T != nil {
				Ts = append(Ts, strings.TrimSpace(r.Ttext))
			}
		}
		if len(ids) == 0 {
			continue
		}
		text := fmt.Sprintf("%s (%s", cond.name, strings.Join(ids, ", "))
		if len(Ts) > 0 {
			text += " at " + strings.Join(uniq(Ts), ", ")
		}
		text += ")"
		if m, ok := meanSpread(ns); ok {
			kv = append(kv, cond.name+"_n", calc.Q(m))
			text += ": n " + quantity.Format(m)
		}
		if m, ok := meanSpread(mus); ok {
			kv = append(kv, cond.name+"_mu", calc.Q(m))
			text += ", mu " + quantity.Format(m)
		}
		// Both densities as well, for reading beside the expected one (a Hall density above
		// the SdH one points to parallel conduction).
		if m, ok := meanSpread(nHs); ok {
			kv = append(kv, cond.name+"_n_H", calc.Q(m))
		}
		if m, ok := meanSpread(nSdHs); ok {
			kv = append(kv, cond.name+"_n_SdH", calc.Q(m))
		}
		kv = append(kv, cond.name+"_cooldowns", calc.Q(quantity.Scalar(float64(len(ids)))))
		parts = append(parts, text)
	}
	var list calc.List
	for _, r := range rows {
		fields := []any{"cooldown", calc.String(r.id), "illuminated", calc.String(fmt.Sprint(r.illuminated))}
		if r.T != nil {
			fields = append(fields, "T", r.T)
		}
		if r.n != nil {
			fields = append(fields, "n", r.n)
		}
		if r.mu != nil {
			fields = append(fields, "mu", r.mu)
		}
		if r.nH != nil {
			fields = append(fields, "n_H", r.nH)
		}
		if r.nSdH != nil {
			fields = append(fields, "n_SdH", r.nSdH)
		}
		list = append(list, calc.NewRecord("", fields...))
	}
	kv = append(kv, "rows", list, "summary", calc.String(strings.Join(parts, "; ")))
	return &calc.AnalysisResult{Kind: "scorecard", Main: "summary", Rec: calc.NewRecord("", kv...)}
}

// meanSpread is the mean of the values; with several, its uncertainty is the larger of the
// propagated one and the standard error of the scatter between cooldowns.
func meanSpread(qs []quantity.Quantity) (quantity.Quantity, bool) {
	if len(qs) == 0 {
		return quantity.Quantity{}, false
	}
	sum := qs[0]
	for _, q := range qs[1:] {
		s, err := quantity.Add(sum, q)
		if err != nil {
			return quantity.Quantity{}, false
		}
		sum = s
	}
	mean := sum.Scale(1 / float64(len(qs)))
	if len(qs) < 2 {
		return mean, true
	}
	var ss float64
	for _, q := range qs {
		d := q.Value() - mean.Value()
		ss += d * d
	}
	sem := math.Sqrt(ss/float64(len(qs)-1)) / math.Sqrt(float64(len(qs)))
	if sem > mean.Uncertainty() {
		return quantity.Uncertain(mean.Value(), sem, mean.Dim()), true
	}
	return mean, true
}

func uniq(s []string) []string {
	var out []string
	seen := map[string]bool{}
	for _, x := range s {
		if !seen[x] {
			seen[x] = true
			out = append(out, x)
		}
	}
	return out
}
