package transport

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"cleave/internal/testutil"
)

// The instrument fixtures under testdata/instruments/ are files in the shapes lock-in
// amplifiers and measurement scripts write (tab-separated lock-in exports with "%"
// headers, fields in mT and kG, resistances in kOhm, voltages with a current column,
// up-down sweeps with a lagging field reading, one-sided sweeps, spikes). Each is
// generated here from the synthetic sweep of Sweep — Drude transport and the published
// low-field Shubnikov–de Haas form ([src:AFS1982], [src:CSF1989]) — with the known truth
// below, and `go test ./calc/transport -run TestFixtures -update` writes them again. The
// tests read each through its layout (testdata/instruments/layouts/) and recover the
// truth.

// Truth of every fixture: a GaAs 2DEG.
const (
	fxDensity  = 2.5e15 // m^-2 (2.5e11 cm^-2)
	fxMobility = 100.0  // m^2/(V s) (1e6 cm^2/(V s))
	fxSquares  = 5.0    // L/W between the R_xx probes
	fxCurrent  = 10e-9  // A, the excitation current
	fxLag      = 4e-3   // T, the field reading's lag in updown_lag.csv
	fxOffset   = 2e-3   // T, the remanent field in offset_pm1T.csv
)

// fxParams is the sweep model of the fixtures: n and μ above, m* = 0.067 m_e, τ_q = 0.5 ps,
// 0.3 K, over ±1 T unless a fixture says otherwise.
func fxParams(seed uint64) SweepParams {
	return SweepParams{Density: fxDensity, Mobility: fxMobility, MassRatio: 0.067, QuantumLifetime: 0.5e-12,
		Temperature: 0.3, Squares: fxSquares, BStart: -1, BEnd: 1, Points: 1001, Noise: 0.02, Seed: seed}
}

// fixture is one generated instrument file.
type fixture struct {
	file   string // under testdata/instruments/
	layout string // the layout it is read with ("" for sniffing)
	render func() ([]byte, error)
}

// g formats a number compactly.
func g(v float64, digits int) string { return strconv.FormatFloat(v, 'g', digits, 64) }

// table writes rows of fields with a delimiter.
func table(b *bytes.Buffer, delim string, rows [][]string) {
	for _, r := range rows {
		b.WriteString(strings.Join(r, delim))
		b.WriteByte('\n')
	}
}

// sweepCols returns B, Rxx, Rxy (and dir when asked) of a synthetic sweep.
func sweepCols(p SweepParams) (B, rxx, rxy []float64, dir []string, err error) {
	d, err := Sweep(p)
	if err != nil {
		return nil, nil, nil, nil, err
	}
	if c, e := d.Col("dir"); e == nil {
		dir = c.Text
	}
	return d.Columns[0].Values, d.Columns[1].Values, d.Columns[2].Values, dir, nil
}

