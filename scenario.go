package main

import (
	"embed"
	"io/fs"
)

// The demo notebook's entries (an invented lab and invented samples); `cleave demo` adds the
// synthetic data files and the git history.
//
//go:embed testdata/demo
var demoFS embed.FS

func demoScenario() fs.FS {
	sub, err := fs.Sub(demoFS, "testdata/demo")
	if err != nil {
		panic(err) // the embed pattern above guarantees the folder
	}
	return sub
}
