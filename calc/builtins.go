package calc

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"path"
	"strings"

	"cleave/calc/quantity"
)

// DataLoader, when set, turns the bytes of a data file into a value (a data set); name is
// the slash path inside the notebook. Its errors must name the file and the position in it
// ("name:line:col: message"); they are shown as they are. The data-file reader registers
// itself here; while it is nil, data("path") returns a *DataFile.
var DataLoader func(name string, r io.Reader) (Value, error)

var scalar = quantity.Dimensionless

func registerBuiltins(e *Env) {
	oneArg := func(name, doc string, f func(q quantity.Quantity) (quantity.Quantity, error)) {
		e.Register(Func{Name: name, Doc: doc, Params: []Param{{Name: "x"}},
			Call: func(_ *Env, args []Value) (Value, error) {
				q, err := argQuantity(args, 0)
				if err != nil {
					return nil, err
				}
				r, err := f(q)
				if err != nil {
					return nil, &ArgError{Arg: 0, Err: err}
				}
				return Q(r), nil
			}})
	}
	dimless := func(name, doc string, f, df func(float64) float64, domain func(float64) bool) {
		oneArg(name, doc, func(q quantity.Quantity) (quantity.Quantity, error) {
			if !q.Dim().IsDimensionless() {
				return q, fmt.Errorf("needs a dimensionless argument, found %s", dimName(q.Dim()))
			}
			if domain != nil && !domain(q.Value()) {
				return q, fmt.Errorf("argument %g is outside the domain", q.Value())
			}
			return quantity.Apply(q, f, df)
		})
	}
	oneArg("sqrt", "square root; the dimension exponents must be even", func(q quantity.Quantity) (quantity.Quantity, error) {
		if q.Value() < 0 {
			return q, fmt.Errorf("square root of a negative number (%g)", q.Value())
		}
		return quantity.Sqrt(q)
	})
	dimless("exp", "e^x of a dimensionless x", math.Exp, math.Exp, nil)
	dimless("ln", "natural logarithm of a dimensionless x > 0", math.Log, func(x float64) float64 { return 1 / x },
		func(x float64) bool { return x > 0 })
	dimless("log10", "base-10 logarithm of a dimensionless x > 0", math.Log10,
		func(x float64) float64 { return 1 / (x * math.Ln10) }, func(x float64) bool { return x > 0 })
	dimless("sin", "sine of an angle in radians (dimensionless)", math.Sin, math.Cos, nil)
	dimless("cos", "cosine of an angle in radians (dimensionless)", math.Cos, func(x float64) float64 { return -math.Sin(x) }, nil)
	dimless("tanh", "hyperbolic tangent of a dimensionless x", math.Tanh,
		func(x float64) float64 { c := math.Cosh(x); return 1 / (c * c) }, nil)
	oneArg("abs", "absolute value", func(q quantity.Quantity) (quantity.Quantity, error) {
		if q.Value() < 0 {
			return q.Neg(), nil
		}
		return q, nil
	})

	pick := func(name, doc string, better func(a, b float64) bool) {
		e.Register(Func{Name: name, Doc: doc, Variadic: true, Params: []Param{{Name: "xs"}},
			Call: func(_ *Env, args []Value) (Value, error) {
				qs, err := quantityList(args[0], name)
				if err != nil {
					return nil, err
				}
				best := qs[0]
				for _, q := range qs[1:] {
					if better(q.Value(), best.Value()) {
						best = q
					}
				}
				return Q(best), nil
			}})
	}
	pick("min", "smallest of its arguments (or of one list); all of one dimension", func(a, b float64) bool { return a < b })
	pick("max", "largest of its arguments (or of one list); all of one dimension", func(a, b float64) bool { return a > b })
	e.Register(Func{Name: "mean", Doc: "arithmetic mean of its arguments (or of one list), uncertainties propagated with their correlations",
		Variadic: true, Params: []Param{{Name: "xs"}},
		Call: func(_ *Env, args []Value) (Value, error) {
			qs, err := quantityList(args[0], "mean")
			if err != nil {
				return nil, err
			}
			sum := qs[0]
			for _, q := range qs[1:] {
				sum, _ = quantity.Add(sum, q) // dimensions checked by quantityList
			}
			return Q(sum.Scale(1 / float64(len(qs)))), nil
		}})
	e.Register(Func{Name: "data", Doc: "a data file, by a path relative to the entry's folder inside the notebook",
		Params: []Param{{Name: "path"}},
		Call: func(e *Env, args []Value) (Value, error) {
			s, ok := args[0].(String)
			if !ok {
				return nil, &ArgError{Arg: 0, Err: fmt.Errorf("%w: needs a string path, found a %s", ErrType, args[0].Type())}
			}
			v, err := e.OpenData(string(s))
			if err != nil {
				return nil, &ArgError{Arg: 0, Err: err}
			}
			return v, nil
		}})
	registerPhysics(e)
}

func argQuantity(args []Value, i int) (quantity.Quantity, error) {
	q, ok := args[i].(Quantity)
	if !ok {
		return quantity.Quantity{}, &ArgError{Arg: i, Err: fmt.Errorf("%w: needs a quantity, found a %s", ErrType, args[i].Type())}
	}
	return q.Q, nil
}

func quantityList(v Value, name string) ([]quantity.Quantity, error) {
	l, ok := v.(List)
	if !ok {
		l = List{v}
	}
	if len(l) == 0 {
		return nil, &ArgError{Arg: 0, Err: fmt.Errorf("%w: needs at least one value", ErrArgument)}
	}
	out := make([]quantity.Quantity, len(l))
	for i, x := range l {
		q, ok := x.(Quantity)
		if !ok {
			return nil, &ArgError{Arg: 0, Err: fmt.Errorf("%w: element %d is a %s, not a quantity", ErrType, i+1, x.Type())}
		}
		if i > 0 && q.Q.Dim() != out[0].Dim() {
			return nil, &ArgError{Arg: 0, Err: &quantity.DimError{Op: name, Left: out[0].Dim(), Right: q.Q.Dim()}}
		}
		out[i] = q.Q
	}
	return out, nil
}

