package notebook

import "testing"

// BenchmarkLoadValidate10k loads and validates a generated notebook of about
// 10,000 entries (909 wafers with layer tables, 1818 pieces, 3636 devices,
// 3636 cooldowns, 102 masks) held in memory.
func BenchmarkLoadValidate10k(b *testing.B) {
	fsys := genNotebook(909, 1)
	b.ReportAllocs()
	for b.Loop() {
		nb, err := Load(fsys)
		if err != nil {
			b.Fatal(err)
		}
		if ps := nb.Validate(); len(ps) != 0 {
			b.Fatalf("unexpected problem: %v", ps[0])
		}
		if len(nb.Entries) < 10000 {
			b.Fatalf("only %d entries", len(nb.Entries))
		}
	}
}