func fixtures() []fixture {
	return []fixture{
		{"lockin_pm1T.tsv", "lockin-tsv", func() ([]byte, error) {
			// Two lock-ins read X and Y in volts; a current monitor reads the excitation
			// current, which drifts by 1 % over the sweep. R = V/I recovers R.
			B, rxx, rxy, _, err := sweepCols(fxParams(11))
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			b.WriteString("% lock-in export, two channels and a current monitor\n% 2024-05-02 14:22:05\n% T = 0.30 K\n% ramp: 0.1 T/min\n")
			rows := [][]string{{"time_s", "field_T", "X1_V", "Y1_V", "X2_V", "Y2_V", "I_nA"}}
			for i := range B {
				I := fxCurrent * (1 + 0.01*float64(i)/float64(len(B)))
				rows = append(rows, []string{g(float64(i)*0.6, 6), g(B[i], 8),
					g(rxx[i]*I, 9), g(0.01*rxx[i]*I, 4), g(rxy[i]*I, 9), g(0.01*math.Abs(rxy[i])*I, 4), g(I*1e9, 9)})
			}
			table(&b, "\t", rows)
			return b.Bytes(), nil
		}},
		{"lockin_noI.tsv", "lockin-excitation", func() ([]byte, error) {
			// The same export, the current held at the recorded 10 nA (the monitor column
			// is ignored): R = V/I with the cooldown's excitation current.
			B, rxx, rxy, _, err := sweepCols(fxParams(12))
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			b.WriteString("% lock-in export\n")
			rows := [][]string{{"time_s", "field_T", "X1_V", "Y1_V", "X2_V", "Y2_V", "I_nA"}}
			for i := range B {
				rows = append(rows, []string{g(float64(i)*0.6, 6), g(B[i], 8),
					g(rxx[i]*fxCurrent, 9), g(0.01*rxx[i]*fxCurrent, 4), g(rxy[i]*fxCurrent, 9), g(0.01*math.Abs(rxy[i])*fxCurrent, 4), "NaN"})
			}
			table(&b, "\t", rows)
			return b.Bytes(), nil
		}},
		{"sweep_mT_kOhm.csv", "", func() ([]byte, error) {
			// Units in the header (mT, kOhm) and ";" comments: sniffed without a layout.
			B, rxx, rxy, _, err := sweepCols(fxParams(13))
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			b.WriteString("; field sweep\n; sample: HB1\nMagnetic Field (mT), Rxx (kOhm), Rxy (kOhm)\n")
			rows := [][]string{}
			for i := range B {
				rows = append(rows, []string{g(B[i]*1e3, 8), g(rxx[i]/1e3, 9), g(rxy[i]/1e3, 9)})
			}
			table(&b, ", ", rows)
			return b.Bytes(), nil
		}},
		{"bare_mT.csv", "bare-mT", func() ([]byte, error) {
			// No units anywhere: the layout says mT and kOhm and which column is which.
			B, rxx, rxy, _, err := sweepCols(fxParams(14))
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			rows := [][]string{{"Field", "R1", "R2"}}
			for i := range B {
				rows = append(rows, []string{g(B[i]*1e3, 8), g(rxx[i]/1e3, 9), g(rxy[i]/1e3, 9)})
			}
			table(&b, ",", rows)
			return b.Bytes(), nil
		}},
		{"magnet_kG_onesided.dat", "", func() ([]byte, error) {
			// A one-sided sweep 0 to 10 kG (1 T), blank-separated, "!" comments, kG and kOhm.
			p := fxParams(15)
			p.BStart, p.BEnd, p.Points = 0, 1, 501
			B, rxx, rxy, _, err := sweepCols(p)
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			b.WriteString("! magnet in kG\n! T: 0.3 K\nField [kG]  Rxx [kOhm]  Rxy [kOhm]\n")
			rows := [][]string{}
			for i := range B {
				rows = append(rows, []string{g(B[i]*10, 8), g(rxx[i]/1e3, 9), g(rxy[i]/1e3, 9)})
			}
			table(&b, "  ", rows)
			return b.Bytes(), nil
		}},
		{"decimal_comma.txt", "decimal-comma", func() ([]byte, error) {
			B, rxx, rxy, _, err := sweepCols(fxParams(16))
			if err != nil {
				return nil, err
			}
			comma := func(s string) string { return strings.ReplaceAll(s, ".", ",") }
			var b bytes.Buffer
			rows := [][]string{{"B (T)", "Rxx (Ohm)", "Rxy (Ohm)"}}
			for i := range B {
				rows = append(rows, []string{comma(g(B[i], 8)), comma(g(rxx[i], 9)), comma(g(rxy[i], 9))})
			}
			table(&b, ";", rows)
			return b.Bytes(), nil
		}},
		{"preamp_noheader.dat", "preamp-noheader", func() ([]byte, error) {
			// No header row; voltages after a x100 preamplifier with a 10 nA source.
			B, rxx, rxy, _, err := sweepCols(fxParams(17))
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			rows := [][]string{}
			for i := range B {
				rows = append(rows, []string{g(B[i], 8), g(100*rxx[i]*fxCurrent, 9), g(100*rxy[i]*fxCurrent, 9)})
			}
			table(&b, " ", rows)
			return b.Bytes(), nil
		}},
		{"header_line5.txt", "header-line", func() ([]byte, error) {
			// Free text before the header on line 5, and a row of units below it that the
			// layout's "#" comment prefix does not cover: it starts with "#".
			B, rxx, rxy, _, err := sweepCols(fxParams(18))
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			b.WriteString("Measurement log\nOperator RS\n\nfree text, no comment mark\nMagnet (kG)\tRxx (Ohm)\tRxy (Ohm)\n# kG\tOhm\tOhm\n")
			rows := [][]string{}
			for i := range B {
				rows = append(rows, []string{g(B[i]*10, 8), g(rxx[i], 9), g(rxy[i], 9)})
			}
			table(&b, "\t", rows)
			return b.Bytes(), nil
		}},
		{"updown_lag.csv", "", func() ([]byte, error) {
			// −1 T → +1 T → −1 T with the field reading 4 mT behind the true field, and
			// a direction column.
			p := fxParams(19)
			p.UpDown, p.Lag, p.Direction = true, fxLag, true
			B, rxx, rxy, dir, err := sweepCols(p)
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			b.WriteString("# up and down sweep at 0.2 T/min\n")
			rows := [][]string{{"B_T", "Rxx_Ohm", "Rxy_Ohm", "dir"}}
			for i := range B {
				rows = append(rows, []string{g(B[i], 8), g(rxx[i], 9), g(rxy[i], 9), dir[i]})
			}
			table(&b, ",", rows)
			return b.Bytes(), nil
		}},
		{"offset_pm1T.csv", "", func() ([]byte, error) {
			// A remanent field of 2 mT: the column reads B_true − 2 mT.
			p := fxParams(20)
			p.FieldOffset = fxOffset
			B, rxx, rxy, _, err := sweepCols(p)
			if err != nil {
				return nil, err
			}
			var b bytes.Buffer
			rows := [][]string{{"B (T)", "Rxx (Ohm)", "Rxy (Ohm)"}}
			for i := range B {
				rows = append(rows, []string{g(B[i], 8), g(rxx[i], 9), g(rxy[i], 9)})
			}
			table(&b, ",", rows)
			return b.Bytes(), nil
		}},
		{"spikes.csv", "", func() ([]byte, error) {
			// 0 to 1 T with a one-point spike in Rxx at 0.37 T, the field reading
			// stepping back near 0.6 T, and Rxy pinned at the lock-in's full scale
			// (overload, 2100 Ohm at 10 nA) from 0.84 T on.
			p := fxParams(21)
			p.BStart, p.BEnd, p.Points = 0, 1, 501
			B, rxx, rxy, _, err := sweepCols(p)
			if err != nil {
				return nil, err
			}
			for i := range B {
				switch {
				case i == 185:
					rxx[i] *= 3
				case i >= 300 && i < 303:
					B[i] -= 0.006
				}
				rxy[i] = math.Max(rxy[i], -2100) // the lock-in's full scale
			}
			var b bytes.Buffer
			rows := [][]string{{"B (T)", "Rxx (Ohm)", "Rxy (Ohm)"}}
			for i := range B {
				rows = append(rows, []string{g(B[i], 8), g(rxx[i], 9), g(rxy[i], 9)})
			}
			table(&b, ",", rows)
			return b.Bytes(), nil
		}},
	}
}

