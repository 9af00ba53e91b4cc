package transport

import (
	"bytes"
	"cleave/internal/testutil"
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

func TestRead(t *testing.T) {
	t.Parallel()
	type col struct {
		name, unit string
		vals       []float64
	}
	nan := math.NaN()
	tests := []struct {
		name string
		in   string
		meta []KV
		cols []col
	}{
		{"comma with units and metadata",
			"# sample: W7-3 b\n# lock-in: 13 Hz\n# free text line\nB (T), Rxx [Ohm], Rxy (Ohm)\n0,1.5,0\n0.1, 2.5 , -200\n",
			[]KV{{"sample", "W7-3 b"}, {"lock-in", "13 Hz"}, {"", "free text line"}},
			[]col{{"B", "T", []float64{0, 0.1}}, {"Rxx", "Ohm", []float64{1.5, 2.5}}, {"Rxy", "Ohm", []float64{0, -200}}}},
		{"tab, scaled units (mT, kOhm), CRLF, BOM",
			"\xef\xbb\xbfB (mT)\tRxx (kOhm)\r\n100\t1.5\r\n-250\t2\r\n",
			nil,
			[]col{{"B", "mT", []float64{0.1, -0.25}}, {"Rxx", "kOhm", []float64{1500, 2000}}}},
		{"semicolon, blank and comment lines, NaN and empty fields",
			"B (T);Rxy (Ohm);T (mK)\n\n0.5;NaN;20\n# paused\n1;;20\n  \n",
			nil,
			[]col{{"B", "T", []float64{0.5, 1}}, {"Rxy", "Ohm", []float64{nan, nan}}, {"T", "mK", []float64{0.02, 0.02}}}},
		{"whitespace with spaced units and a compound unit",
			"B (T)  Rxx (Ohm)   mu (cm^2/(V s))\n 0.1   10   1e6\n0.2\t11 2e6\n",
			nil,
			[]col{{"B", "T", []float64{0.1, 0.2}}, {"Rxx", "Ohm", []float64{10, 11}}, {"mu", "cm^2/(V s)", []float64{100, 200}}}},
		{"no units, unknown column name",
			"time,B,Rxx\n1,2,3\n",
			nil,
			[]col{{"time", "", []float64{1}}, {"B", "", []float64{2}}, {"Rxx", "", []float64{3}}}},
		{"header only", "# a: b\nB (T)\n", []KV{{"a", "b"}}, []col{{"B", "T", nil}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d, err := Read("f.csv", strings.NewReader(tc.in))
			if err != nil {
				t.Fatal(err)
			}
			if len(d.Meta) != len(tc.meta) {
				t.Fatalf("meta = %q, want %q", d.Meta, tc.meta)
			}
			for i := range tc.meta {
				if d.Meta[i] != tc.meta[i] {
					t.Errorf("meta[%d] = %q, want %q", i, d.Meta[i], tc.meta[i])
				}
			}
			if len(d.Columns) != len(tc.cols) {
				t.Fatalf("got %d columns, want %d", len(d.Columns), len(tc.cols))
			}
			for i, want := range tc.cols {
				c := d.Columns[i]
				if c.Name != want.name || c.Unit != want.unit {
					t.Errorf("column %d = %q (%q), want %q (%q)", i, c.Name, c.Unit, want.name, want.unit)
				}
				if len(c.Values) != len(want.vals) {
					t.Fatalf("column %q: %v, want %v", c.Name, c.Values, want.vals)
				}
				for k, v := range want.vals {
					g := c.Values[k]
					if math.IsNaN(v) != math.IsNaN(g) || !math.IsNaN(v) && math.Abs(g-v) > 1e-12*math.Abs(v) {
						t.Errorf("column %q[%d] = %v, want %v", c.Name, k, g, v)
					}
				}
			}
			if !strings.HasPrefix(d.Hash, "sha256:") || len(d.Hash) != 7+64 {
				t.Errorf("hash %q", d.Hash)
			}
		})
	}
}

func TestReadDims(t *testing.T) {
	t.Parallel()
	d, err := Read("f.csv", strings.NewReader("B (mT),Rxy,T,V (uV)\n1,2,3,4\n"))
	if err != nil {
		t.Fatal(err)
	}
	want := []struct {
		name string
		dim  any
	}{{"b", DimField}, {"RXY", DimResistance}, {"t", DimTemperature}}
	for _, w := range want {
		c, err := d.Col(w.name)
		if err != nil {
			t.Fatal(err)
		}
		if c.Dim != w.dim {
			t.Errorf("%s: dim %v, want %v", w.name, c.Dim, w.dim)
		}
	}
	if c, _ := d.Col("V"); c.Values[0] != 4e-6 {
		t.Errorf("V in uV: got %v, want 4e-6", c.Values[0])
	}
}

func TestReadErrors(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name, in string
		want     string // exact error text
		sentinel error
	}{
		{"empty file", "", "f.csv:1:1: no header row: expected a line of column names such as \"B (T), Rxx (Ohm)\"", ErrNoHeader},
		{"comments only", "# a: 1\n\n# b: 2\n", "f.csv:3:1: no header row: expected a line of column names such as \"B (T), Rxx (Ohm)\"", ErrNoHeader},
		{"numbers instead of a header", "# x\n0.1,2\n", "f.csv:2:1: no header row: this line holds numbers; expected column names such as \"B (T), Rxx (Ohm)\"", ErrNoHeader},
		{"unknown unit", "B (T), Rxx (Ohmz)\n", "f.csv:1:13: unknown unit \"Ohmz\" in column \"Rxx\": ", ErrUnknownUnit},
		{"absolute temperatures in °C", "B (T), T (°C)\n", "f.csv:1:11: unknown unit \"°C\" in column \"T\": a column in °C holds absolute temperatures with an offset, which data files do not convert: write the column in K", ErrUnknownUnit},
		{"wrong dimension for a known column", "B (Ohm),Rxx (Ohm)\n", "f.csv:1:4: unit \"Ohm\" of column \"B\" is a resistance; expected a magnetic field (T)", ErrUnitDim},
		{"temperature in tesla", "T [T]\n", "f.csv:1:4: unit \"T\" of column \"T\" is a magnetic field; expected a temperature (K)", ErrUnitDim},
		{"field in a length unit", "B (mm)\n", "f.csv:1:4: unit \"mm\" of column \"B\" is a length; expected a magnetic field (T)", ErrUnitDim},
		{"resistance in a force unit", "Rxx (N)\n", "f.csv:1:6: unit \"N\" of column \"Rxx\" is a quantity in kg m s^-2; expected a resistance (Ohm)", ErrUnitDim},
		{"too many fields", "B,Rxx\n1,2\n1,2,3\n", "f.csv:3:5: too many fields: expected 2 (B, Rxx)", ErrColumnCount},
		{"too few fields", "B,Rxx,Rxy\n1,2\n", "f.csv:2:4: too few fields: got 2, expected 3 (B, Rxx, Rxy)", ErrColumnCount},
		{"bad number", "B\tRxx\n1\t2x\n", "f.csv:2:3: bad number \"2x\" in column \"Rxx\": expected a number", ErrNumber},
		{"decimal comma", "B;Rxx\n0,5;2\n", "f.csv:2:1: bad number \"0,5\" in column \"B\": expected a number with a decimal point (a file with decimal commas needs a layout with `decimal: comma`)", ErrNumber},
		{"infinity", "B,Rxx\n1, inf\n", "f.csv:2:4: bad number \"inf\" in column \"Rxx\": expected a finite number", ErrNumber},
		{"duplicate column", "B,b\n", "f.csv:1:3: column \"b\" appears twice", ErrHeader},
		{"empty column name", "B,,Rxx\n", "f.csv:1:3: empty column name: expected \"name\", \"name (unit)\" or \"name [unit]\"", ErrHeader},
		{"unbalanced bracket", "B (T,Rxx\n", "f.csv:1:1: bad column header \"B (T\": expected \"name\", \"name (unit)\" or \"name [unit]\"", ErrHeader},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Read("f.csv", strings.NewReader(tc.in))
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, tc.sentinel) {
				t.Errorf("error %v does not wrap %v", err, tc.sentinel)
			}
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T is not a *ParseError", err)
			}
			if tc.sentinel == ErrUnknownUnit {
				if !strings.HasPrefix(err.Error(), tc.want) {
					t.Errorf("error\n got %q\nwant prefix %q", err, tc.want)
				}
			} else if err.Error() != tc.want {
				t.Errorf("error\n got %q\nwant %q", err, tc.want)
			}
		})
	}
}

