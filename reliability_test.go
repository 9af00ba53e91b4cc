package main

// The standing reliability suite (issue 13): hostile and unlucky input, each with the
// positioned error it must give; calc killed at random moments; an editor saving while calc
// runs. The mid-run data swap is TestDataSwappedMidRunNeverBlessed in notebook/compute; the
// writer's races are in notebook/calcblock. All of it is bounded in time.

import (
	"flag"
	"fmt"
	"io/fs"
	"maps"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"
)

var crashes = flag.Int("crashes", 5, "kills of a running calc in TestCrashDuringCalc (try 50 for a long run)")

// asCLI, set to 1 in its environment, makes the test binary run as cleave (see TestMain).
const asCLI = "CLEAVE_TEST_AS_CLI"

// cleaveProcess is cleave with args as a process of its own.
func cleaveProcess(args ...string) *exec.Cmd {
	cmd := exec.Command(os.Args[0], args...)
	cmd.Env = append(os.Environ(), asCLI+"=1")
	return cmd
}

// repeatJoin joins n copies of s with sep.
func repeatJoin(s, sep string, n int) string {
	return strings.TrimSuffix(strings.Repeat(s+sep, n), sep)
}

// hostileCase is one hostile or unlucky input: the files it adds to a copy of the demo and the
// lines `check` must print for it (each a prefix "path:line:col:" and a part of the message).
type hostileCase struct {
	name  string
	files map[string]string
	want  []string
	// setup, when set, prepares what files cannot say (a FIFO, a sparse file); it returns
	// false when the platform cannot make it.
	setup func(t *testing.T, dir string) bool
}

func bombYAML() string {
	var b strings.Builder
	b.WriteString(`a: &a ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]` + "\n")
	prev := "a"
	for _, c := range "bcdefghi" {
		fmt.Fprintf(&b, "%c: &%c [%s]\n", c, c, repeatJoin("*"+prev, ",", 9))
		prev = string(c)
	}
	return b.String()
}

