package hooks

import (
	"fmt"
	"time"

	"github.com/go-git/go-git/v5"
	"github.com/go-git/go-git/v5/plumbing/object"
)

// Author is a commit author in a repository this package created.
type Author struct {
	Name, Email string
	When        time.Time
}

// CommitAll stages every change in the work tree of the repository at dir and commits it.
// It is meant for repositories this package has just created (the demo notebook): it writes
// the index with go-git, which would drop index extensions of a user's repository.
func CommitAll(dir, message string, a Author) (string, error) {
	repo, err := git.PlainOpen(dir)
	if err != nil {
		return "", fmt.Errorf("commit: %w", err)
	}
	wt, err := repo.Worktree()
	if err != nil {
		return "", fmt.Errorf("commit: %w", err)
	}
	if err := wt.AddWithOptions(&git.AddOptions{All: true}); err != nil {
		return "", fmt.Errorf("commit: staging: %w", err)
	}
	sig := &object.Signature{Name: a.Name, Email: a.Email, When: a.When}
	h, err := wt.Commit(message, &git.CommitOptions{Author: sig, Committer: sig, AllowEmptyCommits: false})
	if err != nil {
		return "", fmt.Errorf("commit %q: %w", message, err)
	}
	return h.String(), nil
}