// TestFixtures writes (with -update) or checks the generated fixture files.
func TestFixtures(t *testing.T) {
	for _, f := range fixtures() {
		b, err := f.render()
		if err != nil {
			t.Fatalf("%s: %v", f.file, err)
		}
		testutil.Golden(t, filepath.Join("testdata", "instruments", f.file), b)
	}
}

// readFixture reads a fixture through its layout.
func readFixture(t *testing.T, file, layout string, excitation float64) *Dataset {
	t.Helper()
	var l *Layout
	if layout != "" {
		src := filepath.Join("testdata", "instruments", "layouts", layout+".yaml")
		b, err := os.ReadFile(src)
		if err != nil {
			t.Fatal(err)
		}
		l, err = ParseLayout("layouts/"+layout+".yaml", b)
		if err != nil {
			t.Fatal(err)
		}
		l.Excitation = excitation
	}
	fh, err := os.Open(filepath.Join("testdata", "instruments", file))
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	d, err := ReadLayout(file, fh, l)
	if err != nil {
		t.Fatalf("%s: %v", file, err)
	}
	return d
}

// TestFixtureTruth reads every fixture through its layout and recovers the truth: the
// Hall density (fit over 0.05–0.4 T), the SdH density (0.4–1 T) and R_xx at zero field.
func TestFixtureTruth(t *testing.T) {
	rho0 := 1 / (fxDensity * qe * fxMobility) // Drude ρ_xx, Ohm per square
	for _, f := range fixtures() {
		if f.file == "spikes.csv" {
			continue // checked by the sweep checks
		}
		t.Run(f.file, func(t *testing.T) {
			d := readFixture(t, f.file, f.layout, fxCurrent)
			off := 0.0
			if f.file == "offset_pm1T.csv" {
				off = fxOffset
				d = d.WithFieldOffset(off)
			}
			h, err := HallDensity(d, "B", "Rxy", 0.05, 0.4)
			if err != nil {
				t.Fatal(err)
			}
			// The Hall line is exact in the model; 3σ of the fit and 0.2 %.
			if math.Abs(h.Density.Value-fxDensity) > 3*h.Density.Uncertainty+2e-3*fxDensity {
				t.Errorf("Hall density %.5g ± %.2g m^-2, want %g", h.Density.Value, h.Density.Uncertainty, fxDensity)
			}
			if h.Carriers != "electrons" {
				t.Errorf("carriers %s, want electrons", h.Carriers)
			}
			s, err := SdHDensity(d, 0.4, 1, 2)
			if err != nil {
				t.Fatal(err)
			}
			// f_B = h n/(2e) = 5.1696 T for n = 2.5e11 cm^-2 ([src:AFS1982]); 1 %.
			testutil.CheckRel(t, "SdH density", s.Density.Value, fxDensity, 0.01)
			if f.file == "updown_lag.csv" {
				return // the lag shifts the field near zero; split first (TestFixtureLag)
			}
			z, err := ZeroField(d, "Rxx")
			if err != nil {
				t.Fatal(err)
			}
			testutil.CheckRel(t, "R_xx(0)", z.Value.Value, rho0*fxSquares, 2e-3)
		})
	}
}

