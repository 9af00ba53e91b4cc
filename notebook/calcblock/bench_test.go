package calcblock

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"cleave/notebook/mdsrc"
)

// benchNotebook generates n entries, each with front matter, prose and one
// calc block of five code lines.
func benchNotebook(n int) [][]byte {
	files := make([][]byte, n)
	for i := range files {
		files[i] = fmt.Appendf(nil, "---\nid: D-%05d\nkind: device\nwidth: %d um\n---\n# Device D-%05d\n\n"+
			"Hall bar on piece W0311-C%d, measured by AK at 1.6 K.\n\n"+
			"```cleave\nw = @width\nl = %d\nsq = l + w\nr = sq + 7\nt = r + sq + w\n```\n\nNotes.\n",
			i, 10+i%50, i, i%9, 100+i%13)
	}
	return files
}

func BenchmarkRecomputeNotebook(b *testing.B) {
	files := benchNotebook(10000)
	fields := map[string]string{"width": "20 um"}
	for b.Loop() {
		for i, raw := range files {
			if _, err := Recompute(fmt.Sprint("e", i, ".md"), raw, newSumEval(fields).ev()); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// BenchmarkFind finds the calc blocks of the demo's first cooldown (front
// matter, prose, five blocks), parsing the file each time as a run does:
// Find takes the fast path on it; goldmark is the parse it replaces.
func BenchmarkFind(b *testing.B) {
	raw, err := os.ReadFile(filepath.Join("..", "..", "demo", "scenario", "cooldowns", "CD24-001.md"))
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		find func(*mdsrc.Source) ([]Block, error)
	}{{"Find", Find}, {"goldmark", findGoldmark}} {
		b.Run(c.name, func(b *testing.B) {
			b.SetBytes(int64(len(raw)))
			for b.Loop() {
				s, _ := mdsrc.Parse(raw)
				if blocks, err := c.find(s); err != nil || len(blocks) != 5 {
					b.Fatalf("%d blocks, %v", len(blocks), err)
				}
			}
		})
	}
}
