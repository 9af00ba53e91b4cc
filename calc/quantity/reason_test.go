package quantity

import (
	"errors"
	"testing"
)

// Reason keeps what went wrong and drops the input and byte offset that Error repeats.
func TestReason(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"cold", "expected a number"},
		{"20 nmm", `unknown unit "nmm"`},
	} {
		_, err := ParseQuantity(c.in)
		if err == nil {
			t.Fatalf("ParseQuantity(%q) accepted", c.in)
		}
		got := Reason(err)
		if len(got) < len(c.want) || got[:len(c.want)] != c.want {
			t.Errorf("Reason(ParseQuantity(%q)) = %q, want it to start with %q", c.in, got, c.want)
		}
	}
	if got := Reason(errors.New("other")); got != "other" {
		t.Errorf("Reason of another error = %q", got)
	}
}
