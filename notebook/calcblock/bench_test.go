package calcblock

import (
	"fmt"
	"testing"
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
