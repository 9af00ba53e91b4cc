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
