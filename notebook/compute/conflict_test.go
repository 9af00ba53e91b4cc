package compute

import (
	"strings"
	"testing"
	"testing/fstest"
)

// TestConflictMarkersRefused: a file left with merge-conflict markers is not evaluated and its
// bytes are not changed; the run names the file and the line. Lines that only look alike
// (a Markdown rule, a table of = signs) are not markers.
func TestConflictMarkersRefused(t *testing.T) {
	conflicted := "```cleave\n<<<<<<< HEAD\nx = 1 T  #~ 1 T\n=======\nx = 2 T  #~ 2 T\n>>>>>>> other\n```\n"
	tree := fstest.MapFS{
		"a.md":  {Data: []byte(conflicted)},
		"ok.md": {Data: []byte("Title\n=======\n\n```cleave\ny = 3 T\n```\n")}, // a heading underline
	}
	rep, err := Run(tree, nil, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Failures) != 1 || !strings.HasPrefix(rep.Failures[0].Error(), "a.md:2:1: unresolved merge conflict") {
		t.Fatalf("failures %v, want one for a.md line 2", rep.Failures)
	}
	for _, f := range rep.Files {
		if f.Path == "a.md" {
			t.Errorf("a.md was evaluated: %+v", f)
		}
	}
	for _, tc := range []struct {
		text string
		line int
		ok   bool
	}{
		{"a\n<<<<<<< HEAD\nb\n=======\nc\n>>>>>>> theirs\n", 2, true},
		{"<<<<<<< HEAD\r\n||||||| base\r\n=======\r\n>>>>>>> theirs", 1, true},
		{"=======\n", 0, false},                   // a heading underline alone
		{">>>>>>> x\n<<<<<<< y\n", 0, false},      // closed before opened
		{"<<<<<<<x\n>>>>>>>\n", 0, false},         // not a marker: no blank after the seven
		{"  <<<<<<< HEAD\n>>>>>>> b\n", 0, false}, // indented
		{"<<<<<<< HEAD\nnever closed\n", 0, false},
		{"", 0, false},
	} {
		line, ok := conflictMarker([]byte(tc.text))
		if line != tc.line || ok != tc.ok {
			t.Errorf("conflictMarker(%q) = %d, %v; want %d, %v", tc.text, line, ok, tc.line, tc.ok)
		}
	}
}
