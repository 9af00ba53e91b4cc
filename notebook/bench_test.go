package notebook

import (
	"os"
	"path/filepath"
	"testing"

	"cleave/notebook/mdsrc"

	"go.yaml.in/yaml/v3"
)

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

// typicalFrontMatter is the front matter of a device entry as the fast path of decodeYAML
// reads it.
const typicalFrontMatter = `id: W00012-A-HB1
kind: device
from: W00012-A
mask: M1
devices: [W00012-A-HB1, W00012-B-HB1]
base_temperature: 0.3 K
design_density: 2.3e11 cm^-2
channel: GaAs
grown: 2024-03-01
position: {x: -10 mm, y: 5 mm}
axis: "[1-10]"
tags:
  - calibration
  - Al0.3Ga0.7As
`

// BenchmarkDecodeYAML decodes typicalFrontMatter with decodeYAML (which takes the fast path)
// and with yaml v3 alone, as decodeYAML did before the fast path.
func BenchmarkDecodeYAML(b *testing.B) {
	y := []byte(typicalFrontMatter)
	if !decodePlainYAML(y, &yaml.Node{}) {
		b.Fatal("the fast path refuses the typical front matter")
	}
	b.Run("fast", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			var n yaml.Node
			if err := decodeYAML(y, &n); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("yamlv3", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if err := decodeYAMLv3(y); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkDecodeYAMLTemplate decodes the front matter of each rendered built-in template
// (templates/testdata/*.golden, as `cleave new` writes them: fields explained in comments)
// with decodeYAML and with yaml v3 alone.
func BenchmarkDecodeYAMLTemplate(b *testing.B) {
	for _, name := range []string{"cooldown", "device", "mask", "piece", "process", "wafer"} {
		raw, err := os.ReadFile(filepath.Join("..", "templates", "testdata", name+".golden"))
		if err != nil {
			b.Fatal(err)
		}
		y, ok, err := mdsrc.SplitFrontMatter(raw)
		if !ok || err != nil {
			b.Fatalf("%s: no front matter (%v)", name, err)
		}
		b.Run(name+"/decodeYAML", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				var n yaml.Node
				if err := decodeYAML(y, &n); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(name+"/yamlv3", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := decodeYAMLv3(y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// decodeYAMLv3 is decodeYAML without its fast path: the bounds around yaml v3 alone, what the
// benchmarks compare the fast path with.
func decodeYAMLv3(y []byte) error {
	var n yaml.Node
	if err := checkYAMLText(y); err != nil {
		return err
	}
	if err := yaml.Unmarshal(y, &n); err != nil {
		return err
	}
	return checkYAMLTree(&n)
}
