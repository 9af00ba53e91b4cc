// Package hooks holds everything of cleave that touches git: creating a notebook repository,
// committing the demo notebook's story, and (later) the pre-commit hook, the merge driver,
// sample history and review reports.
//
// Reading history uses go-git; anything that writes the index of a user's repository goes
// through the git binary (go-git ignores GIT_INDEX_FILE and drops index extensions).
// The only index writes here are in repositories this package has just created itself
// (`cleave init` on a new folder, `cleave demo`), where go-git is safe.
package hooks
