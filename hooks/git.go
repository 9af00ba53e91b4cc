package hooks

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
)

// ErrNoGit is returned when the git binary cannot be found on the PATH.
var ErrNoGit = errors.New("the git binary is not on the PATH (cleave needs it for the index, hooks and merges)")

// GitError is a git command that failed: its arguments, what it printed on stderr, and how it
// ended.
type GitError struct {
	Args   []string
	Stderr string
	Err    error
}

func (e *GitError) Error() string {
	msg := strings.TrimSpace(e.Stderr)
	if msg == "" {
		msg = e.Err.Error()
	}
	return fmt.Sprintf("git %s: %s", strings.Join(e.Args, " "), msg)
}

func (e *GitError) Unwrap() error { return e.Err }

// gitCmd runs the git binary in one directory. It keeps the environment of the process: inside
// a hook, git has set GIT_DIR, GIT_INDEX_FILE and friends, and our git calls on the same
// repository must see the same index.
type gitCmd struct {
	dir string
	env []string // added to the process environment
}

// run runs git with args, feeding stdin, and returns what it printed on stdout.
func (g gitCmd) run(stdin []byte, args ...string) ([]byte, error) {
	cmd := g.command(args...)
	if stdin != nil {
		cmd.Stdin = bytes.NewReader(stdin)
	}
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		if errors.Is(err, exec.ErrNotFound) {
			return nil, ErrNoGit
		}
		return out.Bytes(), &GitError{Args: args, Stderr: errb.String(), Err: err}
	}
	return out.Bytes(), nil
}

// line runs git and returns its output without the trailing newline.
func (g gitCmd) line(args ...string) (string, error) {
	out, err := g.run(nil, args...)
	return strings.TrimRight(string(out), "\r\n"), err
}

func (g gitCmd) command(args ...string) *exec.Cmd {
	cmd := exec.Command("git", args...)
	cmd.Dir = g.dir
	if len(g.env) > 0 {
		cmd.Env = append(os.Environ(), g.env...)
	}
	return cmd
}

// exitCode is the exit status of a failed git command, or -1.
func exitCode(err error) int {
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		return ee.ExitCode()
	}
	return -1
}

// Repo is where git keeps the parts of the repository around one work tree, as the git binary
// reports them (so core.hooksPath, linked work trees and GIT_INDEX_FILE are all honoured).
// Every path is absolute.
type Repo struct {
	Top       string // the top folder of the work tree
	GitDir    string // the work tree's git directory (.git, or .git/worktrees/NAME)
	CommonDir string // the directory shared by all work trees (objects, refs, config, hooks)
	Index     string // the index file git uses now: $GIT_INDEX_FILE when set
	Hooks     string // the hooks folder (core.hooksPath when set)
}

// Locate asks git where the repository around dir keeps its parts.
func Locate(dir string) (*Repo, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil, err
	}
	g := gitCmd{dir: abs}
	out, err := g.run(nil, "rev-parse", "--show-toplevel", "--absolute-git-dir", "--git-common-dir",
		"--git-path", "index", "--git-path", "hooks")
	if err != nil {
		var ge *GitError
		if errors.As(err, &ge) {
			return nil, fmt.Errorf("%s is not inside a git work tree: %s", abs, strings.TrimSpace(ge.Stderr))
		}
		return nil, err
	}
	lines := strings.Split(strings.TrimRight(string(out), "\n"), "\n")
	if len(lines) != 5 || lines[0] == "" {
		return nil, fmt.Errorf("%s: not inside a git work tree (git rev-parse printed %q)", abs, out)
	}
	resolve := func(p string) string {
		if filepath.IsAbs(p) {
			return filepath.Clean(p)
		}
		return filepath.Join(abs, p)
	}
	return &Repo{
		Top:       filepath.Clean(lines[0]),
		GitDir:    resolve(lines[1]),
		CommonDir: resolve(lines[2]),
		Index:     resolve(lines[3]),
		Hooks:     resolve(lines[4]),
	}, nil
}

func (r *Repo) git() gitCmd { return gitCmd{dir: r.Top} }

// StateDir is the folder where cleave keeps its own files for this work tree (the calc cache,
// the lock of the pre-commit hook): under the work tree's git directory, never committed.
func (r *Repo) StateDir() string { return filepath.Join(r.GitDir, "cleave") }

// TempIndex reports whether git is running a hook on a temporary index: `git commit PATH...`
// builds one from HEAD and the named paths (next-index-PID.lock), and what a hook writes there
// never reaches the real index.
func (r *Repo) TempIndex() bool {
	return strings.HasPrefix(filepath.Base(r.Index), "next-index-")
}

// Operation names the operation in progress in the work tree (a merge, a rebase, a
// cherry-pick, a revert), or "" when there is none.
func (r *Repo) Operation() string {
	for _, op := range []struct{ path, name string }{
		{"rebase-merge", "rebase"}, {"rebase-apply", "rebase"},
		{"MERGE_HEAD", "merge"}, {"CHERRY_PICK_HEAD", "cherry-pick"}, {"REVERT_HEAD", "revert"},
	} {
		if _, err := os.Stat(filepath.Join(r.GitDir, op.path)); err == nil {
			return op.name
		}
	}
	return ""
}

// Rel turns command-line paths (absolute, or relative to the working directory) into slash
// paths relative to the top of the work tree, refusing a path outside it. The paths need not
// exist on disk (a file may be staged or committed and deleted since).
func (r *Repo) Rel(paths []string) ([]string, error) {
	var out []string
	for _, p := range paths {
		abs, err := filepath.Abs(p)
		if err != nil {
			return nil, err
		}
		// git reports the top with links resolved; resolve the path the same way, as far as
		// it exists.
		resolved := abs
		for dir, rest := abs, ""; ; {
			if real, err := filepath.EvalSymlinks(dir); err == nil {
				resolved = filepath.Join(real, rest)
				break
			}
			up := filepath.Dir(dir)
			if up == dir {
				break
			}
			rest = filepath.Join(filepath.Base(dir), rest)
			dir = up
		}
		rel, err := filepath.Rel(r.Top, resolved)
		if err != nil || !filepath.IsLocal(rel) && rel != "." {
			return nil, fmt.Errorf("%s: outside the work tree at %s", p, r.Top)
		}
		out = append(out, filepath.ToSlash(rel))
	}
	return out, nil
}