var hostileCases = []hostileCase{
	{name: "a plot file that is a FIFO",
		files: map[string]string{"notes/fifo-plot.md": "```cleave\nf = plot(magnetic_length(1 T), \"x\")  #~ plot plots/fifo-plot/x.svg sha256:0123456789ab\n```\n"},
		setup: func(t *testing.T, dir string) bool {
			d := filepath.Join(dir, "notes", "plots", "fifo-plot")
			if err := os.MkdirAll(d, 0o755); err != nil {
				t.Fatal(err)
			}
			return mkfifo(filepath.Join(d, "x.svg")) == nil
		},
		want: []string{"notes/fifo-plot.md:2: plot notes/plots/fifo-plot/x.svg is not a regular file"}},
	{name: "300,000 terms on one line (1.5 MB)",
		files: map[string]string{"notes/long-sum.md": "# Long\n\n```cleave\nx = " + repeatJoin("1 T", " + ", 300_000) + "\ny = 2 T\n```\n"},
		want:  []string{"notes/long-sum.md:4:16385: error: line of 1800001 bytes"}},
	{name: "300,000 factors",
		files: map[string]string{"notes/long-product.md": "```cleave\nz = " + repeatJoin("2", "*", 300_000) + "\n```\n"},
		want:  []string{"notes/long-product.md:2:16385: error: line of 600003 bytes"}},
	{name: "a million field names",
		files: map[string]string{"notes/long-fields.md": "```cleave\na" + strings.Repeat(".a", 999_999) + "\n```\n"},
		want:  []string{"notes/long-fields.md:2:16385: error: line of 1999999 bytes"}},
	{name: "more tokens than a line may hold",
		files: map[string]string{"notes/tokens.md": "```cleave\nt = " + repeatJoin("1", "+", 3000) + "\n```\n"},
		want:  []string{"notes/tokens.md:2:4099: error: expression of 6001 parts"}},
	{name: "overflow",
		files: map[string]string{"notes/overflow.md": "```cleave\nbig = 1e308 T * 10\ntiny = 1e-300 m * 1e-300 m\nsub = 0 ± 1e-310\n```\n"},
		want: []string{"notes/overflow.md:2:15: error: 1e+308 * 10 overflows",
			"notes/overflow.md:3:17: error: 1e-300 * 1e-300 underflows to zero",
			"notes/overflow.md:4: (none) → (0.0 ± 1.0)e-310"}},
	{name: "YAML alias bomb",
		files: map[string]string{"wafers/W-bomb.md": "---\nid: W-bomb\nkind: wafer\n" + bombYAML() + "---\n\n```cleave\nx = wafer.i\n```\n"},
		want:  []string{"wafers/W-bomb.md:8:26: front matter: more than 50000 values"}},
	{name: "YAML alias loop",
		files: map[string]string{"wafers/W-loop.md": "---\nid: W-loop\nkind: wafer\nnotes: &n\n  again: *n\n---\n"},
		want:  []string{"wafers/W-loop.md:5:10: front matter: alias *n refers to a node that contains it"}},
	{name: "non-UTF-8 front matter",
		files: map[string]string{"wafers/W-latin.md": "---\nid: W-latin\nkind: wafer\nnotes: spacer 20 \xb5m\n---\n"},
		want:  []string{"wafers/W-latin.md:4:18: front matter: byte 0xB5 is not UTF-8 text"}},
	{name: "unresolved merge conflict",
		files: map[string]string{"notes/conflict.md": "```cleave\n<<<<<<< HEAD\nx = 1 T  #~ 1 T\n=======\nx = 2 T  #~ 2 T\n>>>>>>> other\n```\n"},
		want:  []string{"notes/conflict.md:2:1: unresolved merge conflict"}},
	{name: "lists nested 50,000 deep",
		files: map[string]string{"notes/deep.md": "# Deep\n\n" + strings.Repeat("- ", 50_000) + "x\n\n```cleave\nq = 1 T\n```\n"},
		want:  []string{"notes/deep.md:3:65: lists and block quotes nested more than 32 deep"}},
	{name: "a 5 MiB note",
		files: map[string]string{"notes/huge.md": "```cleave\nh = 1 T\n```\n" + strings.Repeat("A line of text in a very long note.\n", 150_000)},
		want:  []string{"notes/huge.md:1:1: file of 5.1 MiB: the Markdown of files larger than 4 MiB is not read"}},
	{name: "data files that are a FIFO, a folder, 1.5 GB, or no name",
		files: map[string]string{"cooldowns/CD-odd.md": "---\nid: CD-odd\nkind: cooldown\ndevices: [W24-031-A-HB1]\n" +
			"data:\n  - {file: data/odd/pipe.csv}\n  - {file: data/odd}\n  - {file: data/odd/huge.csv}\n  - {file: \"\"}\n---\n\n" +
			"```cleave\np = data(\"data/odd/pipe.csv\")\nf = data(\"data/odd\")\nh = data(\"data/odd/huge.csv\")\n```\n"},
		setup: func(t *testing.T, dir string) bool {
			odd := filepath.Join(dir, "cooldowns", "data", "odd")
			if err := os.MkdirAll(odd, 0o755); err != nil {
				t.Fatal(err)
			}
			f, err := os.Create(filepath.Join(odd, "huge.csv"))
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			if err := f.Truncate(1500 << 20); err != nil { // sparse: no disk space
				t.Fatal(err)
			}
			return mkfifo(filepath.Join(odd, "pipe.csv")) == nil
		},
		want: []string{"cooldowns/CD-odd.md:13:10: error: data: reading data file cooldowns/data/odd/pipe.csv: read cooldowns/data/odd/pipe.csv: not a regular file (it is a special file)",
			"cooldowns/CD-odd.md:14:10: error: data: reading data file cooldowns/data/odd: read cooldowns/data/odd: not a regular file (it is a folder)",
			"cooldowns/CD-odd.md:15:10: error: data: reading data file cooldowns/data/odd/huge.csv: read cooldowns/data/odd/huge.csv: data file too large: 1500.0 MiB",
			"cooldowns/CD-odd.md:6:12: data: cooldowns/data/odd/pipe.csv is a special file",
			"cooldowns/CD-odd.md:7:12: data: cooldowns/data/odd is a folder, not a data file",
			"cooldowns/CD-odd.md:8:12: data: cooldowns/data/odd/huge.csv: data file too large",
			"cooldowns/CD-odd.md:9:12: data: empty file name"}},
}

