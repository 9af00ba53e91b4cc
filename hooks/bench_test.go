package hooks

import (
	"os/exec"
	"testing"
	"time"
)

// The history of one sample in a repository of 10,000 commits over 2,000 entries (see
// genHistory), against `git log --format=%H -- PATH...` for the same paths: "cleave" and
// "git-log" time each alone; "both" runs them in turn and reports their ratio (the walk is
// the same work git log does, in go-git's packs instead of git's C code).
func BenchmarkHistory10k(b *testing.B) {
	dir := generatedRepo(b, 10000)
	repo, err := Locate(dir)
	if err != nil {
		b.Fatal(err)
	}
	h, err := repo.SampleHistory("CD0123", "")
	if err != nil {
		b.Fatal(err)
	}
	var paths []string
	for _, t := range h.Tracked {
		paths = append(paths, t.Path)
	}
	gitLog := func() time.Duration {
		cmd := exec.Command("git", append([]string{"log", "--format=%H", "--"}, paths...)...)
		cmd.Dir = dir
		if out, err := cmd.Output(); err != nil || len(out) == 0 {
			b.Fatalf("git log: %v", err)
		}
		return cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()
	}
	ours := func() {
		if _, err := repo.SampleHistory("CD0123", ""); err != nil {
			b.Fatal(err)
		}
	}
	b.Run("cleave", func(b *testing.B) {
		for b.Loop() {
			ours()
		}
	})
	b.Run("git-log", func(b *testing.B) {
		for b.Loop() {
			gitLog()
		}
	})
	// Wall-clock and processor times of both, and their ratios; on a shared machine the
	// processor times are the steadier comparison.
	b.Run("both", func(b *testing.B) {
		var wOurs, wGit, cOurs, cGit time.Duration
		for b.Loop() {
			s, c := time.Now(), cpuTime()
			ours()
			wOurs += time.Since(s)
			cOurs += cpuTime() - c
			s = time.Now()
			cGit += gitLog()
			wGit += time.Since(s)
		}
		n := float64(b.N)
		b.ReportMetric(float64(wOurs.Milliseconds())/n, "cleave-ms/op")
		b.ReportMetric(float64(wGit.Milliseconds())/n, "git-log-ms/op")
		b.ReportMetric(wOurs.Seconds()/wGit.Seconds(), "wall-ratio")
		if cOurs > 0 && cGit > 0 {
			b.ReportMetric(float64(cOurs.Milliseconds())/n, "cleave-cpu-ms/op")
			b.ReportMetric(float64(cGit.Milliseconds())/n, "git-log-cpu-ms/op")
			b.ReportMetric(cOurs.Seconds()/cGit.Seconds(), "cpu-ratio")
		}
	})
}
