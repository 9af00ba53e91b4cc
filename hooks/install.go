package hooks

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"cleave/notebook/calcblock"
)

// What `cleave hooks install` sets up, and how `cleave hooks uninstall` takes it away again:
//
//   - a pre-commit and a pre-merge-commit hook in the folder git runs hooks from
//     (`git rev-parse --git-path hooks`: core.hooksPath when set, the common git directory
//     for linked work trees). A hook file that is already there and is not ours is renamed
//     to NAME.before-cleave and run first by ours, with the same arguments; uninstall renames
//     it back.
//   - the merge driver: merge.cleave.name and merge.cleave.driver in the repository's
//     configuration, and the line `*.md merge=cleave` in the work tree's .gitattributes
//     (which a person commits, so every clone asks for the driver; a clone without the
//     configuration merges as usual).
//
// What was there before (a configuration value of ours that is replaced, whether
// .gitattributes existed) is recorded in the common git directory, so uninstall restores it.

// HookNames are the hooks install writes.
var HookNames = []string{"pre-commit", "pre-merge-commit"}

// hookMarker is the line that identifies a hook file as ours.
const hookMarker = "# cleave-hook: written by `cleave hooks install`; `cleave hooks uninstall` puts back what was here"

// chainedSuffix names the hook that was in place before ours.
const chainedSuffix = ".before-cleave"

const (
	driverName       = "cleave"
	attributesLine   = "*.md merge=" + driverName
	attributesNote   = "# cleave: three-way merge of calc blocks, results recomputed (cleave hooks install)"
	installStateFile = "installed.json"
)

// installState records what install changed, for uninstall.
type installState struct {
	// Config holds the values of merge.cleave.* that were set before install ("" for unset).
	Config map[string]string `json:"config"`
	// AttributesCreated is set when install created .gitattributes.
	AttributesCreated bool `json:"attributes_created"`
	// AttributesAdded is the exact text install appended to .gitattributes.
	AttributesAdded string `json:"attributes_added"`
}

// Install sets up the hooks and the merge driver for the repository around dir. bin is the
// path of the cleave program to fall back on when `cleave` is not on the PATH at the time a
// hook runs ("" for none). It returns one line per thing it did. Running it again updates
// what it wrote and changes nothing else.
func Install(dir, bin string) ([]string, error) {
	repo, err := Locate(dir)
	if err != nil {
		return nil, err
	}
	var done []string
	if !within(repo.Hooks, repo.CommonDir) && !within(repo.Hooks, repo.Top) {
		done = append(done, "note: core.hooksPath points at "+repo.Hooks+", outside this repository: the hook will run in every repository that uses that folder (it finds nothing to do where there is no notebook)")
	}
	if err := os.MkdirAll(repo.Hooks, 0o755); err != nil {
		return nil, err
	}
	for _, name := range HookNames {
		p := filepath.Join(repo.Hooks, name)
		old, err := os.ReadFile(p)
		switch {
		case err == nil && !isOurs(old):
			if _, err := os.Lstat(p + chainedSuffix); err == nil {
				return done, fmt.Errorf("%s is not ours and %s exists too: move one of them away first", p, p+chainedSuffix)
			}
			if err := os.Rename(p, p+chainedSuffix); err != nil {
				return done, err
			}
			done = append(done, fmt.Sprintf("kept the existing %s hook as %s; ours runs it first", name, filepath.Base(p+chainedSuffix)))
		case err != nil && !errors.Is(err, fs.ErrNotExist):
			return done, err
		}
		if err := writeExecutable(p, hookScript(name, bin)); err != nil {
			return done, err
		}
		done = append(done, "installed the "+name+" hook in "+repo.Hooks)
	}

	st := readInstallState(repo)
	if st.Config == nil {
		st.Config = map[string]string{}
		for _, k := range []string{"name", "driver"} {
			key := "merge." + driverName + "." + k
			v, _ := repo.git().line("config", "--get", key)
			st.Config[key] = v
		}
	}
	for key, val := range map[string]string{
		"merge." + driverName + ".name":   "cleave: three-way merge of calc blocks, conflicts in results recomputed",
		"merge." + driverName + ".driver": driverCommand(bin),
	} {
		if _, err := repo.git().run(nil, "config", key, val); err != nil {
			return done, err
		}
	}
	done = append(done, "registered the merge driver "+driverName+" in the repository configuration")

	attr := filepath.Join(repo.Top, ".gitattributes")
	cur, err := os.ReadFile(attr)
	exists := err == nil
	if err != nil && !errors.Is(err, fs.ErrNotExist) {
		return done, err
	}
	if !hasLine(cur, attributesLine) {
		add := attributesNote + "\n" + attributesLine + "\n"
		if len(cur) > 0 && !bytes.HasSuffix(cur, []byte("\n")) {
			add = "\n" + add
		}
		if exists {
			err = calcblock.WriteAtomic(attr, append(append([]byte(nil), cur...), add...), cur)
		} else {
			err = calcblock.WriteAtomic(attr, []byte(add), nil)
		}
		if err != nil {
			return done, err
		}
		st.AttributesCreated, st.AttributesAdded = !exists, add
		done = append(done, "added `"+attributesLine+"` to .gitattributes (commit it, so every clone uses the driver)")
	}
	return done, writeInstallState(repo, st)
}