// maxLinkHops bounds how many symbolic links one data path may pass through.
const maxLinkHops = 40

// OpenData resolves p (slash-separated, relative to the entry's directory) inside the
// notebook FS, reads it, records the dependency "file:<path>" with its SHA-256, and returns
// DataLoader's value (or a *DataFile while no loader is set).
//
// Refused, with ErrPath: absolute paths (leading '/', '\' or a drive letter), paths with
// backslashes, paths that leave the notebook root after cleaning "..", and symbolic links
// whose target is absolute or leaves the root. Links are checked with fs.ReadLink, so the
// check needs an FS that implements fs.ReadLinkFS (os.DirFS and fstest.MapFS do); an FS
// without it is trusted not to follow links out of its root (an os.Root's FS never does).
func (e *Env) OpenData(p string) (Value, error) {
	if e.fsys == nil {
		if err := checkDataPath(p); err != nil {
			return nil, err // a bad path is the first thing to say
		}
		return nil, fmt.Errorf("no notebook folder is open, so data(%s) cannot be read", quoteString(p))
	}
	name, real, err := e.resolveDataPath(p)
	if err != nil {
		return nil, err
	}
	b, err := fs.ReadFile(e.fsys, real)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, fmt.Errorf("data file %s does not exist", name)
		}
		return nil, fmt.Errorf("reading data file %s: %w", name, err)
	}
	sum := sha256.Sum256(b)
	hash := "sha256:" + hex.EncodeToString(sum[:])
	e.addDep("file:"+name, hash)
	if DataLoader != nil {
		v, err := DataLoader(name, strings.NewReader(string(b)))
		if err != nil {
			return nil, err // DataLoader's errors name the file and the position in it
		}
		return v, nil
	}
	return &DataFile{Path: name, Hash: hash, Size: len(b)}, nil
}

// resolveDataPath returns the cleaned notebook path of p and the path with symbolic links
// resolved.
func (e *Env) resolveDataPath(p string) (string, string, error) {
	return ResolveDataPath(e.fsys, e.dir, p)
}

// ResolveDataPath applies the rule every data path of a notebook follows (data("...") in calc
// blocks, a cooldown's `data:` list): p is a slash path relative to dir (a slash path inside
// fsys, "" or "." for the root); it may not be absolute, use backslashes, or leave the root
// after cleaning "..", and symbolic links on the way may not point outside (checked when
// fsys implements fs.ReadLinkFS). It returns the cleaned path and the path with links
// resolved; errors wrap ErrPath and say what was expected. The file need not exist.
func ResolveDataPath(fsys fs.FS, dir, p string) (name, real string, err error) {
	if err := checkDataPath(p); err != nil {
		return "", "", err
	}
	if dir == "" {
		dir = "."
	}
	name = path.Clean(path.Join(dir, p))
	if !inside(name) {
		return "", "", fmt.Errorf("%w: %q leaves the notebook folder", ErrPath, p)
	}
	real, err = followLinks(fsys, name, p)
	return name, real, err
}

// checkDataPath refuses paths that cannot be relative slash paths.
func checkDataPath(p string) error {
	switch {
	case p == "":
		return fmt.Errorf("%w: empty path", ErrPath)
	case strings.HasPrefix(p, "/") || strings.HasPrefix(p, `\`) || len(p) >= 2 && p[1] == ':':
		return fmt.Errorf("%w: %q is absolute; write a path relative to the entry", ErrPath, p)
	case strings.Contains(p, `\`):
		return fmt.Errorf("%w: %q contains a backslash; use / between folders", ErrPath, p)
	case strings.ContainsRune(p, 0):
		return fmt.Errorf("%w: %q contains a NUL byte", ErrPath, p)
	}
	return nil
}

func inside(name string) bool {
	return name != ".." && !strings.HasPrefix(name, "../") && !path.IsAbs(name)
}

// followLinks walks name component by component, replacing symbolic links by their
// targets, and fails if a target is absolute or leaves the root.
func followLinks(fsys fs.FS, name, orig string) (string, error) {
	if _, ok := fsys.(fs.ReadLinkFS); !ok || name == "." {
		return name, nil
	}
	hops := 0
	parts := strings.Split(name, "/")
	done := "."
	for len(parts) > 0 {
		cur := path.Join(done, parts[0])
		parts = parts[1:]
		fi, err := fs.Lstat(fsys, cur)
		if err != nil || fi.Mode()&fs.ModeSymlink == 0 {
			done = cur // missing files are reported when they are read
			continue
		}
		hops++
		if hops > maxLinkHops {
			return "", fmt.Errorf("%w: %q passes through more than %d symbolic links", ErrPath, orig, maxLinkHops)
		}
		target, err := fs.ReadLink(fsys, cur)
		if err != nil {
			return "", fmt.Errorf("reading link %s: %w", cur, err)
		}
		if path.IsAbs(target) || strings.HasPrefix(target, `\`) || len(target) >= 2 && target[1] == ':' {
			return "", fmt.Errorf("%w: %q is a symbolic link to an absolute path, outside the notebook", ErrPath, cur)
		}
		next := path.Clean(path.Join(done, target))
		if !inside(next) {
			return "", fmt.Errorf("%w: %q is a symbolic link that leaves the notebook folder", ErrPath, cur)
		}
		// restart from the root with the link replaced by its target
		parts = append(strings.Split(next, "/"), parts...)
		done = "."
	}
	return done, nil
}
