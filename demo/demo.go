// Package demo writes the demo notebook: an invented lab's wafers, mask, pieces, process run,
// devices and cooldowns with synthetic data, committed as a short story, then runs the tool on it.
package demo

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"os/exec"
	"path"
	"path/filepath"
	"strings"
	"time"

	"cleave/hooks"
	"cleave/notebook"
	"cleave/notebook/compute"
	"cleave/notebook/plotfiles"
	"cleave/notebook/site"
)

// demoStep is one commit of the demo notebook's story.
type demoStep struct {
	when    string   // commit date
	who     string   // initials of the author
	message string   // commit message
	paths   []string // scenario files (or folders) this step adds
	edit    func(dir string) error
	data    []string // cooldowns (or wafers) whose synthetic data files this step writes
	narrate string   // what the demo tells the user about this step
	// viaHook commits the step with `git commit -a`, so the pre-commit hook recomputes the
	// staged notebook (the other steps recompute first and commit directly).
	viaHook bool
}

// maskTypo is the probe position first entered for probe 4 of HB100; the story corrects it.
const (
	maskRight = `{name: "4", position: 750 um`
	maskTypo  = `{name: "4", position: 700 um`
)

var demoStory = []demoStep{
	{when: "2024-03-15T17:20:00Z", who: "AK", message: "Grow W24-031 (uniform doping) and W24-032 (delta doping); draw Hall-bar mask HB100",
		paths: []string{"README.md", "wafers", "masks"}, data: []string{"W24-031"},
		edit: func(dir string) error {
			// The scorecards come later, once cooldowns measured the wafers.
			for _, w := range []string{"W24-031", "W24-032"} {
				if err := cutFrom(filepath.Join(dir, "wafers", w+".md"), scorecardHeading); err != nil {
					return err
				}
			}
			return replaceIn(filepath.Join(dir, "masks", "HB100.md"), maskRight, maskTypo)
		},
		narrate: "four Si calibration growths, two wafers with their growth logs (RHEED rates, Al fraction, doping from the cell calibration) and the Hall-bar mask (probe 4 entered at 700 um by mistake)"},
	{when: "2024-03-26T16:05:00Z", who: "JM", message: "Cleave three pieces and process Hall bars (run P24-07)",
		paths:   []string{"pieces", "processes", "devices"},
		narrate: "three pieces, one structured process run (etch rate, dose, TLM contacts), three devices"},
	{when: "2024-04-02T21:40:00Z", who: "RS", message: "CD24-001: W24-031-A-HB1 in the dark, with a temperature series",
		paths: []string{"cooldowns/CD24-001.md"}, data: []string{"CD24-001"},
		narrate: "first cooldown: Hall and SdH densities, mobility, LK mass, quantum lifetime"},
	{when: "2024-04-05T10:15:00Z", who: "JM", message: "HB100: probe 4 sits at 750 um, not 700 um (checked against the drawing)",
		edit: func(dir string) error {
			return replaceIn(filepath.Join(dir, "masks", "HB100.md"), maskTypo, maskRight)
		},
		narrate: "the mask correction: every result that depends on the probe spacing changes", viaHook: true},
	{when: "2024-04-09T19:30:00Z", who: "RS", message: "CD24-002: W24-031-A-HB1 again after illumination",
		paths: []string{"cooldowns/CD24-002.md"}, data: []string{"CD24-002"},
		narrate: "second cooldown of the same device after a red LED pulse (persistent photoconductivity)"},
	{when: "2024-04-16T22:10:00Z", who: "RS", message: "CD24-003 (edge piece of W24-031) and CD24-004 (W24-032 to 9 T at 30 mK)",
		paths: []string{"cooldowns/CD24-003.md", "cooldowns/CD24-004.md"}, data: []string{"CD24-003", "CD24-004"},
		narrate: "the edge piece with a parallel conducting layer, and quantum Hall plateaus on the delta-doped wafer"},
	{when: "2024-04-17T09:00:00Z", who: "AK", message: "W24-031, W24-032: scorecards of what the cooldowns measured, beside the expected density",
		paths:   []string{"wafers"},
		narrate: "the grower adds a scorecard to each wafer: measured densities beside the expected ones"},
}

// scorecardHeading starts the section of the demo wafers that the last step of the story adds.
const scorecardHeading = "\n## Scorecard\n"

