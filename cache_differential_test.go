package main

import (
	"bytes"
	"flag"
	"fmt"
	"io/fs"
	"maps"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"
)

var (
	diffSteps = flag.Int("diffsteps", 10, "edits per seed in TestCacheDifferential (try 300 for a long run)")
	diffSeeds = flag.Int("diffseeds", 1, "seeds in TestCacheDifferential")
)

// TestCacheDifferential is the cache's contract as a property: on a copy of the demo
// notebook, random sequences of edits (geometry, data bytes, names added to and removed from
// calc blocks, layer tables, lineage links, cooldowns added, removed and renamed, front-matter
// fields) are applied, and after each one `check` and `calc` with the cache print exactly what
// they print with the cache deleted, and leave the same files. Two copies are kept in step:
// A keeps its cache across the sequence, B has it deleted before every command.
//
// go test -run TestCacheDifferential -diffsteps 300 -diffseeds 5 runs it longer.
func TestCacheDifferential(t *testing.T) {
	for seed := range *diffSeeds {
		t.Run(fmt.Sprint("seed", seed), func(t *testing.T) {
			r := rand.New(rand.NewPCG(uint64(seed), 2026))
			a, b := copyDemo(t), copyDemo(t)
			// Files are back-dated after every change, each time to a later moment an hour
			// ago, so that their stat data are not racy: the cache then answers unchanged files
			// without reading them, which is the path under test.
			stamp := time.Now().Add(-time.Hour)
			backdate := func() {
				stamp = stamp.Add(2 * time.Second)
				backdateRecent(t, a, stamp)
				backdateRecent(t, b, stamp)
			}
			backdate()
			for step := range *diffSteps {
				var desc string
				for tries := 0; desc == "" && tries < 50; tries++ {
					desc = diffEdits[r.IntN(len(diffEdits))](r, a)
				}
				if desc == "" {
					t.Fatalf("step %d: no edit applies", step)
				}
				mirror(t, a, b)
				backdate()
				cmds := []string{"check"}
				if r.IntN(2) == 0 {
					cmds = append(cmds, "calc", "check")
				}
				for _, cmd := range cmds {
					if err := os.RemoveAll(filepath.Join(b, ".git", "cleave")); err != nil {
						t.Fatal(err)
					}
					codeA, outA, _ := cleave(t, "-C", a, cmd)
					codeB, outB, _ := cleave(t, "-C", b, cmd)
					if codeA != codeB || outA != outB {
						t.Fatalf("step %d (%s), cleave %s:\nwith the cache (exit %d):\n%s\nwithout it (exit %d):\n%s",
							step, desc, cmd, codeA, outA, codeB, outB)
					}
					if fa, fb := entryFiles(t, a), entryFiles(t, b); !maps.Equal(fa, fb) {
						t.Fatalf("step %d (%s), cleave %s: files differ with and without the cache", step, desc, cmd)
					}
					backdate()
				}
			}
		})
	}
}

