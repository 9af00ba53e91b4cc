package calc

import (
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// TestSourceKeys: every citation [src:KEY] in the repository's Go and Markdown files names an
// entry of calc/SOURCES.md (a source in bold, or a worked value W1, W2, ... in its table), and
// no entry is defined twice.
func TestSourceKeys(t *testing.T) {
	b, err := os.ReadFile("SOURCES.md")
	if err != nil {
		t.Fatal(err)
	}
	defined := map[string]int{"KEY": 1} // the placeholder the docs use to show the form
	for _, m := range regexp.MustCompile(`\*\*\[src:([A-Za-z0-9-]+)\]\*\*`).FindAllStringSubmatch(string(b), -1) {
		defined[m[1]]++
	}
	for _, m := range regexp.MustCompile(`(?m)^\| (W[0-9]+) \|`).FindAllStringSubmatch(string(b), -1) {
		defined[m[1]]++
	}
	for k, n := range defined {
		if n > 1 {
			t.Errorf("SOURCES.md defines %s %d times", k, n)
		}
	}
	if len(defined) < 40 {
		t.Fatalf("SOURCES.md defines only %d keys; is its format still `**[src:KEY]**` and `| W1 |`?", len(defined))
	}
	cite := regexp.MustCompile(`\[src:([A-Za-z0-9-]+)\]`)
	used := 0
	err = filepath.WalkDir("..", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && (d.Name() == ".git" || d.Name() == "fuzz") {
			return filepath.SkipDir
		}
		if d.IsDir() || !(strings.HasSuffix(p, ".go") || strings.HasSuffix(p, ".md")) {
			return nil
		}
		src, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		for _, m := range cite.FindAllStringSubmatch(string(src), -1) {
			used++
			if defined[m[1]] == 0 {
				t.Errorf("%s cites [src:%s], which calc/SOURCES.md does not define", p, m[1])
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if used == 0 {
		t.Error("no citation found: is the walk looking at the repository?")
	}
}
