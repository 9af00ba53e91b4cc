package templates

import (
	"bytes"
	"embed"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"sync"
	"text/template"
	"time"

	"go.yaml.in/yaml/v3"

	"cleave/notebook"
	"cleave/notebook/mdsrc"
)

//go:embed defaults/*.md
var defaults embed.FS

// Data is what a template is rendered with.
type Data struct {
	Kind    string   // entry kind, e.g. "wafer"; empty for notebook-readme
	ID      string   // the new entry's id
	Parents []string // ids given with --from, in order
	Date    string   // YYYY-MM-DD, or empty
	By      string   // initials, may be empty
}

// Parent returns the first parent id, or "" when none was given.
func (d Data) Parent() string {
	if len(d.Parents) == 0 {
		return ""
	}
	return d.Parents[0]
}

// Error is a failure to read, parse or execute a template, or a rendered
// result whose front matter is unusable. Line and Col are 1-based positions in
// the template file (Col may be 0); both are 0 when the error has no position
// in the template.
type Error struct {
	File     string // file name of the template, e.g. "wafer.md"
	Override bool   // true when the template came from the notebook's own folder
	Line     int
	Col      int
	Err      error
}

func (e *Error) Error() string {
	src := "built-in template "
	if e.Override {
		src = "notebook template "
	}
	pos := e.File
	if e.Line > 0 {
		pos += ":" + strconv.Itoa(e.Line)
		if e.Col > 0 {
			pos += ":" + strconv.Itoa(e.Col)
		}
	}
	return src + pos + ": " + e.Err.Error()
}

func (e *Error) Unwrap() error { return e.Err }

// Sentinel errors for bad Data; Render wraps them with the details.
var (
	ErrUnknownTemplate = errors.New("unknown template")
	ErrParents         = errors.New("wrong number of parents")
	ErrBadID           = errors.New("invalid id")
	ErrBadDate         = errors.New("invalid date, want YYYY-MM-DD")
)

// IsKind reports whether name is an entry kind (every kind of the notebook's kind table has a
// template).
func IsKind(name string) bool { return notebook.Kind(name).Known() }

var funcs = template.FuncMap{"yq": yamlScalar, "date": yamlDate}

// yamlDate writes a YYYY-MM-DD date as a plain YAML scalar, nothing (a YAML
// null, "not filled in") when empty, and anything else quoted by yamlScalar.
func yamlDate(s string) string {
	if _, err := time.Parse(time.DateOnly, s); err == nil || s == "" {
		return s
	}
	return yamlScalar(s)
}

var parseDefaults = sync.OnceValues(func() (map[string]*template.Template, error) {
	ents, err := fs.ReadDir(defaults, "defaults")
	if err != nil {
		return nil, err
	}
	m := make(map[string]*template.Template, len(ents))
	for _, e := range ents {
		file := e.Name()
		src, err := fs.ReadFile(defaults, "defaults/"+file)
		if err != nil {
			return nil, err
		}
		t, err := parse(file, src, false)
		if err != nil {
			return nil, err
		}
		m[strings.TrimSuffix(file, ".md")] = t
	}
	return m, nil
})

// Names lists the names of the built-in templates, sorted.
func Names() []string {
	ents, err := fs.ReadDir(defaults, "defaults")
	if err != nil {
		panic("templates: embedded folder unreadable: " + err.Error())
	}
	var names []string
	for _, e := range ents {
		names = append(names, strings.TrimSuffix(e.Name(), ".md"))
	}
	slices.Sort(names)
	return names
}

