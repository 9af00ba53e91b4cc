// Package hooks holds everything that touches git: finding the repository and the folders git
// keeps for it, making a notebook (`cleave init`) and committing the demo's story, and the git
// side of the notebook's life:
//
//   - the staged content and any commit as an fs.FS the engine evaluates like a folder
//     (`cleave check --staged`, `cleave check --rev`);
//   - the pre-commit hook that recomputes stale results in the index and, where that is safe,
//     in the work tree; installing and uninstalling it; the merge driver for calc blocks;
//   - the history of a sample and the review of a range of commits.
//
// The rule it keeps: go-git reads (commits, trees, blobs; through a pack reader of our own on
// long walks), the git binary writes. Every write of a user's index goes through
// `git hash-object` and `git update-index`, which honour GIT_INDEX_FILE and git's own lock;
// go-git ignores GIT_INDEX_FILE and drops index extensions, so it writes only in repositories
// this package has just created itself (the demo notebook). Nothing here stashes, checks out,
// resets or runs a plain `git add` in a user's work tree.
package hooks