// TestHostileNotebook puts every hostile input into one copy of the demo notebook. `check`
// finishes in bounded time and memory, prints each input's positioned error and nothing about
// the demo's own files; `calc` then changes no byte outside result regions, evaluates what
// follows a bad line, and leaves the conflicted file alone.
func TestHostileNotebook(t *testing.T) {
	dir := copyDemo(t)
	before := entryFiles(t, dir)
	tried, handled := 0, 0
	var want []string
	for _, c := range hostileCases {
		if c.setup != nil && !c.setup(t, dir) {
			t.Logf("%s: cannot be made here, skipped", c.name)
			continue
		}
		for p, s := range c.files {
			full := filepath.Join(dir, filepath.FromSlash(p))
			if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(full, []byte(s), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		tried++
		want = append(want, c.want...)
	}

	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	start := time.Now()
	code, out, errs := cleave(t, "-C", dir, "check")
	took := time.Since(start)
	runtime.ReadMemStats(&m1)
	if code != 1 {
		t.Fatalf("check: exit %d, want 1\n%s%s", code, out, errs)
	}
	if grew := m1.TotalAlloc - m0.TotalAlloc; grew > 1<<30 {
		t.Errorf("check allocated %d MiB", grew>>20)
	}
	lines := strings.Split(out, "\n")
	for _, c := range hostileCases {
		ok := true
		for _, w := range c.want {
			if !slices.ContainsFunc(lines, func(l string) bool { return strings.HasPrefix(l, w) }) {
				t.Errorf("%s: check does not print %q", c.name, w)
				ok = false
			}
		}
		if ok {
			handled++
		}
	}
	for _, l := range lines {
		if l == "" || strings.HasPrefix(l, "notes/") || strings.HasPrefix(l, "wafers/W-") || strings.HasPrefix(l, "cooldowns/CD-odd.md") {
			continue
		}
		t.Errorf("check reports a line of the demo's own files: %.300s", l)
	}
	t.Logf("hostile inputs: %d tried, %d handled with their positioned errors; check took %v", tried, handled, took.Round(time.Millisecond))

	if code, out, errs := cleave(t, "-C", dir, "calc"); code != 1 {
		t.Fatalf("calc: exit %d, want 1\n%.2000s%.2000s", code, out, errs)
	}
	after := entryFiles(t, dir)
	for p, s := range after {
		orig, ok := before[p]
		if !ok {
			for _, c := range hostileCases {
				if f, ok := c.files[p]; ok {
					orig = f
				}
			}
		}
		if trimResults(s) != trimResults(orig) {
			t.Errorf("calc changed %s outside its result regions", p)
		}
		if _, ok := before[p]; ok && s != orig {
			t.Errorf("calc changed the demo's %s", p)
		}
	}
	if after["notes/conflict.md"] != hostileCases[9].files["notes/conflict.md"] {
		t.Error("calc wrote into a file with conflict markers")
	}
	for _, l := range []string{"y = 2 T  #~ 2.0000 T", "sub = 0 ± 1e-310  #~ (0.0 ± 1.0)e-310"} {
		found := false
		for _, s := range after {
			found = found || strings.Contains(s, l)
		}
		if !found {
			t.Errorf("no file holds %q after calc", l)
		}
	}
}

// TestHostileCommandLine: ids that would make hidden files, a read-only entry, and paths that
// are symbolic links out of the notebook are refused with a message and change nothing.
func TestHostileCommandLine(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "nb")
	if code, _, errs := cleave(t, "init", dir); code != 0 {
		t.Fatalf("init: %s", errs)
	}
	tried, handled := 0, 0
	for _, id := range []string{".", "..", ".hidden"} {
		tried++
		code, _, errs := cleave(t, "-C", dir, "new", "wafer", id)
		ents, _ := os.ReadDir(filepath.Join(dir, "wafers"))
		if code == 1 && strings.Contains(errs, "do not start with '.'") && len(ents) == 1 { // .gitkeep
			handled++
		} else {
			t.Errorf("new wafer %q: exit %d, %q, wafers/ holds %d files", id, code, errs, len(ents))
		}
	}

	note := filepath.Join(dir, "note.md")
	stale := "```cleave\nx = 2 T  #~ 1 T\n```\n"
	if err := os.WriteFile(note, []byte(stale), 0o444); err != nil {
		t.Fatal(err)
	}
	tried++
	code, out, _ := cleave(t, "-C", dir, "calc")
	if b, _ := os.ReadFile(note); code == 1 && strings.Contains(out, "note.md: writing") && strings.Contains(out, "file is read-only") && string(b) == stale {
		handled++
	} else {
		t.Errorf("calc of a read-only entry: exit %d, %q, file now %q", code, out, b)
	}
	os.Chmod(note, 0o644)

	outside := filepath.Join(t.TempDir(), "elsewhere.md")
	if err := os.WriteFile(outside, []byte("```cleave\nx = 1 T\n```\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(outside, filepath.Join(dir, "link.md")); err == nil {
		tried++
		code, _, errs := cleave(t, "-C", dir, "check", filepath.Join(dir, "link.md"))
		if code == 1 && strings.Contains(errs, "outside the notebook") {
			handled++
		} else {
			t.Errorf("check link.md: exit %d, %q", code, errs)
		}
	}
	t.Logf("hostile command lines: %d tried, %d handled", tried, handled)
}

// TestCrashDuringCalc kills a running `calc` (SIGKILL, at random moments over its run) again
// and again. After each kill every Markdown file holds, byte for byte, what it held before or
// what a completed calc writes; the temporary files a kill leaves are removed by the next run;
// and the cache, written by runs killed at any point, never changes an answer.
func TestCrashDuringCalc(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no SIGKILL")
	}
	dir, ref := copyDemo(t), copyDemo(t)
	// Every result that depends on the mask's drawn width goes stale, and so do the results
	// of 200 short notes: writing them takes a good part of the run, so that kills land
	// between writes too.
	edit := func(root string) {
		p := filepath.Join(root, "masks", "HB100.md")
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		s := strings.Replace(string(b), "width: 100 um", "width: 80 um", 1)
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.MkdirAll(filepath.Join(root, "notes"), 0o755); err != nil {
			t.Fatal(err)
		}
		for i := range 200 {
			note := fmt.Sprintf("# Field %d\n\n```cleave\nB = %d mT  #~ 0 T\nl = magnetic_length(B)  #~ 0 nm\n```\n", i, i+1)
			if err := os.WriteFile(filepath.Join(root, "notes", fmt.Sprintf("f%03d.md", i)), []byte(note), 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	edit(dir)
	edit(ref)
	old := entryFiles(t, dir)
	start := time.Now()
	if code, _, errs := cleave(t, "-C", ref, "calc"); code != 0 {
		t.Fatalf("reference calc: %s", errs)
	}
	full := time.Since(start)
	want := entryFiles(t, ref)
	changed := 0
	for p := range want {
		if want[p] != old[p] {
			changed++
		}
	}
	if changed < 3 {
		t.Fatalf("the edit makes only %d files stale; the test needs several", changed)
	}

	r := rand.New(rand.NewPCG(13, 2026))
	partial, leftovers := 0, 0
	for i := range *crashes {
		for p, s := range old { // back to the stale state; the cache stays as the kill left it
			if err := os.WriteFile(filepath.Join(dir, filepath.FromSlash(p)), []byte(s), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		cmd := cleaveProcess("-C", dir, "calc")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(time.Duration(r.Float64() * 1.5 * float64(full+100*time.Millisecond)))
		cmd.Process.Kill()
		cmd.Wait()
		got := entryFiles(t, dir)
		nNew := 0
		for p, s := range got {
			switch s {
			case want[p]:
				if s != old[p] {
					nNew++
				}
			case old[p]:
			default:
				t.Fatalf("kill %d: %s is neither the old nor the new file:\n%s", i, p, s)
			}
		}
		if nNew > 0 && nNew < changed {
			partial++
		}
		leftovers += len(temps(t, dir))
	}
	t.Logf("%d kills of calc (a complete run takes %v): %d left some files written and others not, %d temporary files left behind; every file old or new byte for byte", *crashes, full.Round(time.Millisecond), partial, leftovers)

	// The next run removes what the kills left (once it is clearly stale), and the results
	// with the cache the kills wrote are those without it.
	time.Sleep(2100 * time.Millisecond)
	code, _, errs := cleave(t, "-C", dir, "calc")
	if code != 0 {
		t.Fatalf("calc after the kills: exit %d\n%s", code, errs)
	}
	if l := temps(t, dir); len(l) > 0 {
		t.Errorf("temporary files left after a complete run: %v (%s)", l, errs)
	}
	if got := entryFiles(t, dir); !maps.Equal(got, want) {
		t.Error("after a complete calc the files differ from the reference")
	}
	c1, out1, _ := cleave(t, "-C", dir, "check")
	c2, out2, _ := cleave(t, "-C", dir, "check", "--no-cache")
	if c1 != 0 || c2 != 0 || out1 != out2 {
		t.Errorf("check with the cache: exit %d\n%s\nwithout: exit %d\n%s", c1, out1, c2, out2)
	}
}

// temps lists the temporary files of interrupted writes under root.
func temps(t *testing.T, root string) []string {
	t.Helper()
	var out []string
	filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err == nil && d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		if err == nil && strings.HasPrefix(d.Name(), ".") && strings.Contains(d.Name(), ".tmp-") {
			out = append(out, p)
		}
		return nil
	})
	return out
}

// TestConcurrentEditor: an editor saves notes (in place and by renaming a new file over the
// old one) while `calc` runs again and again. No save is ever lost: when both stop, every
// note's text outside its result regions is what the editor saved last; then a calc and a
// check pass.
func TestConcurrentEditor(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "nb")
	if code, _, errs := cleave(t, "init", dir); code != 0 {
		t.Fatalf("init: %s", errs)
	}
	const notes = 6
	path := func(i int) string { return filepath.Join(dir, "notes", fmt.Sprintf("n%d.md", i)) }
	text := func(i, edit int) string {
		return fmt.Sprintf("# Note %d\n\nEdit %d of an invented note.\n\n```cleave\nB = %d T\nn = 3e11 cm^-2\nnu = filling_factor(n, B)\nl = magnetic_length(B)\n```\n", i, edit, edit%9+1)
	}
	if err := os.MkdirAll(filepath.Join(dir, "notes"), 0o755); err != nil {
		t.Fatal(err)
	}
	last := make([]string, notes)
	for i := range notes {
		last[i] = text(i, 0)
		if err := os.WriteFile(path(i), []byte(last[i]), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	var wg sync.WaitGroup
	stop := make(chan struct{})
	saves := 0
	wg.Add(1)
	go func() { // the editor
		defer wg.Done()
		r := rand.New(rand.NewPCG(1, 13))
		for edit := 1; edit <= 300; edit++ {
			i := r.IntN(notes)
			s := text(i, edit)
			var err error
			if edit%2 == 0 {
				err = os.WriteFile(path(i), []byte(s), 0o644)
			} else {
				tmp := path(i) + "~"
				if err = os.WriteFile(tmp, []byte(s), 0o644); err == nil {
					err = os.Rename(tmp, path(i))
				}
			}
			if err != nil {
				t.Error(err)
				return
			}
			last[i], saves = s, saves+1
			time.Sleep(time.Duration(r.IntN(3000)) * time.Microsecond)
		}
		close(stop)
	}()
	runs, refused := 0, 0
	for done := false; !done; {
		select {
		case <-stop:
			done = true
		default:
		}
		var out, errb strings.Builder
		run([]string{"-C", dir, "calc"}, &out, &errb)
		runs++
		refused += strings.Count(out.String(), "changed on disk")
	}
	wg.Wait()
	for i := range notes {
		b, err := os.ReadFile(path(i))
		if err != nil {
			t.Fatal(err)
		}
		if trimResults(string(b)) != trimResults(last[i]) {
			t.Errorf("note %d: the last save was lost:\nfile\n%s\nlast save\n%s", i, b, last[i])
		}
	}
	t.Logf("%d saves during %d calc runs: %d writes refused because the file had changed on disk, no save lost", saves, runs, refused)
	if code, _, errs := cleave(t, "-C", dir, "calc"); code != 0 {
		t.Fatalf("final calc: %s", errs)
	}
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("final check: %s%s", out, errs)
	}
}

// trimResults removes every result region with the blanks before it.
func trimResults(s string) string {
	lines := strings.Split(stripResults(s), "\n")
	for i, l := range lines {
		lines[i] = strings.TrimRight(l, " \t")
	}
	return strings.Join(lines, "\n")
}