// TestFixtureRoles: what each layout made of its file.
func TestFixtureRoles(t *testing.T) {
	var out strings.Builder
	for _, f := range fixtures() {
		d := readFixture(t, f.file, f.layout, fxCurrent)
		fmt.Fprintf(&out, "%s (layout %q): %d rows\n", f.file, f.layout, d.Len())
		for _, c := range d.Columns {
			first := "text " + strconv.Quote(firstText(c.Text))
			if !c.IsText() {
				first = g(c.Values[0], 6)
			}
			fmt.Fprintf(&out, "  %-16s unit %-5q role %-6q dim %-22s first %s\n", c.Name, c.Unit, c.Role, c.Dim, first)
		}
		for _, kv := range d.Meta {
			fmt.Fprintf(&out, "  meta %q: %q\n", kv.Key, kv.Value)
		}
	}
	testutil.GoldenString(t, filepath.Join("testdata", "instruments", "roles.golden"), out.String())
}

func firstText(t []string) string {
	if len(t) == 0 {
		return ""
	}
	return t[0]
}

// TestBadFiles pins the error of every bad file and bad layout under
// testdata/instruments/bad/: what a user sees, with file, line and column.
func TestBadFiles(t *testing.T) {
	dir := filepath.Join("testdata", "instruments", "bad")
	cases := []struct {
		file, layout string
		analyse      func(*Dataset) error // nil: reading must fail
	}{
		{"decimal_comma.csv", "", nil},
		{"text_in_field.csv", "", nil},
		{"field_in_volts.csv", "", func(d *Dataset) error { _, err := HallDensity(d, "B", "Rxx", 0, 1); return err }},
		{"short_row.csv", "", nil},
		{"no_header.csv", "", nil},
		{"volts.tsv", "", func(d *Dataset) error { _, err := HallDensity(d, "B", "X2_V", 0, 1); return err }},
		{"volts.tsv", "", func(d *Dataset) error { _, err := SdHDensity(d, 0.1, 0.6, 2, WithColumns("B", "X2")); return err }},
		{"plain.tsv", "unknown-key", nil},
		{"plain.tsv", "bad-delimiter", nil},
		{"plain.tsv", "bad-role", nil},
		{"plain.tsv", "role-unit", nil},
		{"plain.tsv", "no-current", nil},
		{"plain.tsv", "missing-column", nil},
		{"plain.tsv", "excitation", nil},
		{"plain.tsv", "current-volts", nil},
		{"plain.tsv", "comma-comma", nil},
		{"plain.tsv", "syntax", nil},
		{"plain.tsv", "header-none", nil},
		{"plain.tsv", "header-far", nil},
	}
	var out strings.Builder
	for _, c := range cases {
		err := func() error {
			var l *Layout
			if c.layout != "" {
				b, err := os.ReadFile(filepath.Join(dir, "layouts", c.layout+".yaml"))
				if err != nil {
					t.Fatal(err)
				}
				if l, err = ParseLayout("layouts/"+c.layout+".yaml", b); err != nil {
					return err
				}
			}
			b, err := os.ReadFile(filepath.Join(dir, c.file))
			if err != nil {
				t.Fatal(err)
			}
			d, err := ReadLayout(c.file, bytes.NewReader(b), l)
			if err != nil || c.analyse == nil {
				return err
			}
			return c.analyse(d)
		}()
		if err == nil {
			t.Errorf("%s (layout %q): no error", c.file, c.layout)
			continue
		}
		fmt.Fprintf(&out, "%s, layout %q:\n  %v\n", c.file, c.layout, err)
	}
	testutil.GoldenString(t, filepath.Join(dir, "errors.golden"), out.String())
}

