package calc

import (
	"testing"

	"cleave/calc/quantity"
)

// A name is read the same whether written as text or as a bare number.
func TestNameText(t *testing.T) {
	length, err := quantity.ParseQuantity("5 um")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		v    Value
		want string
	}{
		{String("2"), "2"},
		{Q(quantity.Scalar(2)), "2"},
		{Q(quantity.Scalar(2.5)), "2.5"},
		{String(" top "), " top "},
		{nil, ""},
		{Q(length), Display(Q(length))},
	} {
		if got := NameText(c.v); got != c.want {
			t.Errorf("NameText(%#v) = %q, want %q", c.v, got, c.want)
		}
	}
}
