package demo

import (
	"embed"
	"io/fs"
)

// The demo notebook's entries (an invented lab and invented samples); Run adds the synthetic
// data files and the git history.
//
//go:embed scenario
var scenarioFS embed.FS

// Scenario is the demo notebook's entries as a file system.
func Scenario() fs.FS {
	sub, err := fs.Sub(scenarioFS, "scenario")
	if err != nil {
		panic(err) // the embed pattern above guarantees the folder
	}
	return sub
}
