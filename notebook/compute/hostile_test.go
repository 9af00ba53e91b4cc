package compute

import (
	"bytes"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
	"time"

	"cleave/calc/transport"
)

// backdateAll sets every file's modification time under root (but .git) to t, so that the
// scan's stamps are not racy and the fast paths (the digest, the cache's stamps) are used.
func backdateAll(tb testing.TB, root string, t time.Time) {
	tb.Helper()
	err := filepath.Walk(root, func(p string, fi os.FileInfo, err error) error {
		if err != nil {
			return err
		}
		if fi.IsDir() && fi.Name() == ".git" {
			return filepath.SkipDir
		}
		if fi.Mode().IsRegular() {
			return os.Chtimes(p, t, t)
		}
		return nil
	})
	if err != nil {
		tb.Fatal(err)
	}
}

// sweepCSV is a synthetic sweep of density n (m^-2) and mobility 100 m^2/(V s).
func sweepCSV(tb testing.TB, n float64) []byte {
	tb.Helper()
	d, err := transport.Sweep(transport.SweepParams{Density: n, Mobility: trueMu, MassRatio: 0.067, QuantumLifetime: 1e-12,
		Temperature: 1.5, Squares: 250.0 / 48.0, BStart: -1, BEnd: 1, Points: 2001, Noise: 0.05, Seed: 7})
	if err != nil {
		tb.Fatal(err)
	}
	var b bytes.Buffer
	if err := transport.WriteCSV(&b, d); err != nil {
		tb.Fatal(err)
	}
	return b.Bytes()
}

// TestDataSwappedMidRunNeverBlessed (issue 13, item 1): a data file replaced after the
// evaluation read it, while the check goes on, is never certified. The check that ran keeps
// what it read (the digest taken before the run, the cache keyed by the bytes read), so the
// next check re-evaluates and reports the stale lines — with the last good digest, without
// it (the cache must not answer), and without the cache. The same for calc.
func TestDataSwappedMidRunNeverBlessed(t *testing.T) {
	for _, write := range []bool{false, true} {
		name := map[bool]string{false: "check", true: "calc"}[write]
		t.Run(name, func(t *testing.T) {
			root := testNotebook(t)
			w := WorkTree{Root: root, StateDir: filepath.Join(root, ".git", "cleave")}
			data := filepath.Join(root, "cooldowns", "data", "sweep.csv")
			// Without its two failing lines the notebook is good, so a check keeps its digest.
			c1 := filepath.Join(root, "cooldowns", "C1.md")
			b, err := os.ReadFile(c1)
			if err != nil {
				t.Fatal(err)
			}
			good := strings.Replace(string(b), "bad = 3 T + 1 m\nescape = data(\"../../../etc/passwd\")\n", "", 1)
			if err := os.WriteFile(c1, []byte(good), 0o644); err != nil {
				t.Fatal(err)
			}
			if res, err := w.Check(CheckOptions{Write: true}); err != nil || res.Bad(true) > 0 {
				t.Fatalf("calc: %v %v", err, res.Lines())
			}
			// The notebook's results are current; its files were last changed an hour ago;
			// the cache is gone, so the next run evaluates (and reads the data file).
			backdateAll(t, root, time.Now().Add(-time.Hour))
			if err := os.RemoveAll(w.StateDir); err != nil {
				t.Fatal(err)
			}
			swapped := 0
			afterRead = func(name string) {
				if name != "cooldowns/data/sweep.csv" || swapped > 0 {
					return
				}
				swapped++
				tmp := data + ".new"
				if err := os.WriteFile(tmp, sweepCSV(t, 1.5*trueN), 0o644); err != nil {
					t.Error(err)
				}
				// Another old time stamp, so that the next scan is not racy: only the
				// order of digest and run can keep the change from being blessed.
				old := time.Now().Add(-2 * time.Hour)
				if err := os.Chtimes(tmp, old, old); err != nil {
					t.Error(err)
				}
				if err := os.Rename(tmp, data); err != nil {
					t.Error(err)
				}
			}
			res, err := w.Check(CheckOptions{Write: write})
			afterRead = nil
			if err != nil {
				t.Fatal(err)
			}
			if swapped != 1 || res.Unchanged || !res.OK() {
				t.Fatalf("the data file was swapped %d times during a run that evaluated (unchanged: %v) and found it good (%v)", swapped, res.Unchanged, res.Lines())
			}
			if !write {
				// The check found nothing wrong with what it read and kept the digest it took
				// before reading (the path under test); that digest is not the notebook's now.
				if _, err := os.Stat(filepath.Join(w.StateDir, digestFile)); err != nil {
					t.Fatalf("the check kept no digest: %v", err)
				}
				if w.GoodCheck(mustScan(t, w).Digest()) {
					t.Fatal("the digest of the notebook after the swap is the one kept as good")
				}
			}
			for _, step := range []struct {
				name string
				opt  CheckOptions
				prep func()
			}{
				{"next check", CheckOptions{}, func() {}},
				{"without the last good digest", CheckOptions{}, w.ForgetGoodCheck},
				{"without the cache", CheckOptions{NoCache: true}, func() {}},
			} {
				step.prep()
				res, err := w.Check(step.opt)
				if err != nil {
					t.Fatal(err)
				}
				if res.Unchanged || res.OK() {
					t.Fatalf("%s: the swapped data file was certified (unchanged %v, ok %v)", step.name, res.Unchanged, res.OK())
				}
				if got := strings.Join(res.Lines(), "\n"); !strings.Contains(got, "cooldowns/C1.md:11: ") || !strings.Contains(got, "→") {
					t.Errorf("%s: the density line is not listed as stale:\n%s", step.name, got)
				}
			}
		})
	}
}