// demoPeople are the invented authors, by initials (git would drop a final full stop from a
// name, so the initials go without).
var demoPeople = map[string]string{"AK": "AK", "JM": "JM", "RS": "RS"}

// Run writes the demo notebook (an invented lab's wafers, mask, pieces, process, devices and
// cooldowns, with synthetic data files) into dir — a new temporary folder when dir is "" —
// as a git repository whose commits tell the story of demoStory, recomputing the calc
// blocks at every step as a colleague would before committing. Then it validates the
// notebook, prints its lineage and the key results, and tells the user what to try next.
func Run(scenario fs.FS, dir string, out io.Writer) error {
	if dir == "" {
		d, err := os.MkdirTemp("", "cleave-demo-")
		if err != nil {
			return err
		}
		dir = d
	} else if entries, err := os.ReadDir(dir); err == nil && len(entries) > 0 {
		return fmt.Errorf("%s is not empty; give a new or empty folder", dir)
	}
	abs, err := filepath.Abs(dir)
	if err != nil {
		return err
	}
	if _, err := hooks.InitNotebook(abs, nil); err != nil {
		return err
	}
	fmt.Fprintf(out, "cleave demo: writing an invented lab's notebook to %s\n", abs)
	withGit := installHooks(abs, out)
	fmt.Fprintln(out)
	for i, st := range demoStory {
		for _, p := range st.paths {
			if err := copyTree(scenario, p, abs); err != nil {
				return err
			}
		}
		for _, cd := range st.data {
			for _, s := range demoSweeps(cd) {
				b, err := s.render()
				if err != nil {
					return err
				}
				if err := writeFile(filepath.Join(abs, filepath.FromSlash(s.path)), b); err != nil {
					return err
				}
			}
		}
		if st.edit != nil {
			if err := st.edit(abs); err != nil {
				return err
			}
		}
		fmt.Fprintf(out, "step %d (%s, %s): %s\n", i+1, st.when[:10], st.who, st.narrate)
		if st.viaHook && withGit {
			if err := commitThroughHook(abs, st, out); err != nil {
				return fmt.Errorf("demo step %d: %w", i+1, err)
			}
			continue
		}
		// A colleague brings the results up to date before committing; what the run found
		// stale is what `cleave check` would have listed (after the mask correction: the
		// results that depend on the probe spacing, old → new).
		wt := compute.WorkTree{Root: abs}
		if state, err := hooks.StateDir(abs); err == nil {
			wt.StateDir = state
		}
		rep, err := wt.Check(compute.CheckOptions{Write: true})
		if err != nil {
			return err
		}
		if fails := append(rep.Failures, rep.WriteFailures...); len(fails) > 0 {
			return fmt.Errorf("demo step %d: %w", i+1, errors.Join(fails...))
		}
		// `cleave calc` also draws the plots its plot(...) lines name.
		pr, err := plotfiles.Sync(abs, rep.Notebook, nil)
		if err != nil {
			return err
		}
		if len(pr.Problems) > 0 {
			return fmt.Errorf("demo step %d: %w", i+1, pr.Problems[0])
		}
		stale := 0
		for _, f := range rep.Files {
			for _, c := range f.Stale {
				if c.Old == "" {
					continue // a new entry's first results
				}
				if stale == 0 {
					fmt.Fprintln(out, "  cleave check finds stale results:")
				}
				stale++
				fmt.Fprintf(out, "    %s\n", c)
			}
		}
		when, _ := time.Parse(time.RFC3339, st.when)
		if _, err := hooks.CommitAll(abs, st.message, hooks.Author{Name: demoPeople[st.who], Email: strings.ToLower(st.who) + "@lab.invalid", When: when}); err != nil {
			return err
		}
	}
	return demoSummary(abs, out, withGit)
}

