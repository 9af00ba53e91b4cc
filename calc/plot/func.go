package plot

import (
	"fmt"
	"path"
	"regexp"
	"strings"
	"sync"

	"cleave/calc"
	"cleave/calc/library"
	"cleave/calc/quantity"
)

// Dir is the folder, next to an entry, that holds the SVG files of its plot(...) lines: the
// tool owns it (`cleave calc` writes and removes files there).
const Dir = "plots"

// Figure is the value of a plot(...) line: the picture and the path `cleave calc` writes it
// to, relative to the entry's folder (plots/<entry file name>/<name>.svg). Its result region
// shows that path and the first 12 hex digits of the SVG's SHA-256, so a changed picture is a
// changed result line and `cleave check` can tell whether the file on disk is the one the
// block draws.
type Figure struct {
	Path string
	Name string
	*Picture
}

// Type implements calc.Value.
func (*Figure) Type() string { return "plot" }

// Display is the result-region text: `plot PATH sha256:HASH12`.
func (f *Figure) Display() string { return "plot " + f.Path + " sha256:" + f.Hash()[:12] }

// Field gives the path, name and kind of the figure.
func (f *Figure) Field(name string) (calc.Value, bool) {
	switch name {
	case "path":
		return calc.String(f.Path), true
	case "name":
		return calc.String(f.Name), true
	case "kind":
		return calc.String(f.Kind), true
	}
	return nil, false
}

// FieldNames implements calc.Fielder.
func (f *Figure) FieldNames() []string { return []string{"path", "name", "kind"} }

// resultPattern is compiled when first used, not at start-up.
var resultPattern = sync.OnceValue(func() *regexp.Regexp {
	return regexp.MustCompile(`^plot (` + Dir + `/[^\s/]+/[A-Za-z0-9][A-Za-z0-9_.-]*\.svg) sha256:([0-9a-f]{12})$`)
})

// ParseResult reads a result region that a plot line wrote: the SVG's path relative to the
// entry's folder and the short hash. ok is false for any other text.
func ParseResult(text string) (path, hash string, ok bool) {
	m := resultPattern().FindStringSubmatch(strings.TrimSpace(text))
	if m == nil || strings.Contains(m[1], "..") {
		return "", "", false
	}
	return m[1], m[2], true
}

// FilePath is where the plot named name of the entry file at entryPath (a slash path) is
// written, relative to the entry's folder.
func FilePath(entryPath, name string) string {
	stem := strings.TrimSuffix(path.Base(entryPath), path.Ext(entryPath))
	if entryPath == "" || stem == "" || stem == "." || stem == "/" {
		stem = "plot"
	}
	return Dir + "/" + stem + "/" + name + ".svg"
}

// validName reports whether name can name a plot file: a letter or digit, then up to 63
// letters, digits, '_' or '-'.
func validName(name string) bool {
	if len(name) == 0 || len(name) > 64 {
		return false
	}
	for i := 0; i < len(name); i++ {
		c := name[i]
		switch {
		case 'A' <= c && c <= 'Z', 'a' <= c && c <= 'z', '0' <= c && c <= '9':
		case i > 0 && (c == '_' || c == '-'):
		default:
			return false
		}
	}
	return true
}

// Func is the calc function plot(x, name, n=, expected=, title=) of the entry file at
// entryPath: it draws x (see [Draw]) and returns a [*Figure] named name (by default the kind
// of figure). It writes nothing: `cleave calc` writes the SVG after the run.
func Func(entryPath string) calc.Func {
	return calc.Func{
		Name: "plot",
		Doc: "draws a value as an SVG that `cleave calc` writes to plots/<entry>/<name>.svg next to the entry: a sweep (with n= its filling factors and R_K/nu), " +
			"a fit (Hall, SdH spectrum, Dingle, LK mass, Landau fan, gate, mobility), a band result, a scorecard (with expected=), a density (its Landau fan), a mask or geometry (its Hall bar)",
		Params: []calc.Param{{Name: "x"}, {Name: "name", Default: calc.String("")}, {Name: "n", Default: calc.String("none")},
			{Name: "expected", Default: calc.String("none")}, {Name: "title", Default: calc.String("")}},
		Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
			var opt Options
			name, ok := a[1].(calc.String)
			if !ok {
				return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: name must be a string such as \"rxx\"", calc.ErrArgument)}
			}
			if name != "" && !validName(string(name)) {
				return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: name %q: letters, digits, _ and - only (at most 64, starting with a letter or digit)", calc.ErrArgument, string(name))}
			}
			if q, ok := a[2].(calc.Quantity); ok {
				if q.Q.Dim() != quantity.Length.Pow(-2) {
					return nil, &calc.ArgError{Arg: 2, Err: fmt.Errorf("%w: n must be a density, found %s", calc.ErrArgument, q.Q.Dim())}
				}
				opt.Density = q.Q.Value()
			} else if s, ok := a[2].(calc.String); !ok || s != "none" {
				return nil, &calc.ArgError{Arg: 2, Err: fmt.Errorf("%w: n must be a density such as n_H", calc.ErrArgument)}
			}
			switch e := a[3].(type) {
			case calc.Quantity:
				if e.Q.Dim() != quantity.Length.Pow(-2) {
					return nil, &calc.ArgError{Arg: 3, Err: fmt.Errorf("%w: expected must be a density or an expected_density result, found %s", calc.ErrArgument, e.Q.Dim())}
				}
				opt.Expected = e.Q.Value()
			case *calc.AnalysisResult:
				bd, ok := e.Detail.(*library.BandDetail)
				if !ok {
					return nil, &calc.ArgError{Arg: 3, Err: fmt.Errorf("%w: expected must be a density or an expected_density result, found a %s", calc.ErrArgument, e.Type())}
				}
				opt.Expected = bd.Dark.ChannelN2D
				if bd.Illuminated != nil {
					opt.ExpectedIlluminated = bd.Illuminated.ChannelN2D
				}
			case calc.String:
				if e != "none" {
					return nil, &calc.ArgError{Arg: 3, Err: fmt.Errorf("%w: expected must be a density or an expected_density result", calc.ErrArgument)}
				}
			default:
				return nil, &calc.ArgError{Arg: 3, Err: fmt.Errorf("%w: expected must be a density or an expected_density result, found a %s", calc.ErrArgument, e.Type())}
			}
			title, ok := a[4].(calc.String)
			if !ok {
				return nil, &calc.ArgError{Arg: 4, Err: fmt.Errorf("%w: title must be a string", calc.ErrArgument)}
			}
			opt.Title = string(title)
			pic, err := Draw(a[0], opt)
			if err != nil {
				return nil, &calc.ArgError{Arg: 0, Err: err}
			}
			if name == "" {
				name = calc.String(pic.Kind)
			}
			return &Figure{Path: FilePath(entryPath, string(name)), Name: string(name), Picture: pic}, nil
		},
	}
}
