package hooks_test

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"cleave/hooks"
)

// A new notebook: a git repository, the conventional folders and a README. A second call
// finds everything in place and creates nothing.
func ExampleInitNotebook() {
	dir, err := os.MkdirTemp("", "cleave-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	nb := filepath.Join(dir, "lab")

	created, err := hooks.InitNotebook(nb, []byte("# Lab notebook\n"))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(strings.Join(created, " "))
	again, err := hooks.InitNotebook(nb, []byte("# Lab notebook\n"))
	fmt.Println(len(again), err)
	// Output:
	// .git/ wafers/ pieces/ masks/ processes/ devices/ cooldowns/ data/ templates/ .gitignore README.md
	// 0 <nil>
}

// Committing the work tree of a repository InitNotebook created, with an invented author.
func ExampleCommitAll() {
	dir, err := os.MkdirTemp("", "cleave-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	if _, err := hooks.InitNotebook(dir, []byte("# Lab notebook\n")); err != nil {
		fmt.Println(err)
		return
	}
	when := time.Date(2024, 3, 15, 9, 0, 0, 0, time.UTC)
	hash, err := hooks.CommitAll(dir, "empty notebook", hooks.Author{Name: "A. K.", Email: "ak@lab.invalid", When: when})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(len(hash))
	// Output:
	// 40
}
