package transport

import (
	"bytes"
	"fmt"
	"strconv"
	"testing"
)

// benchSweep is the 10^6-point sweep of the analysis benchmarks (target:
// Hall fit plus SdH analysis under 150 ms).
func benchSweep(b *testing.B) *Dataset {
	p := gaas()
	p.Points, p.Noise = 1_000_000, 2
	d, err := Sweep(p)
	if err != nil {
		b.Fatal(err)
	}
	return d
}

// BenchmarkAnalyses runs HallDensity and SdHDensity on a 10^6-point sweep.
func BenchmarkAnalyses(b *testing.B) {
	d := benchSweep(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := HallDensity(d, "B", "Rxy", 0, 0.3); err != nil {
			b.Fatal(err)
		}
		if _, err := SdHDensity(d, 0.3, 1, 2); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkHall and BenchmarkSdH time the two halves of BenchmarkAnalyses.
func BenchmarkHall(b *testing.B) {
	d := benchSweep(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := HallDensity(d, "B", "Rxy", 0, 0.3); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSdH(b *testing.B) {
	d := benchSweep(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := SdHDensity(d, 0.3, 1, 2); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRead reads a 10^7-row, 3-column CSV; the MB/s column is the throughput.
func BenchmarkRead(b *testing.B) {
	var buf bytes.Buffer
	buf.WriteString("# bench: 1e7 rows\nB (T),Rxx (Ohm),Rxy (Ohm)\n")
	row := make([]byte, 0, 64)
	for i := 0; i < 10_000_000; i++ {
		B := float64(i) * 1e-6
		row = row[:0]
		row = strconv.AppendFloat(row, B, 'f', 6, 64)
		row = append(row, ',')
		row = strconv.AppendFloat(row, 100+float64(i%977)*0.013, 'f', 4, 64)
		row = append(row, ',')
		row = strconv.AppendFloat(row, -2080.5*B, 'f', 4, 64)
		row = append(row, '\n')
		buf.Write(row)
	}
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for b.Loop() {
		d, err := Read("bench.csv", bytes.NewReader(data))
		if err != nil {
			b.Fatal(err)
		}
		if d.Len() != 10_000_000 {
			b.Fatal(fmt.Sprint("rows ", d.Len()))
		}
	}
}

// BenchmarkReadLayout reads a 10^6-row tab-separated lock-in export (field, two X/Y pairs in
// volts, a current column) through a layout that derives R_xx and R_xy with their Y parts.
func BenchmarkReadLayout(b *testing.B) {
	l, err := ParseLayout("layouts/lockin.yaml", []byte("comments: [\"%\"]\ndelimiter: tab\ncolumns:\n  field_T: B\n  I_nA: I\n"+
		"derive:\n  Rxx: {x: X1_V, y: Y1_V, current: I_nA}\n  Rxy: {x: X2_V, y: Y2_V, current: I_nA}\n"))
	if err != nil {
		b.Fatal(err)
	}
	var buf bytes.Buffer
	buf.WriteString("% lock-in export\nfield_T\tX1_V\tY1_V\tX2_V\tY2_V\tI_nA\n")
	row := make([]byte, 0, 128)
	for i := 0; i < 1_000_000; i++ {
		B := float64(i) * 1e-6
		row = row[:0]
		row = strconv.AppendFloat(row, B, 'f', 6, 64)
		for _, v := range []float64{1e-6 + float64(i%977)*1e-10, 1e-8, -2.08e-5 * B, 2e-8} {
			row = append(row, '\t')
			row = strconv.AppendFloat(row, v, 'e', 6, 64)
		}
		row = append(row, "\t10.0\n"...)
		buf.Write(row)
	}
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for b.Loop() {
		d, err := ReadLayout("bench.tsv", bytes.NewReader(data), l)
		if err != nil {
			b.Fatal(err)
		}
		if d.Len() != 1_000_000 {
			b.Fatal(fmt.Sprint("rows ", d.Len()))
		}
	}
}

// BenchmarkSplitSweep splits a 2·10^5-point up-down sweep and fits the lag between its
// branches; BenchmarkCheckSweep runs every sweep check on it.
func BenchmarkSplitSweep(b *testing.B) {
	d := updownSweep(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := SplitSweep(d); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkCheckSweep(b *testing.B) {
	d := updownSweep(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := CheckSweep(d); err != nil {
			b.Fatal(err)
		}
	}
}

func updownSweep(b *testing.B) *Dataset {
	p := gaas()
	p.BStart, p.BEnd, p.Points, p.UpDown, p.Lag, p.Noise = -1, 1, 100_000, true, 3e-3, 0.05
	d, err := Sweep(p)
	if err != nil {
		b.Fatal(err)
	}
	return d
}