// TestLayoutParse checks what ParseLayout makes of the fixtures' layouts.
func TestLayoutParse(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("testdata", "instruments", "layouts", "lockin-tsv.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	l, err := ParseLayout("layouts/lockin-tsv.yaml", b)
	if err != nil {
		t.Fatal(err)
	}
	if l.Name != "lockin-tsv" || l.Delimiter != '\t' || len(l.Comments) != 1 || l.Comments[0] != "%" || l.Decimal != '.' {
		t.Errorf("layout %+v", l)
	}
	if len(l.Columns) != 2 || l.Columns[0].File != "field_T" || l.Columns[0].Role != RoleField || l.Columns[1].Role != RoleCurrent {
		t.Errorf("columns %+v", l.Columns)
	}
	if len(l.Derive) != 2 || l.Derive[0].Name != "Rxx" || l.Derive[0].X != "X1_V" || l.Derive[0].Y != "Y1_V" || l.Derive[0].CurrentCol != "I_nA" || l.Derive[0].Gain != 1 {
		t.Errorf("derive %+v", l.Derive)
	}
	if l.UsesExcitation() {
		t.Error("lockin-tsv does not use the excitation current")
	}
	if !ValidLayoutName("lockin-tsv") || ValidLayoutName("../x") || ValidLayoutName("a/b") || ValidLayoutName("") {
		t.Error("ValidLayoutName")
	}
}

func FuzzParseLayout(f *testing.F) {
	for _, name := range []string{"lockin-tsv", "bare-mT", "preamp-noheader", "decimal-comma", "header-line"} {
		b, err := os.ReadFile(filepath.Join("testdata", "instruments", "layouts", name+".yaml"))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(string(b), "Field\tX1\tY1\tI\n0.1\t1e-6\t2e-8\t1e-8\n")
	}
	f.Add("derive: {Rxx: {x: X1, current: excitation}}\n", "X1\n1\n")
	f.Fuzz(func(t *testing.T, layout, data string) {
		l, err := ParseLayout("layouts/fz.yaml", []byte(layout))
		if err != nil {
			if !strings.HasPrefix(err.Error(), "layouts/fz.yaml:") {
				t.Fatalf("error without the file name: %v", err)
			}
			return
		}
		l.Excitation = 1e-8
		d, err := ReadLayout("fz.csv", strings.NewReader(data), l)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fz.csv:") && !strings.HasPrefix(err.Error(), "layouts/fz.yaml:") {
				t.Fatalf("error without a file name: %v", err)
			}
			return
		}
		n := d.Len()
		for _, c := range d.Columns {
			if len(c.Values) != n || c.Text != nil && len(c.Text) != n {
				t.Fatalf("ragged column %q: %d values, %d labels, %d rows", c.Name, len(c.Values), len(c.Text), n)
			}
		}
	})
}
