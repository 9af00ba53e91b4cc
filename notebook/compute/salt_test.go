package compute

import (
	"os"
	"os/exec"
	"strings"
	"testing"
)

// goBuildID reads the same build ID as the toolchain's own reader (`go tool buildid`), here
// on this test binary; EngineSalt is made from it.
func TestGoBuildIDMatchesToolchain(t *testing.T) {
	exe, err := os.Executable()
	if err != nil {
		t.Skip(err)
	}
	out, err := exec.Command("go", "tool", "buildid", exe).Output()
	if err != nil {
		t.Skipf("go tool buildid: %v", err)
	}
	want := strings.TrimSpace(string(out))
	if got := goBuildID(exe); got != want {
		t.Fatalf("goBuildID = %q, go tool buildid says %q", got, want)
	}
	if !strings.HasPrefix(EngineSalt(), Version+" id:") {
		t.Fatalf("EngineSalt = %q, want one made from the build ID", EngineSalt())
	}
}

// A file that is no executable has no build ID (the salt then falls back to hashing it whole).
func TestGoBuildIDNone(t *testing.T) {
	p := t.TempDir() + "/not-a-binary"
	os.WriteFile(p, []byte("#!/bin/sh\necho hello\n"), 0o755)
	if id := goBuildID(p); id != "" {
		t.Fatalf("goBuildID of a script = %q", id)
	}
	if id := goBuildID(p + "-missing"); id != "" {
		t.Fatalf("goBuildID of a missing file = %q", id)
	}
}
