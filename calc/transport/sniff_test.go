package transport

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// TestReadSniff covers the shapes instrument exports and measurement scripts write that
// Read understands without a layout: other comment prefixes, unit suffixes, spelled-out
// field names, text columns and time stamps in comments.
func TestReadSniff(t *testing.T) {
	t.Parallel()
	type col struct {
		name, unit, role string
		first            float64 // the first value in SI; NaN for a text column
		text             string  // the first label of a text column
	}
	nan := math.NaN()
	tests := []struct {
		name string
		in   string
		meta []KV
		cols []col
	}{
		{"percent comments and unit suffixes, tab-separated",
			"% lock-in export\n% T = 0.30 K\n% 2024-05-02 14:22:05\nfield_T\tX1_V\tI_nA\n0.5\t1e-6\t10\n",
			[]KV{{"", "lock-in export"}, {"T", "0.30 K"}, {"", "2024-05-02 14:22:05"}},
			[]col{{"field_T", "T", "B", 0.5, ""}, {"X1_V", "V", "", 1e-6, ""}, {"I_nA", "nA", "I", 1e-8, ""}}},
		{"semicolon comments, spelled-out field name in parentheses",
			"; measured 2024-05-02\n; sample: HB1\nMagnetic Field (T), Rxx (kOhm)\n0.25, 1.5\n",
			[]KV{{"", "measured 2024-05-02"}, {"sample", "HB1"}},
			[]col{{"Magnetic Field", "T", "B", 0.25, ""}, {"Rxx", "kOhm", "Rxx", 1500, ""}}},
		{"double-slash and bang comments, field in brackets, kG",
			"// run 12\n! started: 14:22\nField [kG]\tRxy [Ohm]\n5\t-100\n",
			[]KV{{"", "run 12"}, {"started", "14:22"}},
			[]col{{"Field", "kG", "B", 0.5, ""}, {"Rxy", "Ohm", "Rxy", -100, ""}}},
		{"B_T and a text direction column",
			"B_T,Rxx_Ohm,dir\n-1,10,up\n1,11,down\n",
			nil,
			[]col{{"B_T", "T", "B", -1, ""}, {"Rxx_Ohm", "Ohm", "Rxx", 10, ""}, {"dir", "", "dir", nan, "up"}}},
		{"a text column whose first value is missing",
			"B (T),comment\n0,\n0.1,ramp paused\n",
			nil,
			[]col{{"B", "T", "B", 0, ""}, {"comment", "", "", nan, ""}}},
		{"V_g is a gate voltage, not grams; Rxx_X a lock-in channel",
			"B,V_g,Rxx_X\n1,2,3\n",
			nil,
			[]col{{"B", "", "B", 1, ""}, {"V_g", "", "Vg", 2, ""}, {"Rxx_X", "", "", 3, ""}}},
		{"time stamps are labels, seconds are numbers",
			"time\tdate\tt_s\tB (T)\n14:22:05\t2024-05-02\t0.5\t1\n",
			nil,
			[]col{{"time", "", "time", nan, "14:22:05"}, {"date", "", "", nan, "2024-05-02"}, {"t_s", "s", "", 0.5, ""}, {"B", "T", "B", 1, ""}}},
		{"two field columns: the first takes the role",
			"B (T),Field (mT)\n1,1000\n",
			nil,
			[]col{{"B", "T", "B", 1, ""}, {"Field", "mT", "", 1, ""}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d, err := Read("f.txt", strings.NewReader(tc.in))
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
				t.Fatalf("got %d columns %s, want %d", len(d.Columns), d.names(), len(tc.cols))
			}
			for i, w := range tc.cols {
				c := d.Columns[i]
				if c.Name != w.name || c.Unit != w.unit || c.Role != w.role {
					t.Errorf("column %d = %q (%q) role %q, want %q (%q) role %q", i, c.Name, c.Unit, c.Role, w.name, w.unit, w.role)
				}
				if len(c.Values) == 0 {
					t.Fatalf("column %q is empty", c.Name)
				}
				if g := c.Values[0]; math.IsNaN(w.first) != math.IsNaN(g) || !math.IsNaN(w.first) && math.Abs(g-w.first) > 1e-12*math.Abs(w.first) {
					t.Errorf("column %q[0] = %v, want %v", c.Name, g, w.first)
				}
				if w.text != "" && (!c.IsText() || c.Text[0] != w.text) {
					t.Errorf("column %q: text %q, want first label %q", c.Name, c.Text, w.text)
				}
			}
		})
	}
}

