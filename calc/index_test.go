package calc

import (
	"runtime/debug"
	"strings"
	"testing"

	"cleave/calc/quantity"
)

// TestIndexing: items of lists by 0-based index (negative from the end) and fields of records
// by name, chained with field access as in sp.wells[0].n.
func TestIndexing(t *testing.T) {
	e := NewEnv()
	well := func(name string, n float64) *Record {
		return NewRecord("", "name", String(name), "n", Q(quantity.New(n, quantity.Length.Pow(-2))))
	}
	e.Set("sp", NewRecord("", "wells", List{well("channel", 3e15), well("doping well", 1e15)}))
	e.Set("l", List{num(10), num(20), num(30)})
	for _, tc := range []struct {
		expr, want string
	}{
		{"l[0]", "10.000"},
		{"l[2]", "30.000"},
		{"l[-1]", "30.000"},
		{"l[-3]", "10.000"},
		{"l[1 + 1]", "30.000"},
		{"[1, 2, 3][1] * 2", "4.0000"},
		{"sp.wells[0].n", "3.0000e11 cm^-2"},
		{"sp.wells[1].name", `"doping well"`},
		{`sp["wells"][-1]["n"]`, "1.0000e11 cm^-2"},
		{"sp.wells[0].n -> m^-2", "3.0000e15 m^-2"},
		{"l[0]^2", "100.00"},
	} {
		v, err := e.Eval(tc.expr)
		if err != nil {
			t.Errorf("%s: %v", tc.expr, err)
			continue
		}
		if got := Display(v); got != tc.want {
			t.Errorf("%s = %s, want %s", tc.expr, got, tc.want)
		}
	}
	for _, tc := range []struct{ expr, want string }{
		{"l[3]", "1:3: index 3 is out of range: the list has 3 items, indexes 0 to 2 (or -1 to -3 from the end)"},
		{"l[-4]", "1:3: index -4 is out of range"},
		{"l[0.5]", "1:3: a list index is a whole number such as 0 (the first item) or -1 (the last), found 0.50000"},
		{"l[1 T]", "1:3: a list index is a whole number"},
		{"[][0]", "1:4: index 0 is out of range: the list is empty"},
		{"5[0]", "1:2: [ ] indexes a list (or a record by a field name in quotes), found a quantity"},
		{`sp["well"]`, `1:4: no field "well" (did you mean wells?)`},
		{`l["n"]`, `1:3: a list has no fields (found ["n"])`},
		{"l[0", "1:4: expected ] to close the [ at column 2, found the end of the line"},
		{"sp.wells[]", "1:10: expected a number, name, string, ( or [, found \"]\""},
	} {
		_, err := e.Eval(tc.expr)
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want prefix %q", tc.expr, err, tc.want)
		}
	}
	// A long chain of indexes and field accesses is evaluated in a loop, with a small stack:
	// a record whose field a is a list holding the record itself.
	old := debug.SetMaxStack(256 << 10)
	defer debug.SetMaxStack(old)
	r := &Record{}
	r.Fields = []RecordField{{Name: "a", Value: List{r}}, {Name: "b", Value: num(3)}}
	e.Set("r", r)
	if v, err := e.Eval("r" + strings.Repeat(`["a"][0].a[-1]`, 250) + ".b"); err != nil || Display(v) != "3.0000" {
		t.Errorf("a chain of 1000 indexes and fields: %v, %v", v, err)
	}
}
