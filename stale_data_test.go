package main

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestCheckAfterDataEdit changes one R_xx value of a demo data file, the way a re-exported
// file might differ: check fails and lists the data line (its content hash changed) and the
// lines whose values follow from R_xx in the SdH window, and no line of another cooldown;
// calc brings them up to date and check passes again.
func TestCheckAfterDataEdit(t *testing.T) {
	src := demoNotebook(t)
	dir := filepath.Join(t.TempDir(), "copy")
	if err := os.CopyFS(dir, os.DirFS(src)); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "cooldowns", "data", "CD24-001", "hb1_pm1.5T_0.30K.csv")
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(b), "\n")
	edited := false
	for i, l := range lines {
		f := strings.Split(l, ",")
		if len(f) < 3 || f[0] != "-0.252" {
			continue
		}
		rxx, err := strconv.ParseFloat(f[1], 64)
		if err != nil {
			t.Fatalf("line %d: %v", i+1, err)
		}
		f[1] = strconv.FormatFloat(rxx*1.5, 'g', -1, 64) // one point inside the SdH (0.12–0.45 T) and Dingle (0.12–0.32 T) windows
		lines[i] = strings.Join(f, ",")
		edited = true
		break
	}
	if !edited {
		t.Fatal("no row at B = -0.252 T in the demo sweep")
	}
	if err := os.WriteFile(p, []byte(strings.Join(lines, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := cleave(t, "-C", dir, "check")
	if code != 1 {
		t.Fatalf("check after editing a data file: exit %d, want 1\n%s", code, out)
	}
	for _, want := range []string{
		"sha256:",   // the data line: its content hash changed
		"frequency", // sdh = sdh_density(...)
		"tau_q",     // tq = quantum_lifetime(...), which reads R_xx in the same window
	} {
		found := false
		for _, l := range strings.Split(out, "\n") {
			if strings.HasPrefix(l, "cooldowns/CD24-001.md:") && strings.Contains(l, want) && strings.Contains(l, "→") {
				found = true
			}
		}
		if !found {
			t.Errorf("check does not list a stale CD24-001 line with %q:\n%s", want, out)
		}
	}
	for _, other := range []string{"CD24-002", "CD24-003", "CD24-004"} {
		if strings.Contains(out, "cooldowns/"+other+".md:") {
			t.Errorf("a line of %s, which does not read the edited file, is listed:\n%s", other, out)
		}
	}
	if code, out, errs := cleave(t, "-C", dir, "calc"); code != 0 {
		t.Fatalf("calc: exit %d\n%s%s", code, out, errs)
	}
	if code, out, _ := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("check after calc: exit %d\n%s", code, out)
	}
}