// TestColLookup: a column is found by its name, its name without the unit suffix, or its role.
func TestColLookup(t *testing.T) {
	t.Parallel()
	d, err := Read("f.tsv", strings.NewReader("Magnetic Field (mT)\tRxy_kOhm\tT_mc\n100\t1\t20\n"))
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ ask, want string }{
		{"B", "Magnetic Field"}, {"magnetic field", "Magnetic Field"},
		{"Rxy", "Rxy_kOhm"}, {"Rxy_kOhm", "Rxy_kOhm"}, {"T", "T_mc"},
	} {
		c, err := d.Col(tc.ask)
		if err != nil || c.Name != tc.want {
			t.Errorf("Col(%q) = %v, %v; want %q", tc.ask, c, err, tc.want)
		}
	}
	if c, _ := d.Col("B"); c.Values[0] != 0.1 {
		t.Errorf("B = %v T, want 0.1", c.Values[0])
	}
	if c, _ := d.Col("Rxy"); c.Values[0] != 1000 {
		t.Errorf("Rxy = %v Ohm, want 1000", c.Values[0])
	}
}

// TestUnitMismatchIsError: a column whose unit is not what the analysis needs is an
// error, never a warning (volts are not ohms), and a text column is not a number.
func TestUnitMismatchIsError(t *testing.T) {
	t.Parallel()
	in := "field_T,X2_V,dir\n"
	for i := -10; i <= 10; i++ {
		dir := "up"
		if i > 0 {
			dir = "down"
		}
		in += strings.Join([]string{ftoa(float64(i) / 10), ftoa(-float64(i) * 1e-5), dir}, ",") + "\n"
	}
	d, err := Read("v.csv", strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ y, want string }{
		{"X2_V", `v.csv:1:9: column "X2_V" is in V, a voltage; expected a resistance (Ohm) (volts are not ohms: a layout's ` + "`derive:`" + ` turns it into R = V/I)`},
		{"dir", `v.csv:1:14: column "dir" holds text ("up", "down"), not a resistance (Ohm)`},
	} {
		_, err := HallDensity(d, "B", tc.y, 0, 1)
		if err == nil || err.Error() != tc.want || !errors.Is(err, ErrUnitDim) {
			t.Errorf("HallDensity(y=%s) error\n got %v\nwant %s", tc.y, err, tc.want)
		}
	}
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// TestParseMeta: keys are names, times of day are not separators.
func TestParseMeta(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		in   string
		want KV
	}{
		{"T: 0.30 K", KV{"T", "0.30 K"}},
		{"T = 0.30 K", KV{"T", "0.30 K"}},
		{"2024-05-02 14:22:05", KV{"", "2024-05-02 14:22:05"}},
		{"Started: 2024-05-02 14:22:05", KV{"Started", "2024-05-02 14:22:05"}},
		{"14:22 ramp started", KV{"", "14:22 ramp started"}},
		{"lock-in (A-B): 13 Hz", KV{"lock-in (A-B)", "13 Hz"}},
		{"a note, then: text", KV{"", "a note, then: text"}},
		{": nothing", KV{"", ": nothing"}},
	} {
		if got := parseMeta(tc.in); got != tc.want {
			t.Errorf("parseMeta(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}
