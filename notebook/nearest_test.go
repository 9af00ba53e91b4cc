package notebook

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"
	"testing/fstest"
)

// Nearest stops at the first entry of the kind it is asked for; it must name the entry that
// Context (e and every ancestor, nearest first) lists first with that kind. Checked on the
// generated notebook and on random lineage graphs with processes (listed but not walked
// through), several parents, cycles, wrong-kind and dangling links, and long chains that
// take the map-backed seen set.
func TestNearestIsFirstOfContext(t *testing.T) {
	check := func(t *testing.T, nb *Notebook) {
		t.Helper()
		for _, e := range nb.Entries {
			for _, k := range Kinds() {
				want, wantOK := (*Entry)(nil), false
				for _, c := range nb.Context(e) {
					if c.Kind == k {
						want, wantOK = c, true
						break
					}
				}
				got, ok := nb.Nearest(e, k)
				if got != want || ok != wantOK {
					t.Fatalf("Nearest(%s, %s) = %v %v, Context gives %v %v", e.ID, k, idOf(got), ok, idOf(want), wantOK)
				}
			}
		}
	}
	nb, err := Load(genNotebook(6, 1))
	if err != nil {
		t.Fatal(err)
	}
	check(t, nb)
	// A chain of 300 pieces cut from one another down to a wafer, a cooldown measuring 100
	// devices on them, and a loop at the top: the walk outgrows the slice of seen entries.
	long := fstest.MapFS{"w.md": &fstest.MapFile{Data: []byte("---\nid: W\nkind: wafer\n---\n")}}
	for i := range 300 {
		from := "W"
		if i > 0 {
			from = fmt.Sprintf("P%03d", i-1)
		}
		if i == 0 {
			from = "P299" // a cycle: the wafer is never reached through it
		}
		long[fmt.Sprintf("p/P%03d.md", i)] = &fstest.MapFile{Data: fmt.Appendf(nil, "---\nid: P%03d\nkind: piece\nfrom: %s\n---\n", i, from)}
	}
	long["p/Q.md"] = &fstest.MapFile{Data: []byte("---\nid: Q\nkind: piece\nfrom: W\n---\n")}
	var devs []string
	for i := range 100 {
		devs = append(devs, fmt.Sprintf("D%03d", i))
		from := fmt.Sprintf("P%03d", 3*i)
		if i == 99 {
			from = "Q"
		}
		long[fmt.Sprintf("d/D%03d.md", i)] = &fstest.MapFile{Data: fmt.Appendf(nil, "---\nid: D%03d\nkind: device\nfrom: %s\n---\n", i, from)}
	}
	long["c/C.md"] = &fstest.MapFile{Data: fmt.Appendf(nil, "---\nid: C\nkind: cooldown\ndevices: [%s]\n---\n", strings.Join(devs, ", "))}
	if nb, err = Load(long); err != nil {
		t.Fatal(err)
	}
	if w, ok := nb.Nearest(nb.byID["C"], KindWafer); !ok || w.ID != "W" {
		t.Fatalf("Nearest(C, wafer) = %v %v, want W (through D099 and Q)", idOf(w), ok)
	}
	check(t, nb)
	kinds := []Kind{KindWafer, KindPiece, KindMask, KindProcess, KindDevice, KindCooldown}
	// The link fields of each kind (one id, or a list), as the kind table has them.
	type lf struct {
		name string
		list bool
	}
	fields := map[Kind][]lf{
		KindPiece:    {{"from", false}},
		KindProcess:  {{"pieces", true}, {"masks", true}},
		KindDevice:   {{"from", false}, {"mask", false}, {"process", true}},
		KindCooldown: {{"devices", true}},
	}
	for seed := range uint64(80) {
		r := rand.New(rand.NewPCG(seed, 7))
		n := 5 + r.IntN(150)
		fsys := fstest.MapFS{}
		for i := range n {
			k := kinds[r.IntN(len(kinds))]
			if seed%4 == 0 {
				k = kinds[1+r.IntN(2)*2] // pieces and processes: long chains through both
			}
			target := func() string {
				j := r.IntN(n + 3) // a few dangling ids
				if seed%2 == 0 {
					j = r.IntN(max(i, 1)) // earlier entries: deep, acyclic
				}
				return fmt.Sprintf("E%03d", j)
			}
			body := fmt.Sprintf("---\nid: E%03d\nkind: %s\n", i, k)
			for _, f := range fields[k] {
				switch {
				case !f.list:
					body += fmt.Sprintf("%s: %s\n", f.name, target())
				default:
					var ids []string
					for range r.IntN(5) {
						ids = append(ids, target())
					}
					body += fmt.Sprintf("%s: [%s]\n", f.name, strings.Join(ids, ", "))
				}
			}
			fsys[fmt.Sprintf("e/E%03d.md", i)] = &fstest.MapFile{Data: []byte(body + "---\n")}
		}
		nb, err := Load(fsys)
		if err != nil {
			t.Fatal(err)
		}
		t.Run(fmt.Sprint(seed), func(t *testing.T) { check(t, nb) })
	}
}

func idOf(e *Entry) string {
	if e == nil {
		return "<nil>"
	}
	return e.ID
}