// installHooks sets up the pre-commit hook and the merge driver in the demo notebook, as a lab
// would in its own (`cleave hooks install`); their .gitattributes line goes into the first
// commit. It reports false when git is not on the PATH: the story is then committed without
// the hook.
func installHooks(dir string, out io.Writer) bool {
	if _, err := exec.LookPath("git"); err != nil {
		fmt.Fprintln(out, "(git is not on the PATH: the hooks are not installed, and every step is committed directly)")
		return false
	}
	// A hooks folder set for every repository of this user (core.hooksPath in the global
	// configuration) is not the demo's to change: the demo keeps its hooks in its own .git.
	if p, err := gitOutput(dir, nil, "config", "--get", "core.hooksPath"); err == nil && strings.TrimSpace(p) != "" {
		if _, err := gitOutput(dir, nil, "config", "core.hooksPath", ".git/hooks"); err != nil {
			fmt.Fprintf(out, "(the hooks are not installed: %v)\n", err)
			return false
		}
	}
	bin, _ := os.Executable()
	if _, err := hooks.Install(dir, bin); err != nil {
		fmt.Fprintf(out, "(the hooks are not installed: %v)\n", err)
		return false
	}
	fmt.Fprintln(out, "$ cleave hooks install    (a pre-commit hook that recomputes staged results, and the merge driver)")
	return true
}

// commitThroughHook commits a step with `git commit -a`: git runs the pre-commit hook, which
// recomputes the results the step made stale in the index and the work tree. What the hook
// prints is shown to the user.
func commitThroughHook(dir string, st demoStep, out io.Writer) error {
	env := []string{
		"GIT_AUTHOR_NAME=" + demoPeople[st.who], "GIT_AUTHOR_EMAIL=" + strings.ToLower(st.who) + "@lab.invalid", "GIT_AUTHOR_DATE=" + st.when,
		"GIT_COMMITTER_NAME=" + demoPeople[st.who], "GIT_COMMITTER_EMAIL=" + strings.ToLower(st.who) + "@lab.invalid", "GIT_COMMITTER_DATE=" + st.when,
	}
	fmt.Fprintln(out, "  git commit -a runs the pre-commit hook, which recomputes the staged notebook:")
	msg, err := gitOutput(dir, env, "-c", "commit.gpgsign=false", "commit", "-q", "-a", "-m", st.message)
	for _, l := range strings.Split(strings.TrimRight(msg, "\n"), "\n") {
		if l != "" {
			fmt.Fprintf(out, "    %s\n", l)
		}
	}
	if err != nil {
		return fmt.Errorf("git commit: %w", err)
	}
	return nil
}

// gitOutput runs git in dir and returns what it printed (stdout and stderr together).
func gitOutput(dir string, env []string, args ...string) (string, error) {
	cmd := exec.Command("git", args...)
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), env...)
	b, err := cmd.CombinedOutput()
	return string(b), err
}

