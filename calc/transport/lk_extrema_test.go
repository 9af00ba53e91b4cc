package transport

import (
	"strings"
	"testing"
)

// TestLargeAmplitude: the warning appears once an extremum's |ΔR|/R_0 passes 0.5, names the
// largest, and advises the highest field up to which every extremum stays below the bound.
func TestLargeAmplitude(t *testing.T) {
	t.Parallel()
	ext := func(b, dr, r0 float64) Extremum { return Extremum{B: b, Value: Estimate{dr, 0.01}, Background: r0} }
	cases := []struct {
		name string
		es   []Extremum
		want []string // substrings of the message; nil for no warning
	}{
		{"none", nil, nil},
		{"all small", []Extremum{ext(0.2, 1, 100), ext(0.3, -20, 100), ext(0.4, 49, 100)}, nil},
		{"at the bound", []Extremum{ext(0.4, -50, 100)}, nil},
		{"one large, out of order", []Extremum{ext(0.5, -80, 100), ext(0.2, 5, 100), ext(0.3, 30, 100)},
			[]string{"reaches 0.8 at 0.5 T", "up to 0.3 T"}},
		{"the first is large", []Extremum{ext(0.2, 60, 100), ext(0.3, 10, 100)},
			[]string{"reaches 0.6 at 0.2 T", "start the window lower"}},
		{"no background", []Extremum{ext(0.2, 60, 0)}, nil},
	}
	for _, c := range cases {
		w := largeAmplitude(c.es)
		switch {
		case c.want == nil && w != nil:
			t.Errorf("%s: unexpected warning %v", c.name, *w)
		case c.want != nil && w == nil:
			t.Errorf("%s: no warning", c.name)
		case w != nil:
			if w.Code != WarnLargeAmplitude {
				t.Errorf("%s: code %q", c.name, w.Code)
			}
			for _, s := range c.want {
				if !strings.Contains(w.Msg, s) {
					t.Errorf("%s: %q lacks %q", c.name, w.Msg, s)
				}
			}
		}
	}
}
