package notebook

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing/fstest"

	"go.yaml.in/yaml/v3"
)

func scalarNode(s string) *yaml.Node {
	return &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!str", Value: s, Line: 1, Column: 1}
}

// genNotebook builds a valid notebook of realistic chains in memory: masks,
// then per wafer (with a layer table) two pieces, each with two devices, each
// device measured in one cooldown. nWafers wafers give nWafers*11 + nWafers/9
// + 1 entries (909 give 10,102). Seeded, so the same call gives the same
// notebook. All names and numbers are invented.
func genNotebook(nWafers int, seed uint64) fstest.MapFS {
	r := rand.New(rand.NewPCG(seed, 1))
	fsys := fstest.MapFS{}
	nMasks := nWafers/9 + 1
	for m := range nMasks {
		fsys[fmt.Sprintf("masks/HB-%d.md", m)] = &fstest.MapFile{Data: fmt.Appendf(nil,
			"---\nid: HB-%d\nkind: mask\nwidth: %d um\nlength: 600 um\nprobes:\n  - {name: P1, position: 150 um, arm_width: 5 um, side: top}\n  - {name: P2, position: 450 um, arm_width: 5 um, side: top}\n---\n", m, 10+r.IntN(90))}
	}
	for w := range nWafers {
		wid := fmt.Sprintf("W%04d", w)
		var b strings.Builder
		fmt.Fprintf(&b, "---\nid: %s\nkind: wafer\ngrown: 2023-%02d-%02d\nby: KT\nchannel: GaAs\ncarrier: electrons\ndoping_scheme: delta\nrotation: true\ndesign_density: %.2fe11 cm^-2\n---\n\nGrowth notes for an invented wafer.\n\n## Layers\n\n| layer | material | thickness | doping |\n| --- | --- | --- | --- |\n",
			wid, 1+r.IntN(12), 1+r.IntN(28), 1+4*r.Float64())
		fmt.Fprintf(&b, "| cap | GaAs | %d nm | - |\n| barrier | Al0.33Ga0.67As | %d nm | |\n| doping | Al0.33Ga0.67As | 1 nm | Si delta 2e12 cm^-2 |\n| spacer | Al0.33Ga0.67As | %d nm | |\n| channel | GaAs | 1 um | |\n",
			5+r.IntN(10), 20+r.IntN(40), 20+r.IntN(80))
		fsys["wafers/"+wid+".md"] = &fstest.MapFile{Data: []byte(b.String())}
		for p := range 2 {
			pid := fmt.Sprintf("%s-%c", wid, 'a'+p)
			fsys["pieces/"+pid+".md"] = &fstest.MapFile{Data: fmt.Appendf(nil,
				"---\nid: %s\nkind: piece\nfrom: %s\nwidth: %d mm\nlength: %d mm\nposition: {x: %d mm, y: %d mm}\ncleaved: 2023-06-01\n---\n\nCleaved by KT.\n", pid, wid, 2+r.IntN(4), 2+r.IntN(4), r.IntN(30)-15, r.IntN(30)-15)}
			for d := range 2 {
				did := fmt.Sprintf("%s-%d", pid, d+1)
				fsys["devices/"+did+".md"] = &fstest.MapFile{Data: fmt.Appendf(nil,
					"---\nid: %s\nkind: device\nfrom: %s\nmask: HB-%d\naxis: \"[1-10]\"\nas_built: {width: %.1f um}\n---\n", did, pid, r.IntN(nMasks), 10+80*r.Float64())}
				fsys["cooldowns/C-"+did+".md"] = &fstest.MapFile{Data: fmt.Appendf(nil,
					"---\nid: C-%s\nkind: cooldown\ndevices: [%s]\nbase_temperature: %d mK\nmagnet: {max_field: 12 T, offset: 1 mT}\nexcitation: {current: 100 nA, frequency: 13 Hz}\ndata:\n  - {file: data/sweep.csv, note: up sweep, temperature: 20 mK}\n---\n\n```cleave\nn = 3e11 cm^-2\n```\n", did, did, 10+r.IntN(300))}
			}
		}
	}
	// The data file every generated cooldown lists (validation checks it exists).
	fsys["cooldowns/data/sweep.csv"] = &fstest.MapFile{Data: []byte("B (T),Rxx (Ohm),Rxy (Ohm)\n0,10,0\n")}
	return fsys
}