// backdateRecent sets the modification time of every file of dir (outside .git) changed in
// the last minute to when.
func backdateRecent(t *testing.T, dir string, when time.Time) {
	t.Helper()
	recent := time.Now().Add(-time.Minute)
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		if d.IsDir() {
			return nil
		}
		fi, err := d.Info()
		if err != nil {
			return err
		}
		if fi.ModTime().After(recent) {
			return os.Chtimes(p, when, when)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
}

// mirror makes every file of dst outside .git a copy of src's.
func mirror(t *testing.T, src, dst string) {
	t.Helper()
	want := map[string][]byte{}
	walk := func(root string, f func(rel string, p string)) {
		err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if d.IsDir() && d.Name() == ".git" {
				return filepath.SkipDir
			}
			if !d.IsDir() {
				rel, _ := filepath.Rel(root, p)
				f(rel, p)
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
	}
	walk(src, func(rel, p string) {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		want[rel] = b
	})
	walk(dst, func(rel, p string) {
		if _, ok := want[rel]; !ok {
			os.Remove(p)
		}
	})
	for rel, b := range want {
		p := filepath.Join(dst, rel)
		if old, err := os.ReadFile(p); err == nil && bytes.Equal(old, b) {
			continue
		}
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// An edit changes the notebook at dir and says what it did, or returns "" when it found
// nothing to change.
type diffEdit func(r *rand.Rand, dir string) string

var diffEdits = []diffEdit{
	// geometry: a probe position of the mask
	func(r *rand.Rand, dir string) string {
		return replaceOne(r, dir, "masks/*.md", `position: \d+ um`, func(string) string {
			return fmt.Sprintf("position: %d um", 100+50*r.IntN(17))
		})
	},
	// geometry: a device's as-built width
	func(r *rand.Rand, dir string) string {
		return replaceOne(r, dir, "devices/*.md", `(?m)^mask: .*$`, func(m string) string {
			return m + fmt.Sprintf("\nas_built: {width: %d um}", 90+r.IntN(20))
		})
	},
	// data bytes: one R_xx value of a sweep
	func(r *rand.Rand, dir string) string {
		return replaceOne(r, dir, "cooldowns/data/*/*.csv", `(?m)^-?0\.[0-9]+,[0-9.e+-]+,`, func(m string) string {
			f := strings.Split(m, ",")
			v, _ := strconv.ParseFloat(f[1], 64)
			f[1] = strconv.FormatFloat(v*(0.5+r.Float64()), 'g', 8, 64)
			return strings.Join(f, ",")
		})
	},
	// a name removed from a calc block
	func(r *rand.Rand, dir string) string {
		return replaceOne(r, dir, "*/*.md", `(?m)^(n_SdH|n_H|mu|sdh|hall|sq_24|W|rho_xx) = [^\n]*\n`, func(string) string { return "" })
	},
	// a name added at the end of a calc block
	func(r *rand.Rand, dir string) string {
		lines := []string{"n_H = hall.n", "n_SdH = sdh.n", "mu = 1.5e6 cm^2/(V s)", "n_H = 2.9e11 cm^-2", "x = squares(\"2\", \"3\")", "W = geometry.width"}
		return replaceOne(r, dir, "*/*.md", "(?m)^```\\s*$", func(m string) string {
			return lines[r.IntN(len(lines))] + "\n" + m
		})
	},
	// layers: a thickness in a wafer's layer table
	func(r *rand.Rand, dir string) string {
		return replaceOne(r, dir, "wafers/*.md", `\| \d+ nm \|`, func(string) string {
			return fmt.Sprintf("| %d nm |", 5+5*r.IntN(30))
		})
	},
	// lineage: a device cut from another piece
	func(r *rand.Rand, dir string) string {
		ids := idsOf(dir, "pieces")
		return replaceOne(r, dir, "devices/*.md", `(?m)^from: .*$`, func(string) string {
			return "from: " + ids[r.IntN(len(ids))]
		})
	},
	// lineage: a cooldown of another device
	func(r *rand.Rand, dir string) string {
		ids := idsOf(dir, "devices")
		return replaceOne(r, dir, "cooldowns/*.md", `(?m)^devices: .*$`, func(string) string {
			return "devices: [" + ids[r.IntN(len(ids))] + "]"
		})
	},
	// illumination toggled
	func(r *rand.Rand, dir string) string {
		return replaceOne(r, dir, "cooldowns/*.md", `(?m)^illumination: .*$`, func(m string) string {
			if strings.Contains(m, "none") {
				return "illumination: red LED, 2 s"
			}
			return "illumination: none"
		})
	},
	// a front-matter field nothing computes from
	func(r *rand.Rand, dir string) string {
		return replaceOne(r, dir, "*/*.md", `(?m)^by: .*$`, func(string) string {
			return "by: " + []string{"AK", "JM", "RS", "TT"}[r.IntN(4)]
		})
	},
	// a cooldown added (a copy under a new id)
	func(r *rand.Rand, dir string) string {
		src := pick(r, dir, "cooldowns/*.md")
		if src == "" {
			return ""
		}
		b, _ := os.ReadFile(filepath.Join(dir, src))
		id := fmt.Sprintf("CDX-%03d", r.IntN(1000))
		nb := regexp.MustCompile(`(?m)^id: .*$`).ReplaceAll(b, []byte("id: "+id))
		dst := "cooldowns/" + id + ".md"
		if err := os.WriteFile(filepath.Join(dir, dst), nb, 0o644); err != nil {
			return ""
		}
		return "added " + dst + " as a copy of " + src
	},
	// a cooldown removed
	func(r *rand.Rand, dir string) string {
		src := pick(r, dir, "cooldowns/*.md")
		if src == "" || os.Remove(filepath.Join(dir, src)) != nil {
			return ""
		}
		return "removed " + src
	},
	// a cooldown renamed (file and id)
	func(r *rand.Rand, dir string) string {
		src := pick(r, dir, "cooldowns/*.md")
		if src == "" {
			return ""
		}
		b, _ := os.ReadFile(filepath.Join(dir, src))
		id := fmt.Sprintf("CDR-%03d", r.IntN(1000))
		nb := regexp.MustCompile(`(?m)^id: .*$`).ReplaceAll(b, []byte("id: "+id))
		dst := "cooldowns/" + id + ".md"
		if os.WriteFile(filepath.Join(dir, dst), nb, 0o644) != nil || os.Remove(filepath.Join(dir, src)) != nil {
			return ""
		}
		return "renamed " + src + " to " + dst
	},
	// a data file removed
	func(r *rand.Rand, dir string) string {
		src := pick(r, dir, "cooldowns/data/*/*.csv")
		if src == "" || r.IntN(3) != 0 || os.Remove(filepath.Join(dir, src)) != nil {
			return ""
		}
		return "removed " + src
	},
}

// pick returns a random file matching the slash glob under dir ("" when none).
func pick(r *rand.Rand, dir, glob string) string {
	ms, _ := filepath.Glob(filepath.Join(dir, filepath.FromSlash(glob)))
	sort.Strings(ms)
	if len(ms) == 0 {
		return ""
	}
	rel, _ := filepath.Rel(dir, ms[r.IntN(len(ms))])
	return filepath.ToSlash(rel)
}

// replaceOne replaces one random match of re in one random file matching glob.
func replaceOne(r *rand.Rand, dir, glob, re string, repl func(string) string) string {
	f := pick(r, dir, glob)
	if f == "" {
		return ""
	}
	p := filepath.Join(dir, filepath.FromSlash(f))
	b, err := os.ReadFile(p)
	if err != nil {
		return ""
	}
	locs := regexp.MustCompile(re).FindAllIndex(b, -1)
	if len(locs) == 0 {
		return ""
	}
	l := locs[r.IntN(len(locs))]
	old := string(b[l[0]:l[1]])
	nw := repl(old)
	if nw == old {
		return ""
	}
	out := append(append(append([]byte(nil), b[:l[0]]...), nw...), b[l[1]:]...)
	if err := os.WriteFile(p, out, 0o644); err != nil {
		return ""
	}
	return fmt.Sprintf("%s: %q → %q", f, trim(old), trim(nw))
}

func trim(s string) string {
	if len(s) > 60 {
		return s[:60] + "…"
	}
	return s
}

// idsOf lists the ids of the entries in a folder of dir.
func idsOf(dir, folder string) []string {
	ms, _ := filepath.Glob(filepath.Join(dir, folder, "*.md"))
	sort.Strings(ms)
	var ids []string
	for _, m := range ms {
		ids = append(ids, strings.TrimSuffix(filepath.Base(m), ".md"))
	}
	if len(ids) == 0 {
		ids = []string{"none"}
	}
	return ids
}
