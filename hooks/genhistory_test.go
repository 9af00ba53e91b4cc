package hooks

import (
	"bufio"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"testing"
)

// genHistory writes a `git fast-import` stream: 2,000 entries (400 wafers, 800 pieces, 400
// devices, 400 cooldowns) created in a first commit, then commits-1 commits each changing one
// entry's heading or appending a note, one hour apart. Seeded, so a call always writes the same
// history. (The scale generator of the project's benchmarks, written in Go.)
func genHistory(w io.Writer, commits int) error {
	out := bufio.NewWriterSize(w, 1<<20)
	r := rand.New(rand.NewPCG(5, 5))
	files := map[string]string{}
	for i := range 400 {
		wid := fmt.Sprintf("W%04d", i)
		files["wafers/"+wid+".md"] = fmt.Sprintf("---\nid: %s\nkind: wafer\ndesign_density: 2.%de11 cm^-2\n---\n# %s\n", wid, i%9, wid)
		for _, p := range "AB" {
			files[fmt.Sprintf("pieces/%s-%c.md", wid, p)] = fmt.Sprintf("---\nid: %s-%c\nkind: piece\nfrom: %s\n---\n# piece\n", wid, p, wid)
		}
		files["devices/"+wid+"-A-HB1.md"] = fmt.Sprintf("---\nid: %s-A-HB1\nkind: device\nfrom: %s-A\n---\n# device\n", wid, wid)
		files[fmt.Sprintf("cooldowns/CD%04d.md", i)] = fmt.Sprintf("---\nid: CD%04d\nkind: cooldown\ndevices: [%s-A-HB1]\n---\n# cooldown\n\n"+
			"```cleave\nn = wafer.design_density\nlB = magnetic_length(1 T)\n```\n", i, wid)
	}
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	t := int64(1700000000)
	blob := func(text string) {
		fmt.Fprintf(out, "data %d\n%s\n", len(text), text)
	}
	commit := func(msg string, changed []string) {
		t += 3600
		fmt.Fprintf(out, "commit refs/heads/main\ncommitter Lab <lab@example.invalid> %d +0000\n", t)
		blob(msg)
		for _, p := range changed {
			fmt.Fprintf(out, "M 100644 inline %s\n", p)
			blob(files[p])
		}
	}
	commit("initial notebook", names)
	for i := 1; i < commits; i++ {
		p := names[r.IntN(len(names))]
		if r.Float64() < 0.7 {
			files[p] = strings.Replace(files[p], "# ", fmt.Sprintf("# rev %d ", i), 1)
		} else {
			files[p] += fmt.Sprintf("\nnote %d\n", i)
		}
		commit("edit "+p, []string{p})
	}
	out.WriteString("done\n")
	return out.Flush()
}

// historyRepos holds the generated repositories, one per number of commits, made once per test
// binary and removed by TestMain.
var historyRepos struct {
	sync.Mutex
	dirs map[int]string
	root string
}

// generatedRepo returns a repository with the generated history of the given number of
// commits on main (HEAD), made with `git fast-import`.
func generatedRepo(tb testing.TB, commits int) string {
	tb.Helper()
	needGit(tb)
	historyRepos.Lock()
	defer historyRepos.Unlock()
	if d, ok := historyRepos.dirs[commits]; ok {
		return d
	}
	if historyRepos.dirs == nil {
		root, err := os.MkdirTemp("", "cleave-history-")
		if err != nil {
			tb.Fatal(err)
		}
		historyRepos.root, historyRepos.dirs = root, map[int]string{}
	}
	dir := filepath.Join(historyRepos.root, fmt.Sprint(commits))
	gitT(tb, "", "init", "-q", "-b", "main", dir)
	cmd := exec.Command("git", "fast-import", "--quiet", "--done")
	cmd.Dir = dir
	in, err := cmd.StdinPipe()
	if err != nil {
		tb.Fatal(err)
	}
	cmd.Stderr = os.Stderr
	if err := cmd.Start(); err != nil {
		tb.Fatal(err)
	}
	werr := genHistory(in, commits)
	in.Close()
	if err := cmd.Wait(); err != nil || werr != nil {
		tb.Fatalf("git fast-import: %v %v", err, werr)
	}
	gitT(tb, dir, "checkout", "-q", "-f", "main")
	historyRepos.dirs[commits] = dir
	return dir
}
