package plot

import (
	"strings"
	"testing"
)

// TestValidName: plot names are a letter or digit, then up to 63 letters, digits, '_' or '-'
// (they become file names).
func TestValidName(t *testing.T) {
	for name, want := range map[string]bool{
		"rxx": true, "Rxx_2": true, "9-a": true, "a": true, strings.Repeat("a", 64): true,
		"": false, "_a": false, "-a": false, "a.b": false, "a/b": false, "a b": false, "é": false,
		strings.Repeat("a", 65): false, "..": false,
	} {
		if got := validName(name); got != want {
			t.Errorf("validName(%q) = %v, want %v", name, got, want)
		}
	}
}
