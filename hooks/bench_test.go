package hooks

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// The history of one sample in a repository of 10,000 commits over 2,000 entries (see
// genHistory), against `git log --format=%H -- PATH...` for the same paths: "cleave" and
// "git-log" time each alone; "both" runs them in turn and reports their ratio (the walk is
// the same work git log does, in go-git's packs instead of git's C code).
func BenchmarkHistory10k(b *testing.B) {
	dir := generatedRepo(b, 10000)
	repo := locate(b, dir)
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

// hookRepo is a clone of the generated 10,000-commit repository whose calc results were
// brought up to date by a first run of the hook and committed: the state a lab's notebook is
// in before someone edits one entry.
func hookRepo(b *testing.B) string {
	b.Helper()
	src := generatedRepo(b, 10000)
	dir := filepath.Join(b.TempDir(), "clone")
	gitT(b, "", "clone", "-q", src, dir)
	gitT(b, dir, "config", "user.name", "T. S.")
	gitT(b, dir, "config", "user.email", "ts@lab.invalid")
	if _, err := PreCommit(dir, StageResults); err != nil {
		b.Fatal(err)
	}
	gitT(b, dir, "commit", "-q", "--no-verify", "-m", "results")
	return dir
}

// The pre-commit hook when one entry changed: a wafer's design density, which its cooldown
// reads, in a notebook of 2,000 entries. "in-process" times what the hook does (read the
// index, evaluate with the cache, stage the recomputed file, carry it into the work tree);
// "git-commit" times `git commit -a` with the hook installed, the cleave program built from
// this module (a process start, and git's own work on a 2,000-file index, included).
func BenchmarkPreCommitOneEntry(b *testing.B) {
	dir := hookRepo(b)
	wafer := filepath.Join(dir, "wafers", "W0123.md")
	orig, err := os.ReadFile(wafer)
	if err != nil {
		b.Fatal(err)
	}
	i := 0
	edit := func() {
		i++
		body := strings.Replace(string(orig), "design_density: 2.", fmt.Sprintf("design_density: %d.", 3+i%5), 1)
		if err := os.WriteFile(wafer, []byte(body), 0o644); err != nil {
			b.Fatal(err)
		}
	}
	b.Run("in-process", func(b *testing.B) {
		for b.Loop() {
			b.StopTimer()
			edit()
			gitT(b, dir, "add", "wafers/W0123.md")
			b.StartTimer()
			h, err := PreCommit(dir, StageResults)
			if err != nil {
				b.Fatal(err)
			}
			if len(h.Staged) != 1 {
				b.Fatalf("the hook staged %v, want the one cooldown that reads the wafer", h.Staged)
			}
		}
	})
	b.Run("git-commit", func(b *testing.B) {
		bin := filepath.Join(b.TempDir(), "cleave")
		build := exec.Command("go", "build", "-o", bin, "cleave")
		if out, err := build.CombinedOutput(); err != nil {
			b.Fatalf("go build: %v\n%s", err, out)
		}
		if _, err := Install(dir, bin); err != nil {
			b.Fatal(err)
		}
		for b.Loop() {
			b.StopTimer()
			edit()
			b.StartTimer()
			gitT(b, dir, "commit", "-q", "-a", "-m", "design density")
		}
	})
}

// The review of a 50-commit range of the generated repository: the notebook at the head
// loaded and evaluated (its calc cache warm after the first run), the changed files diffed,
// the changed entries checked.
func BenchmarkReview50(b *testing.B) {
	dir := generatedRepo(b, 10000)
	repo := locate(b, dir)
	for b.Loop() {
		rv, err := repo.ReviewRange("HEAD~50..HEAD")
		if err != nil {
			b.Fatal(err)
		}
		if len(rv.Commits) != 50 {
			b.Fatalf("%d commits", len(rv.Commits))
		}
	}
}
