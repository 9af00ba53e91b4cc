package calc

import (
	"errors"
	"io/fs"
	"math"
	"sort"
	"strconv"
	"strings"

	"cleave/calc/quantity"
)

// Resolver supplies names that are not variables, constants or materials: the entry's
// own front-matter fields and its ancestors ("device", "mask", "wafer", "width"). The
// notebook provides it. A returned *Record with an empty Path gets the looked-up name as
// its Path, so its fields are recorded as dependencies "field:<name>.<field>".
type Resolver interface {
	Lookup(name string) (Value, bool)
}

// Namer is optionally implemented by a Resolver to list its names, for "did you mean"
// suggestions.
type Namer interface {
	Names() []string
}

// Param is a function parameter. Default nil means required. Dim, when non-nil, is the
// dimension the argument must have (checked before the call, with the error at the
// argument). FromRecord, when set, lets a record argument stand in for the parameter by
// its field of that name (so a material can be passed as a mass: `cyclotron_energy(B,
// GaAs)` uses GaAs.mstar).
type Param struct {
	Name       string
	Default    Value
	Dim        *quantity.Dim
	FromRecord string
}

// Func is a function callable from calc blocks. Call receives the arguments matched to
// Params by position, then by name, with defaults filled in (and, when Variadic, the
// extra positional arguments gathered as a List in the last one). An error of type
// *ArgError is reported at that argument's position; any other at the call.
type Func struct {
	Name     string
	Params   []Param
	Doc      string
	Variadic bool
	Call     func(e *Env, args []Value) (Value, error)
}

// Signature is "name(a, b, gs=2)".
func (f *Func) Signature() string {
	parts := make([]string, len(f.Params))
	for i, p := range f.Params {
		parts[i] = p.Name
		if p.Default != nil {
			parts[i] += "=" + displayDefault(p.Default)
		}
		if f.Variadic && i == len(f.Params)-1 {
			parts[i] += "..."
		}
	}
	return f.Name + "(" + strings.Join(parts, ", ") + ")"
}

// displayDefault shows a whole dimensionless default as an integer ("gs=2").
func displayDefault(v Value) string {
	if q, ok := v.(Quantity); ok && q.Q.Dim().IsDimensionless() && !q.Q.HasUncertainty() {
		if x := q.Q.Value(); x == math.Trunc(x) && math.Abs(x) < 1e15 {
			return strconv.FormatFloat(x, 'f', -1, 64)
		}
	}
	return Display(v)
}

// Env is the evaluation environment of one Markdown file: its variables in definition
// order (shared by all calc blocks of the file), the functions, the notebook resolver, the
// file system and loader for data files, and the dependencies read so far. An Env is not
// safe for concurrent use.
type Env struct {
	vars     map[string]Value
	order    []string
	failed   map[string]int   // name -> line whose definition failed
	funcs    map[string]*Func // registered on this Env; they shadow the table's
	table    *FuncTable
	resolver Resolver
	fsys     fs.FS
	dir      string
	loader   DataLoader
}

// Option configures an Env.
type Option func(*Env)

// WithResolver sets the notebook resolver for entry fields.
func WithResolver(r Resolver) Option { return func(e *Env) { e.resolver = r } }

// WithFS sets the notebook root as an fs.FS and the entry's directory (a slash path
// relative to the root, "." for the root) for data("...") paths. Paths are resolved
// relative to dir and may not leave the root; symbolic links are followed only while they
// stay inside it, which is checked through fs.ReadLink when fsys implements
// fs.ReadLinkFS (os.DirFS does; see [Env.OpenData]).
func WithFS(fsys fs.FS, dir string) Option {
	return func(e *Env) {
		e.fsys = fsys
		e.dir = dir
	}
}

// WithFuncs registers functions, as [Env.Register] does for each; a later one replaces an
// earlier one of the same name.
func WithFuncs(fs ...Func) Option {
	return func(e *Env) {
		for _, f := range fs {
			e.Register(f)
		}
	}
}

// FuncTable is a set of functions built once and shared, read-only, by every Env that uses
// it ([WithFuncTable]): making an Env then costs nothing per function.
type FuncTable struct{ funcs map[string]*Func }

// NewFuncTable builds a table; a later function replaces an earlier one of the same name.
func NewFuncTable(fs ...Func) *FuncTable {
	t := &FuncTable{funcs: make(map[string]*Func, len(fs))}
	for _, f := range fs {
		fc := f
		t.funcs[f.Name] = &fc
	}
	return t
}

// WithFuncTable gives the Env the table's functions (functions registered on the Env itself
// shadow them).
func WithFuncTable(t *FuncTable) Option { return func(e *Env) { e.table = t } }

// lookupFunc finds a function registered on the Env, then in its table.
func (e *Env) lookupFunc(name string) (*Func, bool) {
	if f, ok := e.funcs[name]; ok {
		return f, true
	}
	if e.table != nil {
		f, ok := e.table.funcs[name]
		return f, ok
	}
	return nil, false
}

// funcNames lists every function name the Env knows.
func (e *Env) funcNames() []string {
	names := make([]string, 0, len(e.funcs))
	for k := range e.funcs {
		names = append(names, k)
	}
	if e.table != nil {
		for k := range e.table.funcs {
			if _, ok := e.funcs[k]; !ok {
				names = append(names, k)
			}
		}
	}
	return names
}

// WithDataLoader sets what [Env.OpenData] turns a data file's bytes into (the library's
// reader gives a data set); without it OpenData returns a *DataFile.
func WithDataLoader(l DataLoader) Option { return func(e *Env) { e.loader = l } }

