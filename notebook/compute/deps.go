package compute

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io/fs"
	"strings"

	"cleave/calc"
	"cleave/calc/library"
	"cleave/notebook"
)

// depResolver gives the current values of dependencies (see depValue) for one worker of a
// run. Evaluating a field path needs a calc environment; one environment serves every file,
// its resolver switched to the file's entry before each lookup. Values are remembered for
// the run under a key naming what they are read from, so the many files that read the same
// ancestor field (every device's `piece.width`, the geometry of every device cut with one
// mask) resolve it once.
type depResolver struct {
	fsys fs.FS
	nb   *notebook.Notebook
	env  *calc.Env
	cur  *switchResolver
	memo map[depKey]depResult
}

type depKey struct {
	a, b *notebook.Entry
	n    any // a *yaml.Node, or nil
	dep  string
}

type depResult struct {
	v   string
	err error
}

// switchResolver passes lookups to the resolver of the current entry.
type switchResolver struct{ r *resolver }

func (s *switchResolver) Lookup(name string) (calc.Value, bool) { return s.r.Lookup(name) }

func newDepResolver(fsys fs.FS, nb *notebook.Notebook) *depResolver {
	cur := &switchResolver{}
	return &depResolver{
		fsys: fsys,
		nb:   nb,
		env:  library.NewEnv(calc.WithResolver(cur)),
		cur:  cur,
		memo: map[depKey]depResult{},
	}
}

// value is the current value of dep read by a file of entry e (nil for a file that is no
// entry).
func (d *depResolver) value(e *notebook.Entry, dep string) (string, error) {
	k := d.key(e, dep)
	if r, ok := d.memo[k]; ok {
		return r.v, r.err
	}
	v, err := d.compute(e, dep)
	d.memo[k] = depResult{v, err}
	return v, err
}

// key names what the value of dep depends on. A field path is read through the resolver of
// e, whose answer for the first name of the path depends on: for a kind name, only the
// nearest entry of that kind; for the geometry, only the device's as-built map and the mask
// chosen; for the entry's own field, e. The other kinds of dependency name their source.
func (d *depResolver) key(e *notebook.Entry, dep string) depKey {
	path, ok := strings.CutPrefix(dep, "field:")
	if !ok || strings.HasPrefix(path, "@") {
		return depKey{dep: dep}
	}
	if e == nil {
		return depKey{dep: dep, n: "no entry"}
	}
	first, _, _ := strings.Cut(path, ".")
	if first == "geometry" {
		src := geometrySources(d.nb, e)
		if src.asBuilt != nil {
			return depKey{a: src.dev, b: src.mask, dep: dep}
		}
		return depKey{b: src.mask, n: src.hasDev, dep: dep}
	}
	for _, k := range notebook.Kinds() {
		if string(k) == first {
			a, _ := d.nb.Nearest(e, k)
			return depKey{a: a, n: "kind", dep: dep}
		}
	}
	return depKey{a: e, dep: dep}
}

func (d *depResolver) compute(e *notebook.Entry, dep string) (string, error) {
	switch {
	case strings.HasPrefix(dep, "entry:"):
		// "entry:<id>:<dep>": a dependency of another entry that a scorecard evaluated.
		rest := strings.TrimPrefix(dep, "entry:")
		i := strings.Index(rest, ":")
		if i < 0 {
			return "", fmt.Errorf("bad dependency %q", dep)
		}
		o, ok := d.nb.Entry(rest[:i])
		if !ok {
			return "", fmt.Errorf("dependency %q: no entry %s", dep, rest[:i])
		}
		if _, ok := d.nb.File(o.Path); !ok {
			return "", fmt.Errorf("dependency %q: no file for %s", dep, rest[:i])
		}
		return d.value(o, rest[i+1:])
	case strings.HasPrefix(dep, "lineage:"):
		// "lineage:<id>": the cooldowns that measured devices cut from that entry.
		o, ok := d.nb.Entry(strings.TrimPrefix(dep, "lineage:"))
		if !ok {
			return "", fmt.Errorf("dependency %q: no such entry", dep)
		}
		var ids []string
		for _, c := range newResolver(d.fsys, d.nb, o, 0).measuredBy() {
			ids = append(ids, c.ID)
		}
		return strings.Join(ids, ","), nil
	case strings.HasPrefix(dep, "field:@"):
		// "field:@<id>.<field>": a front-matter field of another entry.
		rest := strings.TrimPrefix(dep, "field:@")
		id, field, _ := strings.Cut(rest, ".")
		o, ok := d.nb.Entry(id)
		if !ok {
			return "", fmt.Errorf("dependency %q: no entry %s", dep, id)
		}
		n, ok := o.Field(field)
		if !ok {
			return "", nil
		}
		return calc.Display(nodeValue(n, field)), nil
	case strings.HasPrefix(dep, "field:"):
		d.cur.r = newResolver(d.fsys, d.nb, e, 0)
		v, err := d.env.Eval(strings.TrimPrefix(dep, "field:"))
		d.cur.r = nil
		if err != nil {
			// A name the entry does not have (yet) is a value too: the lines that read it
			// failed, and stay failed until it appears, which changes this text.
			return "no value: " + err.Error(), nil
		}
		return calc.Display(v), nil
	case strings.HasPrefix(dep, "file:"):
		b, err := fs.ReadFile(d.fsys, strings.TrimPrefix(dep, "file:"))
		if err != nil {
			return "", err
		}
		sum := sha256.Sum256(b)
		return "sha256:" + hex.EncodeToString(sum[:]), nil
	}
	return "", fmt.Errorf("unknown dependency %q", dep)
}
