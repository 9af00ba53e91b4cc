package calc

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

// mapResolver is a notebook stand-in: an invented device D-7 on piece P-3 of wafer W-2.
type mapResolver map[string]Value

func (m mapResolver) Lookup(name string) (Value, bool) { v, ok := m[name]; return v, ok }
func (m mapResolver) Names() []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	return out
}

func demoResolver(t *testing.T) mapResolver {
	t.Helper()
	mustQ := func(s string) Value {
		q, err := quantity.ParseQuantity(s)
		if err != nil {
			t.Fatal(err)
		}
		return Q(q)
	}
	return mapResolver{
		"device": NewRecord("", "width", mustQ("100 um"), "length", mustQ("500 um"),
			"mask", NewRecord("", "name", String("HB-100"), "arm", mustQ("10 um"))),
		"width": mustQ("100 um"),
	}
}

// TestDeps checks that reading notebook fields records their paths.
func TestDeps(t *testing.T) {
	e := NewEnv(WithResolver(demoResolver(t)))
	lines := []string{
		"sq = device.length / device.width",
		"w = width",
		"a = device.mask.arm",
		"r = 50 Ohm / sq",
	}
	for i, l := range lines {
		if r := e.EvalLine(l, i+1); r.Err != nil {
			t.Fatalf("%s: %v", l, r.Err)
		}
	}
	q := evalQ(t, e, "r")
	if got, _ := q.In(quantity.MustUnit("Ohm")); !testutil.WithinRel(got, 10, 1e-12) {
		t.Errorf("r = %g Ohm, want 10 (50 Ohm over 5 squares)", got)
	}
	// A misspelt field names the record and suggests the right one.
	r := e.EvalLine("device.widht", 9)
	if r.Err == nil || !strings.Contains(r.Err.Error(), `device has no field "widht" (did you mean width?)`) {
		t.Errorf("got %v", r.Err)
	}
	// Unknown names are suggested from the resolver too.
	r = e.EvalLine("devise.width", 10)
	if r.Err == nil || !strings.Contains(r.Err.Error(), "did you mean device?") {
		t.Errorf("got %v", r.Err)
	}
}

func sha(b string) string {
	s := sha256.Sum256([]byte(b))
	return "sha256:" + hex.EncodeToString(s[:])
}

// TestOpenData checks data path resolution, refusal of paths that leave the notebook, the
// dependency with its content hash, and the data loader option.
func TestOpenData(t *testing.T) {
	csv := "B_T,Rxy_Ohm\n0,0\n1,2080.5\n"
	fsys := fstest.MapFS{
		"cooldowns/cd-01/raw/hall.csv": {Data: []byte(csv)},
		"shared/cal.csv":               {Data: []byte("x\n1\n")},
		"cooldowns/cd-01/link.csv":     {Data: []byte("../../shared/cal.csv"), Mode: fs.ModeSymlink},
		"cooldowns/cd-01/escape.csv":   {Data: []byte("../../../outside.csv"), Mode: fs.ModeSymlink},
		"cooldowns/cd-01/abs.csv":      {Data: []byte("/etc/hosts"), Mode: fs.ModeSymlink},
	}
	tests := []struct {
		arg     string
		want    string // resolved path, or "" for an error
		wantErr error
	}{
		{"raw/hall.csv", "cooldowns/cd-01/raw/hall.csv", nil},
		{"./raw/../raw/hall.csv", "cooldowns/cd-01/raw/hall.csv", nil},
		{"../../shared/cal.csv", "shared/cal.csv", nil},
		{"link.csv", "cooldowns/cd-01/link.csv", nil},
		{"../../../outside.csv", "", ErrPath},
		{"/etc/passwd", "", ErrPath},
		{`C:\data\x.csv`, "", ErrPath},
		{`raw\hall.csv`, "", ErrPath},
		{"escape.csv", "", ErrPath},
		{"abs.csv", "", ErrPath},
		{"raw/missing.csv", "", nil},
	}
	for _, tc := range tests {
		e := NewEnv(WithFS(fsys, "cooldowns/cd-01"))
		v, err := e.OpenData(tc.arg)
		if tc.want == "" {
			if err == nil {
				t.Errorf("OpenData(%q) = %v, want an error", tc.arg, Display(v))
				continue
			}
			if tc.wantErr != nil && !errors.Is(err, tc.wantErr) {
				t.Errorf("OpenData(%q): %v, want %v", tc.arg, err, tc.wantErr)
			}
			continue
		}
		if err != nil {
			t.Errorf("OpenData(%q): %v", tc.arg, err)
			continue
		}
		df, ok := v.(*DataFile)
		if !ok || df.Path != tc.want {
			t.Errorf("OpenData(%q) = %#v, want path %s", tc.arg, v, tc.want)
			continue
		}
		b, _ := fs.ReadFile(fsys, "cooldowns/cd-01/raw/hall.csv")
		if tc.want == "cooldowns/cd-01/raw/hall.csv" && df.Hash != sha(string(b)) {
			t.Errorf("hash %s, want %s", df.Hash, sha(string(b)))
		}
	}

	// A data loader receives the notebook path and the bytes; its value is OpenData's.
	countLines := func(name string, r io.Reader) (Value, error) {
		b, err := io.ReadAll(r)
		if err != nil {
			return nil, err
		}
		return NewRecord("", "name", String(name), "lines", Q(quantity.Scalar(float64(strings.Count(string(b), "\n"))))), nil
	}
	e := NewEnv(WithFS(fsys, "cooldowns/cd-01"), WithDataLoader(countLines))
	v, err := e.OpenData("raw/hall.csv")
	if err != nil {
		t.Fatal(err)
	}
	if got := Display(v); got != `name="cooldowns/cd-01/raw/hall.csv", lines=3.0000` {
		t.Errorf("loader gave %s, want the path and 3 lines", got)
	}
	// Without a notebook folder, nothing can be read, and a bad path is said first.
	if _, err := NewEnv().OpenData("raw/hall.csv"); err == nil || !strings.Contains(err.Error(), "no notebook folder is open") {
		t.Errorf("no folder: %v", err)
	}
	if _, err := NewEnv().OpenData("/etc/passwd"); !errors.Is(err, ErrPath) {
		t.Errorf("no folder, absolute path: %v, want ErrPath", err)
	}
}