// NewEnv returns an environment with the options applied. It knows the language's names
// (variables, pi, constants, materials) but no functions: those come with [WithFuncs] or
// [Env.Register] (package calc/library has the tool's).
func NewEnv(opts ...Option) *Env {
	// The maps are made by their first write: an Env is made per file, and most files
	// register no function and have no failed line.
	e := &Env{dir: "."}
	for _, o := range opts {
		o(e)
	}
	return e
}

// Register adds or replaces a function.
func (e *Env) Register(f Func) {
	fc := f
	if e.funcs == nil {
		e.funcs = map[string]*Func{}
	}
	e.funcs[f.Name] = &fc
}

// Funcs returns the registered functions sorted by name.
func (e *Env) Funcs() []*Func {
	var out []*Func
	for _, n := range e.funcNames() {
		f, _ := e.lookupFunc(n)
		out = append(out, f)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// Set defines (or redefines) a variable.
func (e *Env) Set(name string, v Value) {
	if e.vars == nil {
		// room for the names of a typical file's blocks
		e.vars = make(map[string]Value, 8)
		e.order = make([]string, 0, 8)
	}
	if _, ok := e.vars[name]; !ok {
		e.order = append(e.order, name)
	}
	e.vars[name] = v
	delete(e.failed, name)
}

// Var returns a variable's value.
func (e *Env) Var(name string) (Value, bool) {
	v, ok := e.vars[name]
	return v, ok
}

// Vars returns the variable names in definition order.
func (e *Env) Vars() []string { return append([]string(nil), e.order...) }

// LineResult is the outcome of one calc line.
type LineResult struct {
	Kind    LineKind
	Name    string // for Assign
	Value   Value  // nil for Blank, Comment, and on error
	Display string // the text for the result region; "" for blank and comment lines
	Err     error  // a *Error, or nil
}

// EvalLine parses and evaluates one calc line (the result region already stripped; a
// "#~" is treated as the end of the line anyway). An assignment defines the name for later
// lines and later blocks sharing this Env, replacing an earlier definition; a failed
// assignment leaves the name undefined, and later uses say which line failed.
func (e *Env) EvalLine(line string, lineNo int) LineResult {
	return e.evalLine(line, lineNo, parseShared)
}

// evalLine is EvalLine with the parser given: parseShared, or ParseLine for the test that
// the memo changes nothing.
func (e *Env) evalLine(line string, lineNo int, parse func(string, int) (*Statement, error)) LineResult {
	st, err := parse(line, lineNo)
	if err != nil {
		if name, ok := assignedName(line); ok {
			e.forget(name, lineNo)
			return errResult(Assign, name, err)
		}
		return errResult(Expr, "", err)
	}
	res := LineResult{Kind: st.Kind, Name: st.Name}
	if st.Kind == Blank || st.Kind == Comment {
		return res
	}
	v, err := e.eval(st.Expr)
	if err == nil {
		err = finiteValue(v, st.Expr.Position())
	}
	if err != nil {
		if st.Kind == Assign {
			e.forget(st.Name, lineNo)
		}
		return errResult(st.Kind, st.Name, err)
	}
	if st.Kind == Assign {
		e.Set(st.Name, v)
	}
	res.Value = v
	res.Display = Display(v)
	return res
}

// finiteValue refuses a quantity whose value or uncertainty is not a finite number (read from
// a field written as "Inf", say): it would be written as a result no later line can trust.
// The operators and functions refuse what they would make non-finite themselves, with their
// own positions.
func finiteValue(v Value, p Pos) error {
	q, ok := v.(Quantity)
	if !ok {
		return nil
	}
	if x, u := q.Q.Value(), q.Q.Uncertainty(); math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(u) || math.IsInf(u, 0) {
		return posErr(p, ErrNotFinite, "the result %s is not a finite number", Display(v))
	}
	return nil
}

// forget undefines a name whose definition on line lineNo failed, so that later lines do
// not silently use an earlier value.
func (e *Env) forget(name string, lineNo int) {
	if _, ok := e.vars[name]; ok {
		delete(e.vars, name)
		e.order = removeName(e.order, name)
	}
	if e.failed == nil {
		e.failed = map[string]int{}
	}
	e.failed[name] = lineNo
}

// assignedName reports the name on the left of a line that has the shape "name = ...",
// even when the rest does not parse.
func assignedName(line string) (string, bool) {
	if i := strings.IndexByte(line, '='); i >= 0 {
		line = line[:i+1] // all that matters, however long the line
	}
	var lx lexer
	lx.reset(line, 0)
	lx.skipSpace()
	if lx.i >= len(lx.src) || !isIdentStart(lx.at(lx.i)) {
		return "", false
	}
	name := lx.ident()
	lx.skipSpace()
	if lx.at(lx.i) == '=' {
		return strings.Clone(name), true // kept in the Env: not a slice of the whole line
	}
	return "", false
}

func removeName(names []string, n string) []string {
	out := names[:0]
	for _, x := range names {
		if x != n {
			out = append(out, x)
		}
	}
	return out
}

func errResult(k LineKind, name string, err error) LineResult {
	var ce *Error
	if !errors.As(err, &ce) {
		ce = &Error{Line: 0, Col: 0, Err: err}
	}
	return LineResult{Kind: k, Name: name, Err: ce, Display: "error: " + ce.Error()}
}

// Eval evaluates one expression (as `cleave eval` does). Positions in errors are on
// line 1.
func (e *Env) Eval(expr string) (Value, error) {
	return e.evalExpr(expr, parseExprShared)
}

// evalExpr is Eval with the parser given, as for evalLine.
func (e *Env) evalExpr(expr string, parse func(string) (Node, error)) (Value, error) {
	x, err := parse(expr)
	if err != nil {
		return nil, err
	}
	v, err := e.eval(x)
	if err != nil {
		return nil, err
	}
	if err := finiteValue(v, x.Position()); err != nil {
		return nil, err
	}
	return v, nil
}