// TestSpecialDataFiles (issue 13, item 5): a data path that is a FIFO (which blocked a check
// forever), a folder or a file beyond the size bound fails at its line, quickly and in
// bounded memory; validation names each.
func TestSpecialDataFiles(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no FIFOs")
	}
	root := t.TempDir()
	if err := os.Mkdir(filepath.Join(root, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Join(root, "data", "folder"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := syscall.Mkfifo(filepath.Join(root, "data", "pipe.csv"), 0o644); err != nil {
		t.Skip("mkfifo:", err)
	}
	// A sparse file: 1.5 GB by its size, no disk space (the file took 4.5 GB of memory).
	f, err := os.Create(filepath.Join(root, "data", "huge.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(1500 << 20); err != nil {
		t.Fatal(err)
	}
	f.Close()
	entry := "---\nid: C9\nkind: cooldown\ndata:\n  - {file: data/pipe.csv}\n  - {file: data/folder}\n  - {file: data/huge.csv}\n  - {file: \"\"}\n---\n" +
		"```cleave\np = data(\"data/pipe.csv\")\nf = data(\"data/folder\")\nh = data(\"data/huge.csv\")\nok = 2 T\n```\n"
	if err := os.WriteFile(filepath.Join(root, "C9.md"), []byte(entry), 0o644); err != nil {
		t.Fatal(err)
	}
	var before runtime.MemStats
	runtime.ReadMemStats(&before)
	done := make(chan *CheckResult, 1)
	go func() {
		res, err := WorkTree{Root: root, StateDir: filepath.Join(root, ".git", "cleave")}.Check(CheckOptions{Write: true})
		if err != nil {
			t.Error(err)
		}
		done <- res
	}()
	var res *CheckResult
	select {
	case res = <-done:
	case <-time.After(60 * time.Second):
		t.Fatal("calc did not return within a minute: a special data file blocked it")
	}
	var after runtime.MemStats
	runtime.ReadMemStats(&after)
	if grew := after.TotalAlloc - before.TotalAlloc; grew > 200<<20 {
		t.Errorf("the run allocated %d MiB: the huge file was read", grew>>20)
	}
	lines := strings.Join(res.Lines(), "\n")
	for _, want := range []string{
		"C9.md:11:10: error: data: reading data file data/pipe.csv: read data/pipe.csv: not a regular file (it is a special file)",
		"C9.md:12:10: error: data: reading data file data/folder: read data/folder: not a regular file (it is a folder)",
		"C9.md:13:10: error: data: reading data file data/huge.csv: read data/huge.csv: data file too large: 1500.0 MiB",
		// validation of the data: list
		"C9.md:5:12: data: data/pipe.csv is a special file (a pipe, a device or a socket), not a data file",
		"C9.md:6:12: data: data/folder is a folder, not a data file",
		"C9.md:7:12: data: data/huge.csv: data file too large: 1500.0 MiB",
		"C9.md:8:12: data: empty file name",
	} {
		if !strings.Contains(lines, want) {
			t.Errorf("missing %q in\n%s", want, lines)
		}
	}
	if b, _ := os.ReadFile(filepath.Join(root, "C9.md")); !strings.Contains(string(b), "ok = 2 T  #~ 2.0000 T") {
		t.Errorf("the rest of the file was not evaluated:\n%s", b)
	}
}

func mustScan(t *testing.T, w WorkTree) *Scan {
	t.Helper()
	sc, err := w.Scan()
	if err != nil {
		t.Fatal(err)
	}
	return sc
}