// TestDataSymlinkOnDisk checks the link rule on a real directory through os.DirFS.
func TestDataSymlinkOnDisk(t *testing.T) {
	outside := t.TempDir()
	root := t.TempDir()
	if err := os.WriteFile(filepath.Join(outside, "secret.csv"), []byte("s\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Join(root, "e"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(root, "e", "ok.csv"), []byte("ok\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(outside, "secret.csv"), filepath.Join(root, "e", "out.csv")); err != nil {
		t.Skipf("symlinks unavailable: %v", err)
	}
	if err := os.Symlink("ok.csv", filepath.Join(root, "e", "in.csv")); err != nil {
		t.Fatal(err)
	}
	e := NewEnv(WithFS(os.DirFS(root), "e"))
	if _, err := e.OpenData("out.csv"); !errors.Is(err, ErrPath) {
		t.Errorf("link to outside: err = %v, want ErrPath", err)
	}
	v, err := e.OpenData("in.csv")
	if err != nil {
		t.Fatalf("link inside: %v", err)
	}
	if df := v.(*DataFile); df.Hash != sha("ok\n") {
		t.Errorf("hash %s, want %s", df.Hash, sha("ok\n"))
	}
}

// TestRegister checks argument matching for a user-registered function: positional then
// named, defaults, variadic, and the error messages naming the parameters.
func TestRegister(t *testing.T) {
	e := NewEnv()
	e.Register(Func{Name: "lin", Params: []Param{{Name: "a"}, {Name: "b", Default: Q(quantity.Scalar(10))}},
		Call: func(_ *Env, args []Value) (Value, error) {
			a, ok := args[0].(Quantity)
			if !ok {
				return nil, &ArgError{Arg: 0, Err: fmt.Errorf("%w: needs a quantity, found a %s", ErrType, args[0].Type())}
			}
			b, ok := args[1].(Quantity)
			if !ok {
				return nil, &ArgError{Arg: 1, Err: fmt.Errorf("%w: needs a quantity, found a %s", ErrType, args[1].Type())}
			}
			return Q(quantity.Mul(a.Q, b.Q)), nil
		}})
	for _, tc := range []struct {
		expr string
		want float64
	}{{"lin(2)", 20}, {"lin(2, 3)", 6}, {"lin(b=4, a=2)", 8}, {"lin(2, b=5)", 10}} {
		if got := evalQ(t, e, tc.expr).Value(); got != tc.want {
			t.Errorf("%s = %g, want %g", tc.expr, got, tc.want)
		}
	}
	for _, tc := range []struct{ expr, msg string }{
		{"lin()", "missing argument a: lin(a, b=10)"},
		{"lin(1, 2, 3)", "too many arguments"},
		{"lin(1, a=2)", "argument a given twice"},
		{"lin(c=1)", `lin has no parameter "c"`},
		{`lin("x")`, "needs a quantity, found a string"},
	} {
		_, err := e.Eval(tc.expr)
		if err == nil || !strings.Contains(err.Error(), tc.msg) {
			t.Errorf("%s: %v, want %q", tc.expr, err, tc.msg)
		}
	}
}
