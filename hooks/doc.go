// Package hooks holds the parts of cleave that create or write git repositories: making a
// notebook (`cleave init`: a repository when the folder is not inside one, the conventional
// folders, a README) and committing the demo notebook's story (`cleave demo`).
//
// Both use go-git. The index is written only in repositories this package has just created
// itself (the demo notebook), where go-git is safe; `cleave init` inside an existing repository
// writes files but never touches its index. Code that has to write the index of a user's
// repository must go through the git binary instead: go-git ignores GIT_INDEX_FILE and drops
// index extensions.
package hooks
