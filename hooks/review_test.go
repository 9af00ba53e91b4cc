package hooks

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/calc/transport"
	"cleave/notebook"
	"cleave/notebook/compute"
)

// sweepCSV renders a synthetic sweep (transport.Sweep: Drude transport with Shubnikov–de Haas
// oscillations, optionally a parallel layer and quantum Hall plateaus) as a data file.
func sweepCSV(t *testing.T, p transport.SweepParams) string {
	t.Helper()
	d, err := transport.Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := transport.WriteCSV(&b, d); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// sweep is a ±1.5 T sweep at 0.3 K of a GaAs 2DEG on a bar of 5 squares; n in cm^-2, mu in
// cm^2/(V s).
func sweep(n, mu float64, seed uint64) transport.SweepParams {
	return transport.SweepParams{Density: n * 1e4, Mobility: mu * 1e-4, MassRatio: 0.067, QuantumLifetime: 1.5e-12,
		Temperature: 0.3, Squares: 5, Noise: 0.2, Seed: seed, BStart: -1.5, BEnd: 1.5, Points: 6001}
}

const physicsBlock = "```cleave\n" + `d = symmetrize(data("data/%s.csv"))
hall = hall_density(d, 0.05 T .. 0.5 T)
sdh = sdh_density(d, 0.15 T .. 1.2 T)
rho = sheet_resistance(zero_field(d, "Rxx"), squares("2", "4"))
mu = mobility(rho, hall.n)
` + "```\n"

func cooldown(id, T string) string {
	return fmt.Sprintf("---\nid: %s\nkind: cooldown\ndevices: [D1]\nbase_temperature: %s\n---\n# %s\n\n", id, T, id) + fmt.Sprintf(physicsBlock, id)
}

// A review finds what a reviewer must see: a density far from the wafer's design, a mobility
// no GaAs 2DEG has at room temperature, Hall and SdH densities that disagree, and a result
// whose inputs changed without anybody recomputing it. A cooldown with none of these gives
// no warning.
func TestReviewWarnings(t *testing.T) {
	tiny := tinyNotebook(t)
	dir := newRepo(t, tiny)
	// The warnings come from analyses and checks, not from stored results: write the
	// results as the engine gives them before committing.
	parallel := sweep(2.9e11, 8e5, 3)
	parallel.Parallel = &transport.ParallelChannel{Density: 5e11 * 1e4, Mobility: 3000 * 1e-4}
	writeFiles(t, dir, map[string]string{
		"cooldowns/CG.md":          cooldown("CG", "0.30 K"),
		"cooldowns/data/CG.csv":    sweepCSV(t, sweep(2.8e11, 1.2e6, 1)),
		"cooldowns/CLOW.md":        cooldown("CLOW", "0.30 K"),
		"cooldowns/data/CLOW.csv":  sweepCSV(t, sweep(1.5e11, 1.0e6, 2)),
		"cooldowns/CWARM.md":       cooldown("CWARM", "300 K"),
		"cooldowns/data/CWARM.csv": sweepCSV(t, sweep(2.8e11, 1.2e6, 4)),
		"cooldowns/CPAR.md":        cooldown("CPAR", "0.30 K"),
		"cooldowns/data/CPAR.csv":  sweepCSV(t, parallel),
	})
	if res, err := (compute.WorkTree{Root: dir}).Check(compute.CheckOptions{Write: true, NoCache: true}); err != nil || len(res.WriteFailures) > 0 {
		t.Fatalf("calc: %v %v", err, res.WriteFailures)
	}
	gitT(t, dir, "add", "-A")
	gitT(t, dir, "commit", "-q", "-m", "four cooldowns")
	// The mask narrows without a recompute: every result that reads it is stale.
	writeFiles(t, dir, map[string]string{"masks/M1.md": strings.Replace(tiny["masks/M1.md"], "width: 100 um", "width: 50 um", 1)})
	gitT(t, dir, "commit", "-q", "-a", "-m", "narrower, not recomputed")

	repo := locate(t, dir)
	rv, err := repo.ReviewRange("HEAD~2..HEAD")
	if err != nil {
		t.Fatal(err)
	}
	got := map[string][]string{}
	for _, w := range rv.Warnings {
		id := w.ID
		if id == "" {
			id = w.Path
		}
		got[id] = append(got[id], w.Kind)
	}
	want := map[string]string{"CLOW": "density", "CWARM": "mobility", "CPAR": "hall-sdh", "M1": "stale"}
	for id, kind := range want {
		if !strings.Contains(strings.Join(got[id], " "), kind) {
			t.Errorf("%s: warnings %v, want one of kind %s", id, got[id], kind)
		}
	}
	// The sound cooldown's results are stale like every other's (the mask changed), and it
	// has no other warning.
	if strings.Join(got["CG"], " ") != "stale" {
		t.Errorf("a sound cooldown got warnings: %v", got["CG"])
	}
	if len(rv.Stale) != 17 {
		t.Errorf("%d stale results, want 17 (3 in the mask, 2 in the devices, 12 in the cooldowns): %+v", len(rv.Stale), rv.Stale)
	}
	// The added cooldowns carry their results; the mask its field change.
	var mask *ReviewEntry
	added := 0
	for _, g := range rv.Groups {
		for i, e := range g.Entries {
			if e.ID == "M1" {
				mask = &g.Entries[i]
			}
			if e.Status == "added" && e.Kind == "cooldown" && len(e.Results) == 5 {
				added++
			}
		}
	}
	if added != 4 || mask == nil || len(mask.Fields) != 1 || mask.Fields[0] != (FieldChange{"width", "100 um", "50 um"}) {
		t.Errorf("%d added cooldowns with their results; mask entry %+v", added, mask)
	}
	if len(rv.Commits) != 2 || rv.Commits[0].Subject != "narrower, not recomputed" {
		t.Errorf("commits %+v", rv.Commits)
	}
	// Every form of the report says the same.
	var text, md bytes.Buffer
	rv.WriteText(&text)
	rv.WriteMarkdown(&md)
	for _, out := range []string{text.String(), md.String()} {
		for _, s := range []string{"CLOW", "density far from the expected one", "mobility outside the plausible range", "Hall and SdH densities disagree", "inputs changed, result not recomputed"} {
			if !strings.Contains(out, s) {
				t.Errorf("report lacks %q:\n%s", s, out)
			}
		}
	}
	if _, err := json.Marshal(rv); err != nil {
		t.Fatal(err)
	}
}

// A plateau is checked against the filling factor the file's density gives where it lies:
// the right density passes, a density half again too high does not.
func TestReviewPlateauCheck(t *testing.T) {
	p := sweep(2.2e11, 2.5e6, 9)
	p.BStart, p.BEnd, p.Points, p.Plateaus, p.Noise, p.Temperature, p.QuantumLifetime = 0, 9, 9001, true, 0.1, 0.03, 3e-12
	root := t.TempDir()
	writeFiles(t, root, tinyNotebook(t))
	writeFiles(t, root, map[string]string{
		"cooldowns/Q.md":       "---\nid: Q\nkind: cooldown\ndevices: [D1]\n---\n```cleave\nqh = plateaus(data(\"data/q.csv\"))\n```\n",
		"cooldowns/data/q.csv": sweepCSV(t, p),
	})
	wt := compute.WorkTree{Root: root}
	nb, err := notebook.Load(wt.FS())
	if err != nil {
		t.Fatal(err)
	}
	f, _ := nb.File("cooldowns/Q.md")
	rd := &reviewer{rv: &Review{}, fsys: wt.FS(), nb: nb, wafers: map[string]*expectation{}}
	values := rd.evaluate(f)
	if len(values) != 1 {
		t.Fatalf("values %v", values)
	}
	r, ok := values[0].value.(*calc.AnalysisResult)
	if !ok {
		t.Fatalf("plateaus gave %T", values[0].value)
	}
	for _, tc := range []struct {
		n    float64 // cm^-2
		warn bool
	}{{2.2e11, false}, {3.3e11, true}} {
		var got []string
		env := compute.NewEnv(wt.FS(), nb, f)
		rd.checkPlateaus(env, r, quantity.New(tc.n*1e4, dimDensity), 1, 6, func(_ string, _ int, msg string) { got = append(got, msg) })
		if (len(got) > 0) != tc.warn {
			t.Errorf("n = %g cm^-2: warnings %q, want some: %v", tc.n, got, tc.warn)
		}
	}
}

func TestMainQuantity(t *testing.T) {
	for _, tc := range []struct {
		text string
		want float64 // SI
		ok   bool
	}{
		{"22.246 ± 0.014 Ohm", 22.246, true},
		{"(1.07909 ± 0.00068)e6 cm^2/(V s)", 107.909, true},
		{"tau_q = 1.5028 ± 0.0035 ps, dingle_temperature 0.8089 ± 0.0019 K", 1.5028e-12, true},
		{"n = (2.600024 ± 0.000037)e11 cm^-2, electrons; warning: x", 2.600024e15, true},
		{"error: 3:1: unknown name (was: 1 m)", 0, false},
		{"nu = 8, 6, 4, 2 at +B", 0, false},
	} {
		q, ok := mainQuantity(tc.text)
		if ok != tc.ok || ok && abs(q.Value()/tc.want-1) > 1e-9 {
			t.Errorf("%q: %v %v, want %g %v", tc.text, q.Value(), ok, tc.want, tc.ok)
		}
	}
	if r := relativeChange("4.5000", "5.0000"); r == nil || abs(*r-1.0/9) > 1e-12 {
		t.Errorf("relative change 4.5 → 5: %v", r)
	}
	if r := relativeChange("4.5 T", "5 Ohm"); r != nil {
		t.Errorf("relative change across dimensions: %v", *r)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