func TestCol(t *testing.T) {
	t.Parallel()
	d, err := Read("run.csv", strings.NewReader("# x: y\nB (T),Rxx (Ohm),T (K)\n"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = d.Col("Rxy")
	want := `run.csv:2:1: no column "Rxy"; available: B, Rxx, T`
	if err == nil || err.Error() != want || !errors.Is(err, ErrUnknownColumn) {
		t.Errorf("Col error = %v, want %q wrapping ErrUnknownColumn", err, want)
	}
	if c, err := d.Col("rXX"); err != nil || c.Name != "Rxx" {
		t.Errorf("case-insensitive lookup: %v, %v", c, err)
	}
}

// TestRoundTrip checks that Read(WriteCSV(d)) gives back d's values exactly,
// and the same hash that Sweep computed.
func TestRoundTrip(t *testing.T) {
	t.Parallel()
	p := gaas()
	p.Points, p.Noise, p.OutOfPhase, p.UpDown = 300, 2, 0.05, true
	d, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, d); err != nil {
		t.Fatal(err)
	}
	e, err := Read("x.csv", &buf)
	if err != nil {
		t.Fatal(err)
	}
	if e.Hash != d.Hash {
		t.Errorf("hash %s, want %s", e.Hash, d.Hash)
	}
	if len(e.Meta) != len(d.Meta) || len(e.Columns) != len(d.Columns) {
		t.Fatalf("shape changed: %d meta, %d cols", len(e.Meta), len(e.Columns))
	}
	for i, c := range d.Columns {
		for k, v := range c.Values {
			if e.Columns[i].Values[k] != v {
				t.Fatalf("column %s row %d: %v, want %v", c.Name, k, e.Columns[i].Values[k], v)
			}
		}
	}
}

// TestWriteGolden pins the text format of WriteCSV (metadata, header, number format).
func TestWriteGolden(t *testing.T) {
	p := gaas()
	p.BStart, p.BEnd, p.Points, p.Noise = -1, 1, 11, 0.5
	d, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, d); err != nil {
		t.Fatal(err)
	}
	testutil.Golden(t, filepath.Join("testdata", "sweep.golden.csv"), buf.Bytes())
}

