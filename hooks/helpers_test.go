package hooks

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

func TestMain(m *testing.M) {
	// The tests' git commands read no configuration of the machine or the user.
	os.Setenv("GIT_CONFIG_NOSYSTEM", "1")
	os.Setenv("GIT_CONFIG_GLOBAL", os.DevNull)
	code := m.Run()
	if historyRepos.root != "" {
		os.RemoveAll(historyRepos.root)
	}
	os.Exit(code)
}

// needGit skips a test when the git binary is missing.
func needGit(t testing.TB) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not on PATH")
	}
}

// gitT runs git in dir and returns its output; a failure ends the test.
func gitT(t testing.TB, dir string, args ...string) string {
	t.Helper()
	cmd := exec.Command("git", args...)
	if dir != "" {
		cmd.Dir = dir
	}
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("git %s: %v\n%s", strings.Join(args, " "), err, out)
	}
	return string(out)
}

// writeFiles writes files (slash paths relative to dir) with their contents.
func writeFiles(t testing.TB, dir string, files map[string]string) {
	t.Helper()
	for p, body := range files {
		full := filepath.Join(dir, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(full, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func readFile(t testing.TB, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// newRepo makes a git repository in a new folder with an invented author, holding files in
// one first commit.
func newRepo(t testing.TB, files map[string]string) string {
	t.Helper()
	needGit(t)
	dir := t.TempDir()
	gitT(t, dir, "init", "-q", "-b", "main")
	gitT(t, dir, "config", "user.name", "T. S.")
	gitT(t, dir, "config", "user.email", "ts@lab.invalid")
	writeFiles(t, dir, files)
	gitT(t, dir, "add", "-A")
	gitT(t, dir, "commit", "-q", "--no-verify", "-m", "first")
	return dir
}

// smallNotebook is a notebook whose blocks evaluate quickly: a mask, a wafer, a piece, a
// device and a cooldown, with results already up to date.
var smallNotebook = map[string]string{
	"masks/M1.md": `---
id: M1
kind: mask
width: 100 um
length: 1000 um
probes:
  - {name: "2", position: 250 um, arm_width: 10 um, side: top}
  - {name: "4", position: 750 um, arm_width: 10 um, side: top}
---
# M1

` + "```cleave" + `
W = mask.width  #~ 100.00 um
sq = squares("2", "4")  #~ 5.0000
` + "```" + `
`,
	"wafers/W1.md":   "---\nid: W1\nkind: wafer\nchannel: GaAs\ndesign_density: 3.0e11 cm^-2\n---\n# W1\n",
	"pieces/W1-A.md": "---\nid: W1-A\nkind: piece\nfrom: W1\n---\n# piece\n",
	"devices/D1.md": `---
id: D1
kind: device
from: W1-A
mask: M1
---
# D1

` + "```cleave" + `
sq = squares("2", "4")  #~ 5.0000
` + "```" + `
`,
	"cooldowns/C1.md": `---
id: C1
kind: cooldown
devices: [D1]
base_temperature: 0.30 K
---
# C1

Notes before the block.

` + "```cleave" + `
R = 50 Ohm  #~ 50.000 Ohm
rho = sheet_resistance(R, squares("2", "4"))  #~ 10.000 Ohm
n = 3e11 cm^-2  #~ 3.0000e11 cm^-2
mu = mobility(rho, n)  #~ 2.0805e6 cm^2/(V s)
` + "```" + `

Notes after the block.
`,
}
