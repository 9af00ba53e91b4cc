package demo

import (
	"io/fs"
	"testing"
	"testing/fstest"

	"cleave/notebook"
)

// TestScenarioIsAValidNotebook: the embedded entries load and validate without a problem
// once the data files the cooldowns list exist (Run writes them; here the sweeps are
// rendered into the same tree in memory).
func TestScenarioIsAValidNotebook(t *testing.T) {
	nb, err := notebook.Load(withSweeps(t, Scenario()))
	if err != nil {
		t.Fatal(err)
	}
	if ps := nb.Validate(); len(ps) > 0 {
		t.Fatalf("the demo scenario has problems: %v", ps)
	}
	kinds := map[notebook.Kind]int{}
	for _, e := range nb.Entries {
		kinds[e.Kind]++
	}
	for k, want := range map[notebook.Kind]int{"wafer": 6, "mask": 1, "piece": 3, "process": 1, "device": 3, "cooldown": 4} {
		if kinds[k] != want {
			t.Errorf("%d %s entries, want %d", kinds[k], k, want)
		}
	}
}

// withSweeps is the scenario with every cooldown's synthetic data files, in memory.
func withSweeps(t *testing.T, scenario fs.FS) fs.FS {
	t.Helper()
	m := fstest.MapFS{}
	err := fs.WalkDir(scenario, ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := fs.ReadFile(scenario, p)
		m[p] = &fstest.MapFile{Data: b, Mode: 0o644}
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	for _, cd := range []string{"W24-031", "CD24-001", "CD24-002", "CD24-003", "CD24-004"} {
		for _, s := range demoSweeps(cd) {
			b, err := s.render()
			if err != nil {
				t.Fatal(err)
			}
			m[s.path] = &fstest.MapFile{Data: b, Mode: 0o644}
		}
	}
	return m
}
