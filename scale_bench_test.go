package main

import (
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"
)

var scaleWafers = flag.Int("scalewafers", 1400, "wafers in the generated notebook of BenchmarkScale (7 entries each)")

// BenchmarkScale measures `cleave check` from the command line on a generated notebook of
// about 7 × scalewafers entries (1,400 wafers: 9,801 entries, 5,600 files with calc blocks,
// 22,400 block lines), each figure against reading every tracked file once
// (`git ls-files -z | xargs -0 cat > /dev/null`) timed in the same run:
//
//	cold/read       a check with no cache (every file read, parsed and evaluated once)
//	onechange/read  a check after one cooldown changed (the cache answers the rest)
//	unchanged/read  a check of a notebook unchanged since the last good check
//
// Each is the median of several runs of the built binary. Run it with
//
//	go test -run '^$' -bench Scale -benchtime 1x .
func BenchmarkScale(b *testing.B) {
	if _, err := exec.LookPath("git"); err != nil {
		b.Skip("needs git")
	}
	dir := b.TempDir()
	bin := filepath.Join(dir, "cleave")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		b.Fatalf("go build: %v\n%s", err, out)
	}
	nb := filepath.Join(dir, "nb")
	genScaleNotebook(b, nb, *scaleWafers)
	if out, err := exec.Command("git", "init", "-q", nb).CombinedOutput(); err != nil {
		b.Fatalf("git init: %v\n%s", err, out)
	}
	// The results written once, as a notebook in use has them, and committed.
	calc := exec.Command(bin, "calc")
	calc.Dir = nb
	if out, err := calc.CombinedOutput(); err != nil {
		b.Fatalf("cleave calc: %v\n%s", err, out)
	}
	for _, args := range [][]string{{"add", "-A"}, {"-c", "user.name=bench", "-c", "user.email=bench@lab.invalid", "commit", "-q", "-m", "generated"}} {
		cmd := exec.Command("git", args...)
		cmd.Dir = nb
		if out, err := cmd.CombinedOutput(); err != nil {
			b.Fatalf("git %v: %v\n%s", args, err, out)
		}
	}
	// Files older than the racy-timestamp window, as a notebook's files are.
	old := time.Now().Add(-time.Hour)
	filepath.WalkDir(nb, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() && !strings.HasPrefix(p, filepath.Join(nb, ".git")) {
			os.Chtimes(p, old, old)
		}
		return nil
	})
	run := func(setup func(), name string, args ...string) time.Duration {
		if setup != nil {
			setup()
		}
		cmd := exec.Command(name, args...)
		cmd.Dir = nb
		start := time.Now()
		cmd.Run() // a check may exit 1; only the time matters here
		return time.Since(start)
	}
	median := func(f func() time.Duration) time.Duration {
		var ts []time.Duration
		for range 5 {
			ts = append(ts, f())
		}
		sort.Slice(ts, func(i, j int) bool { return ts[i] < ts[j] })
		return ts[len(ts)/2]
	}
	read := func() time.Duration { return run(nil, "sh", "-c", "git ls-files -z | xargs -0 cat > /dev/null") }
	noCache := func() { os.RemoveAll(filepath.Join(nb, ".git", "cleave")) }
	cooldown := filepath.Join(nb, "cooldowns", "CD00007A.md")
	touch := func() {
		f, err := os.OpenFile(cooldown, os.O_APPEND|os.O_WRONLY, 0)
		if err == nil {
			f.WriteString("\n")
			f.Close()
		}
	}
	for b.Loop() {
		r := median(read)
		cold := median(func() time.Duration { return run(noCache, bin, "check") })
		run(nil, bin, "check") // fill the cache
		one := median(func() time.Duration { return run(touch, bin, "check") })
		// Let the last change leave the racy window, then a good check keeps the digest.
		os.Chtimes(cooldown, old.Add(time.Minute), old.Add(time.Minute))
		run(nil, bin, "check")
		same := median(func() time.Duration { return run(nil, bin, "check") })
		b.ReportMetric(float64(r.Milliseconds()), "read-ms")
		b.ReportMetric(cold.Seconds()/r.Seconds(), "cold/read")
		b.ReportMetric(one.Seconds()/r.Seconds(), "onechange/read")
		b.ReportMetric(same.Seconds()/r.Seconds(), "unchanged/read")
	}
}

// genScaleNotebook writes the generated notebook: per wafer two pieces, a device on each with
// a calc block reading the mask's geometry, a cooldown on each device with a calc block of
// closed forms reading the wafer's design density; one mask for all.
func genScaleNotebook(tb testing.TB, root string, wafers int) {
	tb.Helper()
	write := func(rel, s string) {
		p := filepath.Join(root, rel)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			tb.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			tb.Fatal(err)
		}
	}
	write("masks/M1.md", "---\nid: M1\nkind: mask\nwidth: 100 um\nlength: 1000 um\nprobes:\n"+
		"  - {name: \"1\", position: 0 um, arm_width: 10 um, side: top}\n"+
		"  - {name: \"2\", position: 250 um, arm_width: 10 um, side: top}\n"+
		"  - {name: \"3\", position: 750 um, arm_width: 10 um, side: top}\n"+
		"  - {name: \"4\", position: 250 um, arm_width: 10 um, side: bottom}\n---\n# M1\n")
	for w := range wafers {
		wid := fmt.Sprintf("W%05d", w)
		write("wafers/"+wid+".md", fmt.Sprintf("---\nid: %s\nkind: wafer\nchannel: GaAs\ndesign_density: %.1fe11 cm^-2\n---\n# %s\n\n"+
			"## Layers\n\n| layer | material | thickness | doping |\n| --- | --- | --- | --- |\n"+
			"| cap | GaAs | 10 nm | - |\n| barrier | Al0.3Ga0.7As | 50 nm | Si 1e18 cm^-3 |\n"+
			"| spacer | Al0.3Ga0.7As | 20 nm | - |\n| buffer | GaAs | 500 nm | - |\n", wid, 2+float64(w%7)*0.1, wid))
		for _, p := range []string{"A", "B"} {
			pid, did, cid := wid+"-"+p, wid+"-"+p+"-HB1", fmt.Sprintf("CD%05d%s", w, p)
			write("pieces/"+pid+".md", fmt.Sprintf("---\nid: %s\nkind: piece\nfrom: %s\n---\n# %s\n", pid, wid, pid))
			write("devices/"+did+".md", fmt.Sprintf("---\nid: %s\nkind: device\nfrom: %s\nmask: M1\n---\n# %s\n\n"+
				"```cleave\nW = geometry.width\nsq = squares(\"2\", \"3\")\n```\n", did, pid, did))
			write("cooldowns/"+cid+".md", fmt.Sprintf("---\nid: %s\nkind: cooldown\ndevices: [%s]\nbase_temperature: 0.3 K\n---\n# %s\n\n"+
				"```cleave\nn = wafer.design_density\nB = 1.5 T\nnu = filling_factor(n, B)\nlB = magnetic_length(B)\n"+
				"Ec = cyclotron_energy(B, GaAs)\nE_F = fermi_energy(n, GaAs)\n```\n", cid, did, cid))
		}
	}
}
