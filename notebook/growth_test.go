package notebook

import (
	"testing"
	"testing/fstest"

	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

// growthWafer logs its growth per layer: the cap and barrier by time and rate only, the
// spacer beside its thickness, the channel in um/h.
const growthWafer = `---
id: G7
kind: wafer
---

## Layers

| layer   | material     | thickness | time   | rate                | t_sub  | cells                           | shutters |
| ------- | ------------ | --------- | ------ | ------------------- | ------ | ------------------------------- | -------- |
| cap     | GaAs         |           | 35 s   | 1 ML/s              | 580 °C | Ga 905 °C                       | Ga, As   |
| barrier | Al0.3Ga0.7As | -         | 150 s  | 1.43 ML/s           | 600 °C | Ga 905 °C, Al 1060 °C           |          |
| spacer  | Al0.3Ga0.7As | 30 nm     | 75 s   | 0.4 nm/s            | 600 °C | Ga 905 °C; Al 1060 °C           |          |
| delta   | Al0.3Ga0.7As | 0 nm      | 20 s   | 0 nm/s              | 600 °C | Si 1180 °C                      | Si only  |
| channel | GaAs         | 1 um      | 3600 s | 1 um/h              | 580 °C | Ga 905 °C                       |          |
`

// TestGrowthColumns: a row without a thickness takes rate × time; ML alone is a monolayer of
// the row's material (GaAs: a/2 = 0.2826625 nm with a = 5.65325 Å, Vurgaftman, Meyer and
// Ram-Mohan 2001; Al0.3Ga0.7As: Vegard's law, 0.28278025 nm); temperatures in °C are
// absolute (T/K = t/°C + 273.15).
func TestGrowthColumns(t *testing.T) {
	nb, err := Load(fstest.MapFS{"wafers/G7.md": {Data: []byte(growthWafer)}})
	if err != nil {
		t.Fatal(err)
	}
	if ps := nb.Validate(); len(ps) > 0 {
		t.Fatalf("problems: %v", ps)
	}
	w, _ := nb.Entry("G7")
	rows := w.LayerRows()
	want := []struct {
		thickness  float64 // m
		fromGrowth bool
		grown      float64
		tsubK      float64
		cells      int
	}{
		{35 * 0.2826625e-9, true, 35 * 0.2826625e-9, 853.15, 1},
		{150 * 1.43 * 0.28278025e-9, true, 150 * 1.43 * 0.28278025e-9, 873.15, 2},
		{30e-9, false, 30e-9, 873.15, 2},
		{0, false, 0, 873.15, 1},
		{1e-6, false, 1e-6, 853.15, 1},
	}
	for i, r := range rows {
		w, g := want[i], r.Growth
		if !testutil.Within(r.ThicknessQ.Value(), w.thickness, 1e-12, 1e-22) || g.FromGrowth != w.fromGrowth ||
			!g.HasGrown || !testutil.Within(g.Grown.Value(), w.grown, 1e-12, 1e-22) ||
			!testutil.WithinRel(g.TSubQ.Value(), w.tsubK, 1e-15) || g.TSubQ.Temp() != quantity.TempCelsius || len(g.CellTemps) != w.cells {
			t.Errorf("row %d (%s): thickness %v (from growth %v), grown %v, t_sub %v, cells %v; want %+v",
				i, r.Layer, r.ThicknessQ.Value(), g.FromGrowth, g.Grown.Value(), g.TSubQ.Value(), g.CellTemps, w)
		}
	}
	if c := rows[1].Growth.CellTemps[1]; c.Cell != "Al" || c.T.Value() != 1060+273.15 {
		t.Errorf("barrier's second cell: %+v", c)
	}
}

// TestParseCellTemps covers the cells column's parser.
// TestNoGrowthColumns: a table without growth columns keeps no growth log.
func TestNoGrowthColumns(t *testing.T) {
	for _, r := range loadGood(t).byID["W23-017"].LayerRows() {
		if r.Growth != nil {
			t.Errorf("%s: a growth log from a table without growth columns", r.Layer)
		}
	}
}

func TestParseCellTemps(t *testing.T) {
	c, err := ParseCellTemps("Ga 905 °C, Al 1333.15 K; Si 1180 ± 1 °C")
	if err != nil || len(c) != 3 || c[1].T.Value() != 1333.15 || c[2].T.Uncertainty() != 1 {
		t.Errorf("%v, %v", c, err)
	}
	for _, s := range []string{"-", "", " — "} {
		if c, err := ParseCellTemps(s); err != nil || c != nil {
			t.Errorf("%q: %v, %v", s, c, err)
		}
	}
	for _, s := range []string{"Ga", "Ga 905", "Ga 905 C", "Ga: 905 °C", "Ga 905 °C Al 1060 °C"} {
		if _, err := ParseCellTemps(s); err == nil {
			t.Errorf("%q: no error", s)
		}
	}
}

// FuzzParseCellTemps: the cells parser never panics, and what it accepts is temperatures.
func FuzzParseCellTemps(f *testing.F) {
	for _, s := range []string{"Ga 905 °C, Al 1060 °C", "Si 1180 ± 1 °C", "-", "Ga", "Ga 905 C", ";;", "Ga 1e999 K", "As4 300 degC"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		cells, err := ParseCellTemps(s)
		if err != nil {
			return
		}
		for _, c := range cells {
			if c.Cell == "" || c.T.Dim() != quantity.Temperature {
				t.Fatalf("%q: %+v", s, c)
			}
		}
	})
}

// TestMonolayerOf: a bare ML in a layer table's rate is a monolayer of the row's material.
func TestMonolayerOf(t *testing.T) {
	for _, c := range []struct{ in, mat, want string }{
		{"1 ML/s", "GaAs", "1 ML(GaAs)/s"},
		{"0.8 ML(AlAs)/s", "Al0.3Ga0.7As", "0.8 ML(AlAs)/s"},
		{"0.3 nm/s", "GaAs", "0.3 nm/s"},
		{"1 MLx/s", "GaAs", "1 MLx/s"},
		{"1 ML/s", "", "1 ML/s"},
	} {
		if got := monolayerOf(c.in, c.mat); got != c.want {
			t.Errorf("monolayerOf(%q, %q) = %q, want %q", c.in, c.mat, got, c.want)
		}
	}
}
