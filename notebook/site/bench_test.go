package site_test

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"cleave/notebook/site"
)

// generated writes a notebook of n entries: wafers, each with pieces, devices and cooldowns
// whose calc blocks carry results, as `cleave calc` leaves them.
func generated(b *testing.B, n int) string {
	b.Helper()
	dir := b.TempDir()
	for _, d := range []string{"wafers", "pieces", "devices", "cooldowns"} {
		os.MkdirAll(filepath.Join(dir, d), 0o755)
	}
	w := func(p, s string) {
		if err := os.WriteFile(filepath.Join(dir, p), []byte(s), 0o644); err != nil {
			b.Fatal(err)
		}
	}
	for i := 0; i < n/4; i++ {
		wid, pid, did, cid := fmt.Sprintf("W%05d", i), fmt.Sprintf("W%05d-A", i), fmt.Sprintf("W%05d-A-HB1", i), fmt.Sprintf("CD%05d", i)
		w("wafers/"+wid+".md", fmt.Sprintf("---\nid: %s\nkind: wafer\ntitle: Wafer %d\nby: AK\n---\n# %s\n\nGrown for the benchmark.\n", wid, i, wid))
		w("pieces/"+pid+".md", fmt.Sprintf("---\nid: %s\nkind: piece\nfrom: %s\n---\n# %s\n", pid, wid, pid))
		w("devices/"+did+".md", fmt.Sprintf("---\nid: %s\nkind: device\nfrom: %s\n---\n# %s\n\nSee [the piece](../pieces/%s.md).\n", did, pid, did, pid))
		w("cooldowns/"+cid+".md", fmt.Sprintf("---\nid: %s\nkind: cooldown\ndevices: [%s]\nbase_temperature: 0.3 K\n---\n# %s\n\n```cleave\nn_H = 2.6e11 cm^-2  #~ 2.6000e11 cm^-2\nmu = 1.1e6 cm^2/(V s)  #~ 1.1000e6 cm^2/(V s)\nE_F = fermi_energy(n_H, GaAs.mstar)  #~ 9.2886 meV\nl_B = magnetic_length(1 T)  #~ 25.656 nm\nx = n_H * 2  #~ 5.2000e11 cm^-2\n```\n\n| a | b |\n| - | - |\n| 1 | 2 |\n", cid, did, cid))
	}
	return dir
}

// The site of a generated 10,000-entry notebook (the target is < 10 s; DEVELOPERS.md has the
// figure).
func BenchmarkSite10k(b *testing.B) {
	dir := generated(b, 10_000)
	b.ResetTimer()
	for b.Loop() {
		s, err := site.Build(dir, site.Options{})
		if err != nil {
			b.Fatal(err)
		}
		if len(s.Files) < 10_000 {
			b.Fatalf("%d files", len(s.Files))
		}
	}
}