// demoSummary validates the finished notebook, prints its lineage and the numbers a group
// would report, points to what to look at next and ends with the life of one device and the
// review of the mask correction, as a pull request would show it.
func demoSummary(dir string, out io.Writer, withGit bool) error {
	nb, err := notebook.LoadDir(dir)
	if err != nil {
		return err
	}
	fmt.Fprintln(out, "\n$ cleave validate")
	probs := nb.Validate()
	for _, p := range probs {
		fmt.Fprintln(out, p.Error())
	}
	if len(probs) == 0 {
		fmt.Fprintf(out, "%d entries, %d files: no problems\n", len(nb.Entries), len(nb.Files))
	}
	fmt.Fprintln(out, "\n$ cleave tree")
	if err := nb.Tree(out, ""); err != nil {
		return err
	}
	fmt.Fprintln(out, "\n$ cleave check")
	rep, err := compute.Run(compute.WorkTree{Root: dir}.FS(), nb, compute.Options{})
	if err != nil {
		return err
	}
	for _, l := range rep.Lines() {
		fmt.Fprintln(out, l)
	}
	if rep.OK() {
		fmt.Fprintf(out, "%d files with calc blocks, all results current\n", len(rep.Files))
	}
	fmt.Fprintln(out, "\nKey results (cleave eval --in FILE NAME):")
	for _, row := range demoResults {
		fmt.Fprintf(out, "  %-22s", row.file[strings.LastIndex(row.file, "/")+1:])
		env, err := compute.EvalEnv(dir, filepath.Join(dir, filepath.FromSlash(row.file)))
		if err != nil {
			return err
		}
		for _, name := range row.names {
			v, err := env.Eval(name)
			text := "error: " + fmt.Sprint(err)
			if err == nil {
				text = compute.JSONOf(v).Display
			}
			fmt.Fprintf(out, "  %s = %s", name, text)
		}
		fmt.Fprintln(out)
	}
	siteDir := filepath.Join(dir, ".git", "cleave", "site")
	if state, err := hooks.StateDir(dir); err == nil {
		siteDir = filepath.Join(state, "site")
	}
	st, err := site.Build(dir, site.Options{})
	if err != nil {
		return err
	}
	if err := st.Write(siteDir); err != nil {
		return err
	}
	fmt.Fprintf(out, "\n$ cleave site %s\nopen file://%s in a browser: every entry with its plots, the lineage as navigation, a search box\n",
		filepath.ToSlash(siteDir), filepath.ToSlash(filepath.Join(siteDir, "index.html")))
	fmt.Fprintf(out, `
What to look at next:
  cd %s
  git log --stat                      the story, commit by commit
  git show HEAD~3                     the mask correction: each changed result is one changed line
  cat cooldowns/CD24-001.md           calc blocks with their results after #~
  cleave tree W24-031                 one wafer's pieces, devices and cooldowns
  cleave eval --in cooldowns/CD24-001.md 'mu -> cm^2/(V s)'
  cleave check                        what CI runs: exits 1 on a stale result or an invalid entry
  edit a width in masks/HB100.md, then: cleave check; cleave calc
  cleave serve                        a live preview of the site at http://127.0.0.1:8765/
  edit it again and git commit -a     the pre-commit hook recomputes what you stage
  cleave history CD24-001             a cooldown's life, with its data files
  cleave review HEAD~4..HEAD~3 --markdown
                                      the mask correction as a pull-request comment
`, dir)
	if len(probs) > 0 || !rep.OK() {
		return errors.New("the demo notebook has problems (listed above)")
	}
	if !withGit {
		return nil
	}
	repo, err := hooks.Locate(dir)
	if err != nil {
		return err
	}
	fmt.Fprintf(out, "\n$ cleave history %s\n", historySample)
	h, err := repo.SampleHistory(historySample, "")
	if err != nil {
		return err
	}
	h.WriteText(out)
	fmt.Fprintf(out, "\n$ cleave review %s      (the mask correction, reviewed as a pull request)\n", maskCorrection)
	rv, err := repo.ReviewRange(maskCorrection)
	if err != nil {
		return err
	}
	rv.WriteText(out)
	return nil
}

// The device whose history the demo shows, and the range of the mask correction.
const (
	historySample  = "W24-031-A-HB1"
	maskCorrection = "HEAD~4..HEAD~3"
)

var demoResults = []struct {
	file  string
	names []string
}{
	{"wafers/W24-031.md", []string{"x_Al"}},
	{"processes/P24-07.md", []string{"rate", "Rc_W", "rho_c"}},
	{"cooldowns/CD24-001.md", []string{"n_H", "n_SdH", "mu", "m_LK", "tau_q"}},
	{"cooldowns/CD24-002.md", []string{"n_H", "n_SdH", "mu"}},
	{"cooldowns/CD24-003.md", []string{"n_H", "n_SdH", "mu"}},
	{"cooldowns/CD24-004.md", []string{"n_H", "n_SdH", "mu"}},
}

// copyTree copies a scenario file or folder into dir.
func copyTree(scenario fs.FS, root, dir string) error {
	return fs.WalkDir(scenario, root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return fmt.Errorf("demo scenario: %w", err)
		}
		if d.IsDir() {
			return nil
		}
		b, err := fs.ReadFile(scenario, p)
		if err != nil {
			return err
		}
		return writeFile(filepath.Join(dir, filepath.FromSlash(path.Clean(p))), b)
	})
}

func writeFile(p string, b []byte) error {
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return err
	}
	return os.WriteFile(p, b, 0o644)
}

// cutFrom removes everything from the first occurrence of mark to the end of the file,
// keeping the line ending before it.
func cutFrom(p, mark string) error {
	b, err := os.ReadFile(p)
	if err != nil {
		return err
	}
	i := strings.Index(string(b), mark)
	if i < 0 {
		return fmt.Errorf("demo: %s has no %q", p, strings.TrimSpace(mark))
	}
	return os.WriteFile(p, b[:i+1], 0o644)
}

func replaceIn(p, old, new string) error {
	b, err := os.ReadFile(p)
	if err != nil {
		return err
	}
	if !strings.Contains(string(b), old) {
		return fmt.Errorf("demo: %s does not contain %q", p, old)
	}
	return os.WriteFile(p, []byte(strings.Replace(string(b), old, new, 1)), 0o644)
}