func FuzzRead(f *testing.F) {
	f.Add("# a: b\nB (T),Rxx (Ohm)\n1,2\n")
	f.Add("B (mT)\tRxy [kOhm]\r\n1\t2\r\nnan\t\r\n")
	f.Add("B (T) Rxx (Ohm) mu (cm^2/(V s))\n1 2 3\n")
	f.Add("B;Rxx\n0,5;1\n")
	f.Add("")
	f.Add("B (Ohm)\n")
	f.Fuzz(func(t *testing.T, in string) {
		d, err := Read("fz.csv", strings.NewReader(in))
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T %v is not a *ParseError", err, err)
			}
			lines := strings.Split(in, "\n")
			if pe.Line < 1 || pe.Line > max(len(lines), 1) {
				t.Fatalf("line %d outside the input (%d lines): %v", pe.Line, len(lines), err)
			}
			line := strings.TrimSuffix(lines[pe.Line-1], "\r")
			if pe.Col < 1 || pe.Col > len(line)+1 {
				t.Fatalf("column %d outside line %q: %v", pe.Col, line, err)
			}
			return
		}
		n := d.Len()
		for _, c := range d.Columns {
			if len(c.Values) != n {
				t.Fatalf("ragged columns")
			}
			for _, v := range c.Values {
				if math.IsInf(v, 0) {
					t.Fatalf("infinite value accepted")
				}
			}
		}
	})
}
