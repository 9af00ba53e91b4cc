package notebook

import (
	"strings"
	"testing"
	"testing/fstest"
)

// TestWrongKindLinkIsNoEdge: a cooldown whose `devices:` names a wafer is invalid, and the
// link is not a lineage edge: the cooldown has no parent, the wafer no child, the cooldown's
// nearest wafer is none (so `wafer.…` in its blocks cannot read the wafer), and the tree does
// not list it under the wafer.
func TestWrongKindLinkIsNoEdge(t *testing.T) {
	nb, err := Load(fstest.MapFS{
		"wafers/W1.md":    {Data: []byte("---\nid: W1\nkind: wafer\n---\n")},
		"cooldowns/C1.md": {Data: []byte("---\nid: C1\nkind: cooldown\ndevices: [W1]\n---\n")},
	})
	if err != nil {
		t.Fatal(err)
	}
	c, _ := nb.Entry("C1")
	w, _ := nb.Entry("W1")
	if ps := nb.Parents(c); len(ps) != 0 {
		t.Errorf("cooldown's parents %v, want none", ps)
	}
	if cs := nb.Children(w); len(cs) != 0 {
		t.Errorf("wafer's children %v, want none", cs)
	}
	if a, ok := nb.Nearest(c, KindWafer); ok {
		t.Errorf("nearest wafer of the cooldown is %s, want none", a.ID)
	}
	var b strings.Builder
	if err := nb.Tree(&b, "W1"); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(b.String(), "C1") {
		t.Errorf("tree of W1 lists C1:\n%s", b.String())
	}
	found := false
	for _, p := range nb.Validate() {
		if p.Path == "cooldowns/C1.md" && strings.Contains(p.Msg, `"W1" is a wafer`) {
			found = true
		}
	}
	if !found {
		t.Errorf("validate does not report the link: %v", nb.Validate())
	}
}