// Render renders the template called name with d.
//
// override is the notebook's own templates folder (may be nil). A file
// "<name>.md" there replaces the built-in template of that name; a name that
// only the override has is rendered too. Errors say which template failed
// and, for syntax and execution errors, the line in it ([*Error]).
//
// For the entry kinds, Render checks d first: the id must be non-empty and
// made of letters, digits, '-', '_' and '.'; wafer and mask take no parent,
// piece and device at most one; Date must be empty or YYYY-MM-DD. An empty
// d.Kind is taken to be name. After rendering, front matter (if any) must be
// valid YAML whose id and kind equal d's.
func Render(override fs.FS, name string, d Data) ([]byte, error) {
	if name == "" || strings.ContainsAny(name, `/\`) || !fs.ValidPath(name+".md") {
		return nil, fmt.Errorf("template %q: %w (names are like %s)", name, ErrUnknownTemplate, strings.Join(Names(), ", "))
	}
	if d.Kind == "" && IsKind(name) {
		d.Kind = name
	}
	if err := checkData(name, d); err != nil {
		return nil, err
	}
	file := name + ".md"
	var t *template.Template
	isOverride := false
	if override != nil {
		src, err := fs.ReadFile(override, file)
		switch {
		case err == nil:
			t, err = parse(file, src, true)
			if err != nil {
				return nil, err
			}
			isOverride = true
		case !errors.Is(err, fs.ErrNotExist):
			return nil, &Error{File: file, Override: true, Err: err}
		}
	}
	if t == nil {
		m, err := parseDefaults()
		if err != nil {
			return nil, err
		}
		t = m[name]
		if t == nil {
			return nil, fmt.Errorf("template %q: %w (built-in: %s)", name, ErrUnknownTemplate, strings.Join(Names(), ", "))
		}
	}
	buf := &cappedBuffer{max: MaxOutput}
	if err := t.Execute(buf, d); err != nil {
		return nil, positioned(file, isOverride, err)
	}
	out := buf.Bytes()
	if err := checkFrontMatter(out, d); err != nil {
		return nil, &Error{File: file, Override: isOverride, Err: err}
	}
	return out, nil
}

// MaxOutput is the largest rendered entry Render returns, in bytes: a
// template that writes more (a runaway range in a notebook's own template)
// fails with an error instead of filling memory.
const MaxOutput = 1 << 20

type cappedBuffer struct {
	bytes.Buffer
	max int
}

func (b *cappedBuffer) Write(p []byte) (int, error) {
	if b.Len()+len(p) > b.max {
		return 0, fmt.Errorf("rendered output exceeds %d bytes", b.max)
	}
	return b.Buffer.Write(p)
}

func parse(file string, src []byte, override bool) (*template.Template, error) {
	t, err := template.New(file).Funcs(funcs).Option("missingkey=error").Parse(string(src))
	if err != nil {
		return nil, positioned(file, override, err)
	}
	return t, nil
}

// tmplErr matches text/template's messages: "template: NAME:LINE: msg" for
// syntax errors and "template: NAME:LINE:COL: executing ..." for execution.
var tmplErr = regexp.MustCompile(`(?s)^template: (.+?):(\d+):(?:(\d+):)? (.*)$`)

func positioned(file string, override bool, err error) error {
	e := &Error{File: file, Override: override, Err: err}
	if m := tmplErr.FindStringSubmatch(err.Error()); m != nil && m[1] == file {
		e.Line, _ = strconv.Atoi(m[2])
		if m[3] != "" {
			e.Col, _ = strconv.Atoi(m[3])
		}
		e.Err = errors.New(m[4])
	}
	return e
}

func checkData(name string, d Data) error {
	if d.Date != "" {
		if _, err := time.Parse(time.DateOnly, d.Date); err != nil {
			return fmt.Errorf("template %s: date %q: %w", name, d.Date, ErrBadDate)
		}
	}
	ki, isKind := notebook.LookupKind(notebook.Kind(name))
	max := ki.Parents()
	if !isKind {
		return nil
	}
	if err := checkID(d.ID); err != nil {
		return fmt.Errorf("template %s: id: %w", name, err)
	}
	for i, p := range d.Parents {
		if err := checkID(p); err != nil {
			return fmt.Errorf("template %s: parent %d: %w", name, i+1, err)
		}
	}
	if max >= 0 && len(d.Parents) > max {
		switch max {
		case 0:
			return fmt.Errorf("%w: a %s takes no parent, got %s", ErrParents, name, strings.Join(d.Parents, ", "))
		default:
			return fmt.Errorf("%w: a %s takes one parent, got %d (%s)", ErrParents, name, len(d.Parents), strings.Join(d.Parents, ", "))
		}
	}
	return nil
}

func checkID(id string) error {
	if id == "" {
		return fmt.Errorf("%w: empty", ErrBadID)
	}
	for i, r := range id {
		ok := r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.'
		if !ok {
			return fmt.Errorf("%w: %q: character %q at column %d (want letters, digits, '-', '_' or '.')", ErrBadID, id, r, i+1)
		}
	}
	return nil
}

// yamlScalar writes s as a YAML scalar for a one-line context: plain where
// that reads back as the same string, quoted otherwise ("123", "true", "",
// "2025-01-02"). yaml.Marshal makes that choice; a value it would write as a
// block scalar (a newline inside) is written double-quoted instead, which
// YAML reads like a JSON string.
func yamlScalar(s string) string {
	b, err := yaml.Marshal(s)
	out := strings.TrimSuffix(string(b), "\n")
	if err != nil || strings.Contains(out, "\n") {
		j, _ := json.Marshal(s)
		return string(j)
	}
	return out
}

// frontMatter returns the YAML of the document's front matter and whether
// the document opens with a `---` line, by the rules the notebook reads
// entries with ([mdsrc.SplitFrontMatter]).
func frontMatter(doc []byte) (yamlText []byte, ok bool, err error) {
	y, ok, err := mdsrc.SplitFrontMatter(doc)
	if err != nil {
		return nil, true, errors.New("front matter opened with --- on line 1 is never closed (want a line ---)")
	}
	return y, ok, nil
}

var yamlLine = regexp.MustCompile(`line (\d+)`)

func checkFrontMatter(out []byte, d Data) error {
	y, ok, err := frontMatter(out)
	if err != nil || !ok {
		if err == nil && IsKind(d.Kind) {
			return errors.New("rendered entry has no front matter (want --- on line 1)")
		}
		return err
	}
	var fm map[string]any
	if err := yaml.Unmarshal(y, &fm); err != nil {
		// yaml counts lines from the first line after "---": shift to the
		// line of the rendered output.
		msg := yamlLine.ReplaceAllStringFunc(err.Error(), func(s string) string {
			n, _ := strconv.Atoi(strings.TrimPrefix(s, "line "))
			return "line " + strconv.Itoa(n+1)
		})
		return fmt.Errorf("rendered front matter is not valid YAML: %s", msg)
	}
	if !IsKind(d.Kind) {
		return nil
	}
	if got, _ := fm["kind"].(string); got != d.Kind {
		return fmt.Errorf("rendered front matter has kind %v, want %q", fm["kind"], d.Kind)
	}
	if got, _ := fm["id"].(string); got != d.ID {
		return fmt.Errorf("rendered front matter has id %v, want %q", fm["id"], d.ID)
	}
	return nil
}