// Uninstall removes what Install set up and puts back what was there before.
func Uninstall(dir string) ([]string, error) {
	repo, err := Locate(dir)
	if err != nil {
		return nil, err
	}
	var done []string
	for _, name := range HookNames {
		p := filepath.Join(repo.Hooks, name)
		cur, err := os.ReadFile(p)
		switch {
		case err == nil && isOurs(cur):
			if err := os.Remove(p); err != nil {
				return done, err
			}
			done = append(done, "removed the "+name+" hook")
		case err == nil:
			done = append(done, "left "+p+" alone: it is not ours")
			continue
		case !errors.Is(err, fs.ErrNotExist):
			return done, err
		}
		if _, err := os.Lstat(p + chainedSuffix); err == nil {
			if err := os.Rename(p+chainedSuffix, p); err != nil {
				return done, err
			}
			done = append(done, "put back the "+name+" hook that was there before")
		}
	}

	st := readInstallState(repo)
	if _, err := repo.git().run(nil, "config", "--remove-section", "merge."+driverName); err == nil {
		done = append(done, "removed the merge driver from the repository configuration")
	}
	for key, val := range st.Config {
		if val != "" {
			if _, err := repo.git().run(nil, "config", key, val); err != nil {
				return done, err
			}
		}
	}

	attr := filepath.Join(repo.Top, ".gitattributes")
	if cur, err := os.ReadFile(attr); err == nil {
		restored, ok := removeAttributes(cur, st.AttributesAdded)
		switch {
		case ok && len(restored) == 0 && st.AttributesCreated:
			if err := os.Remove(attr); err != nil {
				return done, err
			}
			done = append(done, "removed .gitattributes (install had created it)")
		case ok:
			if err := calcblock.WriteAtomic(attr, restored, cur); err != nil {
				return done, err
			}
			done = append(done, "removed `"+attributesLine+"` from .gitattributes")
		}
	}
	if err := os.Remove(filepath.Join(repo.CommonDir, "cleave", installStateFile)); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return done, err
	}
	return done, nil
}

// removeAttributes takes out of .gitattributes what install added: the exact text when the
// file still ends with it, else our two lines wherever they are.
func removeAttributes(cur []byte, added string) ([]byte, bool) {
	if added != "" && bytes.HasSuffix(cur, []byte(added)) {
		return cur[:len(cur)-len(added)], true
	}
	var out []byte
	found := false
	for _, l := range bytes.SplitAfter(cur, []byte("\n")) {
		t := strings.TrimRight(string(l), "\r\n")
		if t == attributesLine || t == attributesNote {
			found = true
			continue
		}
		out = append(out, l...)
	}
	return out, found
}

func hasLine(b []byte, line string) bool {
	for _, l := range strings.Split(string(b), "\n") {
		if strings.TrimSpace(l) == line {
			return true
		}
	}
	return false
}

// within reports whether p is dir or inside it.
func within(p, dir string) bool {
	rel, err := filepath.Rel(dir, p)
	return err == nil && (rel == "." || filepath.IsLocal(rel))
}

func isOurs(script []byte) bool { return bytes.Contains(script, []byte(hookMarker)) }

// shellQuote quotes s for a POSIX shell.
func shellQuote(s string) string { return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'" }

// hookScript is the hook file: run the hook that was there before (if any), then cleave, found
// on the PATH or at bin. It is a POSIX shell script with LF line endings, which git for
// Windows runs with its own shell too.
func hookScript(name, bin string) []byte {
	var b strings.Builder
	b.WriteString("#!/bin/sh\n" + hookMarker + "\n")
	fmt.Fprintf(&b, `before="$(dirname "$0")/%s%s"
if [ -x "$before" ]; then
	"$before" "$@" || exit $?
fi
`, name, chainedSuffix)
	fmt.Fprintf(&b, "if command -v cleave >/dev/null 2>&1; then\n\texec cleave hooks %s\n", name)
	if bin != "" {
		fmt.Fprintf(&b, "elif [ -x %s ]; then\n\texec %s hooks %s\n", shellQuote(bin), shellQuote(bin), name)
	}
	b.WriteString("fi\necho \"cleave " + name + " hook: the cleave program is not on the PATH; install it (go install) or commit with --no-verify\" >&2\nexit 1\n")
	return []byte(b.String())
}

// driverCommand is the merge driver's command line (git runs it with sh, %O %A %B %L %P
// replaced). When cleave cannot be found it falls back to git's own three-way merge of the
// file, so a conflict is never lost to a missing program.
func driverCommand(bin string) string {
	args := " hooks merge %O %A %B %L %P"
	cmd := "if command -v cleave >/dev/null 2>&1; then cleave" + args + ";"
	if bin != "" {
		cmd += " elif [ -x " + shellQuote(bin) + " ]; then " + shellQuote(bin) + args + ";"
	}
	return cmd + " else git merge-file --marker-size=%L %A %O %B; fi"
}

// writeExecutable writes a script atomically with mode 0755.
func writeExecutable(p string, data []byte) error {
	f, err := os.CreateTemp(filepath.Dir(p), "."+filepath.Base(p)+".tmp-*")
	if err != nil {
		return err
	}
	_, werr := f.Write(data)
	if err := errors.Join(werr, f.Chmod(0o755), f.Sync(), f.Close()); err != nil {
		os.Remove(f.Name())
		return err
	}
	if err := os.Rename(f.Name(), p); err != nil {
		os.Remove(f.Name())
		return err
	}
	return nil
}

func readInstallState(repo *Repo) installState {
	var st installState
	b, err := os.ReadFile(filepath.Join(repo.CommonDir, "cleave", installStateFile))
	if err == nil {
		_ = json.Unmarshal(b, &st) // a damaged record only loses what uninstall would restore
	}
	return st
}

func writeInstallState(repo *Repo, st installState) error {
	dir := filepath.Join(repo.CommonDir, "cleave")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	b, err := json.MarshalIndent(st, "", "  ")
	if err != nil {
		return err
	}
	return calcblock.ReplaceFile(filepath.Join(dir, installStateFile), append(b, '\n'))
}
