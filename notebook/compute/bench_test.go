package compute

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// genNotebook writes a notebook of n entries (a wafer, a mask, pieces and devices), each with
// a calc block of five lines that read fields, the Hall-bar geometry and physics functions.
func genNotebook(tb testing.TB, n int) string {
	tb.Helper()
	root := tb.TempDir()
	if err := os.MkdirAll(filepath.Join(root, ".git"), 0o755); err != nil {
		tb.Fatal(err)
	}
	write := func(rel, s string) {
		p := filepath.Join(root, rel)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			tb.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			tb.Fatal(err)
		}
	}
	block := "```cleave\nW = geometry.width\nsq = squares(\"2\", \"4\")\nlB = magnetic_length(1 T)\nn = 3e11 cm^-2\nnu = filling_factor(n, 5 T)\n```\n"
	// A piece has no Hall bar in its lineage: its block reads the wafer instead.
	pieceBlock := "```cleave\nw = width\nlB = magnetic_length(1 T)\nn = 3e11 cm^-2\nnu = filling_factor(n, 5 T)\nE_F = fermi_energy(n, GaAs.mstar)\n```\n"
	write("wafers/W1.md", "---\nid: W1\nkind: wafer\n---\n# W1\n\n```cleave\nn = 3e11 cm^-2\nE_F = fermi_energy(n, GaAs.mstar)\nlB = magnetic_length(1 T)\nnu = filling_factor(n, 5 T)\nB1 = field_at_filling(n, 1)\n```\n")
	write("masks/M1.md", "---\nid: M1\nkind: mask\nwidth: 100 um\nprobes:\n  - {name: \"2\", position: 250 um, arm_width: 10 um, side: top}\n  - {name: \"4\", position: 750 um, arm_width: 10 um, side: top}\n---\n"+block)
	pieces := (n - 2) / 100
	if pieces < 1 {
		pieces = 1
	}
	for i := 0; i < pieces; i++ {
		write(fmt.Sprintf("pieces/P%d.md", i), fmt.Sprintf("---\nid: P%d\nkind: piece\nfrom: W1\nwidth: 4 mm\n---\n", i)+pieceBlock)
	}
	for i := 0; i < n-2-pieces; i++ {
		write(fmt.Sprintf("devices/D%d.md", i), fmt.Sprintf("---\nid: D%d\nkind: device\nfrom: P%d\nmask: M1\n---\n", i, i%pieces)+block)
	}
	return root
}

// BenchmarkCheck measures `cleave check` (load, then recompute every calc block without
// writing) on a 10,000-entry notebook: cold evaluates every line, warm answers from the cache
// that a previous run filled.
func BenchmarkCheck(b *testing.B) {
	root := genNotebook(b, 10000)
	b.Run("cold", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			rep, err := runTree(root, CheckOptions{NoCache: true})
			if err != nil || !rep.OK() && len(rep.Files) == 0 {
				b.Fatal(err)
			}
		}
	})
	if _, err := runTree(root, CheckOptions{Write: true}); err != nil {
		b.Fatal(err)
	}
	b.Run("warm", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			rep, err := runTree(root, CheckOptions{})
			if err != nil {
				b.Fatal(err)
			}
			if rep.Evaluated != 0 {
				b.Fatalf("warm run evaluated %d lines", rep.Evaluated)
			}
		}
	})
}

// BenchmarkCheckUnchanged measures the fast path of a check of a notebook that has not
// changed since the last good check: hashing the files' stat data and comparing one digest.
func BenchmarkCheckUnchanged(b *testing.B) {
	root := genNotebook(b, 10000)
	if _, err := runTree(root, CheckOptions{Write: true}); err != nil {
		b.Fatal(err)
	}
	time.Sleep(1100 * time.Millisecond) // past the racy-timestamp window
	w := WorkTree{Root: root, StateDir: filepath.Join(root, ".git", "cleave")}
	if res, err := w.Check(CheckOptions{}); err != nil || res.Bad(false) > 0 {
		b.Fatal(err)
	}
	for b.Loop() {
		if res, err := w.Check(CheckOptions{}); err != nil || !res.Unchanged {
			b.Fatal("digest changed", err)
		}
	}
}
