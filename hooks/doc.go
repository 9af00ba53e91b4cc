// Package hooks holds everything that touches git: finding the repository and its git
// directory (and the folder under it where cleave keeps its own state), making a notebook
// (`cleave init`: a repository when the folder is not inside one, the conventional folders, a
// README) and committing (the demo notebook's story).
//
// go-git writes only in repositories this package has just created itself (the demo notebook),
// where it is safe; `cleave init` inside an existing repository writes files but never touches
// its index. Code that has to write the index of a user's repository goes through the git
// binary instead: go-git ignores GIT_INDEX_FILE and drops index extensions.
package hooks
