package notebook

import (
	"regexp"
	"testing"
)

// idSpec is the id rule as a regular expression, the reference ValidID is checked against.
var idSpec = regexp.MustCompile(`^[A-Za-z0-9_-][A-Za-z0-9._-]*$`)

func TestValidID(t *testing.T) {
	for id, want := range map[string]bool{
		"W24-031": true, "W24-031-A-HB1": true, "CD24-001": true, "a": true, "_x": true, "-x": true, "v1.2": true, "x.": true,
		"": false, ".hidden": false, "a b": false, "a/b": false, "é": false, "a\n": false, "a\x00": false, "a:b": false,
	} {
		if got := ValidID(id); got != want {
			t.Errorf("ValidID(%q) = %v, want %v", id, got, want)
		}
	}
}

// FuzzValidID: ValidID agrees with the rule written as a regular expression on any input.
func FuzzValidID(f *testing.F) {
	for _, s := range []string{"W24-031", ".x", "", "a b", "é", "a.b_c-d"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, id string) {
		if got, want := ValidID(id), idSpec.MatchString(id); got != want {
			t.Errorf("ValidID(%q) = %v, the rule says %v", id, got, want)
		}
	})
}
