package compute

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"path"
	"sort"
	"strings"
	"sync"

	"cleave/calc"
	"cleave/calc/library"
	"cleave/calc/plot"
	"cleave/internal/parallel"
	"cleave/notebook"
	"cleave/notebook/calcblock"
	"cleave/notebook/mdsrc"
)

// Version is mixed into every cache key (with a hash of the executable, see EngineSalt), so
// a new engine never reuses old results.
// Bump it whenever a formula, a display rule or a function changes.
const Version = "cleave-engine 4"

// Options tunes Run.
type Options struct {
	// Cache, when not nil, answers files whose inputs have not changed since it stored their
	// results, and stores what this run evaluates (written by [Cache.Save]).
	Cache *Cache
	// Paths limits the report to these files or folders (clean slash paths relative to the
	// root of the tree; "." for all); empty means every Markdown file. Other files are still
	// read where a reported file depends on them.
	Paths []string
	// Salt is mixed into every cache key; empty means [EngineSalt]. Two engines that may
	// compute different results must use different salts.
	Salt string
	// Stamps, with a Cache, names each file of the tree by a stamp that changes whenever its
	// content may have (stat data, or a blob hash); "" or absent means unknown. What the cache
	// learnt about a file at the same stamp (its summary, input digest, data hash, last report)
	// is reused without reading it. nb should then have been loaded with the same stamps.
	Stamps map[string]string
	// Write says the caller will write the changed files: their reports then carry NewBytes
	// (a file known from the cache with stale results is read to build them). Without it, a
	// report of a file not read this run has NewBytes nil.
	Write bool
}

// Report is the outcome of a run over a notebook: typed results, nothing to parse.
type Report struct {
	Files     []*FileResult      // files with at least one calc block, in path order
	Problems  []notebook.Problem // invalid entries (Notebook.Validate), in path order
	Failures  []error            // files that could not be read or evaluated
	Evaluated int                // lines handed to the evaluator
	CacheHits int                // files answered from the cache
}

// FileResult is one file's outcome: which results are stale or failed, and the file with its
// result regions brought up to date (NewBytes and Original are nil for a file the cache
// answered without reading it; with Options.Write every changed file is read).
type FileResult struct {
	*calcblock.FileReport
	FromCache bool // the results came from the cache, nothing was evaluated
}

// OK reports whether every result is current, no line failed and every entry is valid.
func (r *Report) OK() bool {
	if len(r.Failures) > 0 || len(r.Problems) > 0 {
		return false
	}
	for _, f := range r.Files {
		if !f.OK() {
			return false
		}
	}
	return true
}

// Changed lists the files whose result regions a write would change.
func (r *Report) Changed() []*FileResult {
	var out []*FileResult
	for _, f := range r.Files {
		if f.Changed {
			out = append(out, f)
		}
	}
	return out
}

// Lines lists every stale result as `path:line: old → new` and every failed line as
// `path:line:col: error: …`, file by file in path order, then the invalid entries as
// `path:line:col: message` and the files that could not be evaluated.
func (r *Report) Lines() []string {
	var out []string
	for _, f := range r.Files {
		for _, c := range f.Stale {
			if calcblock.IsError(c.New) {
				continue // listed with the errors below, with its column
			}
			out = append(out, c.String())
		}
		for _, c := range f.Errors {
			out = append(out, c.ErrorString())
		}
	}
	for _, p := range r.Problems {
		out = append(out, p.Error())
	}
	for _, err := range r.Failures {
		out = append(out, err.Error())
	}
	return out
}

// Run evaluates the calc blocks of the notebook in fsys (a working tree, the git index, a
// commit: any fs.FS) and validates its entries. It reads; it writes nothing but the cache (see
// [WriteFiles] for bringing files on disk up to date). nb, when not nil, must be what
// notebook.Load returned for fsys; every file is evaluated even when others fail. Files are
// evaluated in parallel, each in its own environment (the notebook is only read).
func Run(fsys fs.FS, nb *notebook.Notebook, opt Options) (*Report, error) {
	if nb == nil {
		var err error
		if nb, err = notebook.Load(fsys); err != nil {
			return nil, err
		}
	}
	salt := opt.Salt
	if salt == "" {
		salt = EngineSalt()
	}
	rs := newRunState(fsys, nb, salt)
	if opt.Cache != nil {
		rs.cache, rs.stamps = opt.Cache, opt.Stamps
	}
	rs.write = opt.Write
	sel := selector(opt.Paths)
	var todo []*notebook.File
	for _, f := range nb.Files {
		if sel(f.Path) && f.MayHoldBlock() {
			todo = append(todo, f)
		}
	}
	type outcome struct {
		fr  *calcblock.FileReport
		hit bool
		err error
	}
	out := make([]outcome, len(todo))
	// Validation reads the notebook only: it runs beside the evaluation.
	var problems []notebook.Problem
	var validated sync.WaitGroup
	validated.Go(func() { problems = nb.Validate() })
	parallel.For(len(todo), func(i int) {
		fr, hit, err := rs.runFile(todo[i], opt.Cache)
		out[i] = outcome{fr, hit, err}
	})
	if rs.cache != nil {
		// What this run read, for the next one: each file's summary and input digest (files
		// without a block are parsed for their digest here, several at a time).
		var fresh []*notebook.File
		for _, f := range nb.Files {
			if !f.Known() {
				fresh = append(fresh, f)
			}
		}
		parallel.For(len(fresh), func(i int) {
			f := fresh[i]
			sum, digest := f.Summary(), rs.parse(f).digest
			rs.cache.learn(f.Path, rs.stamps[f.Path], func(r *fileRec) { r.sum, r.digest = sum, digest })
		})
	}

	rep := &Report{}
	for _, o := range out {
		if o.err != nil {
			rep.Failures = append(rep.Failures, o.err)
			continue
		}
		if o.fr.Code == 0 && len(o.fr.Errors) == 0 {
			continue // no calc block after all
		}
		rep.Files = append(rep.Files, &FileResult{FileReport: o.fr, FromCache: o.hit})
		if o.hit {
			rep.CacheHits++
		} else {
			rep.Evaluated += o.fr.Code
		}
	}
	validated.Wait()
	for _, p := range problems {
		if sel(p.Path) {
			rep.Problems = append(rep.Problems, p)
		}
	}
	return rep, nil
}

// conflictMarker finds an unresolved merge conflict: a line that opens one (seven '<' at the
// start of the line, then a blank or the end of the line) followed later by a line that
// closes it (seven '>'). It reports the opening line's 1-based number. A line of '=' alone is
// not enough: it may be a Markdown heading's underline.
func conflictMarker(raw []byte) (int, bool) {
	open := 0
	line := 1
	for off := 0; off <= len(raw); line++ {
		end := bytes.IndexByte(raw[off:], '\n')
		if end < 0 {
			end = len(raw) - off
		}
		l := bytes.TrimSuffix(raw[off:off+end], []byte("\r"))
		switch {
		case open == 0 && isMarker(l, '<'):
			open = line
		case open > 0 && isMarker(l, '>'):
			return open, true
		}
		off += end + 1
	}
	return 0, false
}

func isMarker(l []byte, c byte) bool {
	if len(l) < 7 || !bytes.Equal(l[:7], bytes.Repeat([]byte{c}, 7)) {
		return false
	}
	return len(l) == 7 || l[7] == ' ' || l[7] == '\t'
}

// runState is what the files of one run share: the tree, the loaded notebook, and each
// Markdown file's blocks and input digest, found once.
type runState struct {
	fsys fs.FS
	nb   *notebook.Notebook
	salt string

	cache  *Cache            // nil: no cache
	stamps map[string]string // see Options.Stamps
	write  bool              // see Options.Write

	mu     sync.Mutex
	parsed map[string]*parsedFile
	valMu  sync.Mutex
	values map[string]string // current values of dependencies (see current), by name
	vals   sync.Map          // records made from entries, shared by the files of the run (see shared)
}

// shared returns the value made by mk for key, made once per run: the record of an entry's
// front matter, a geometry. Such values are never changed after they are made.
func (rs *runState) shared(key string, mk func() calc.Value) calc.Value {
	if v, ok := rs.vals.Load(key); ok {
		return v.(calc.Value)
	}
	v, _ := rs.vals.LoadOrStore(key, mk())
	return v.(calc.Value)
}

type parsedFile struct {
	once   sync.Once
	blocks []calcblock.Block
	err    error
	digest string
}

// newRunState prepares a run; salt keys the cache (an environment made outside a run needs none).
func newRunState(fsys fs.FS, nb *notebook.Notebook, salt string) *runState {
	return &runState{fsys: fsys, nb: nb, salt: salt, parsed: map[string]*parsedFile{}}
}

func (rs *runState) parse(f *notebook.File) *parsedFile {
	rs.mu.Lock()
	p, ok := rs.parsed[f.Path]
	if !ok {
		p = &parsedFile{}
		rs.parsed[f.Path] = p
	}
	rs.mu.Unlock()
	p.once.Do(func() {
		if f.MayHoldBlock() { // a file without the fence's word has no block to find
			p.blocks, p.err = calcblock.Find(f.Source())
		}
		if p.err != nil {
			p.blocks = nil
		}
		sum := calcblock.InputDigest(f.Source(), p.blocks)
		p.digest = hex.EncodeToString(sum[:16])
	})
	return p
}

// blocks returns the calc blocks of f.
func (rs *runState) blocks(f *notebook.File) ([]calcblock.Block, error) {
	p := rs.parse(f)
	return p.blocks, p.err
}

// mdDigest is the input digest of the Markdown file at path p, "-" when there is none.
func (rs *runState) mdDigest(p string) string {
	f, ok := rs.nb.File(p)
	if !ok {
		return "-"
	}
	return rs.digest(f)
}

// digest is the input digest of f: known from the cache for a file not read this run.
func (rs *runState) digest(f *notebook.File) string {
	if f.Known() {
		if r := rs.cache.fileAt(f.Path, rs.stamps[f.Path]); r != nil && r.digest != "" {
			return r.digest
		}
	}
	return rs.parse(f).digest
}

// dataHash is readValue of the file at p now: known from the cache while its stamp is the
// same, read and hashed otherwise.
func (rs *runState) dataHash(p string) string {
	stamp := rs.stamps[p]
	if r := rs.cache.fileAt(p, stamp); r != nil && r.sha != "" {
		return r.sha
	}
	v := readValue(readRegular(rs.fsys, p))
	if strings.HasPrefix(v, "sha256:") {
		rs.cache.learn(p, stamp, func(r *fileRec) { r.sha = v })
	}
	return v
}

// runFile recomputes one file, from the cache when its inputs have not changed.
func (rs *runState) runFile(f *notebook.File, cache *Cache) (*calcblock.FileReport, bool, error) {
	if f.Known() {
		// Not read this run: its bytes are those of its last report. When its results are
		// still good, so is that report.
		if r := cache.fileAt(f.Path, rs.stamps[f.Path]); r != nil && r.report != nil && !(rs.write && len(r.report.stale) > 0) {
			if rec, ok := cache.find(rs, f.Path, rs.key(f), r.report.code); ok && rec.okey == r.report.key {
				rep := r.report
				return &calcblock.FileReport{Path: f.Path, Errors: rep.errors, Stale: rep.stale, Code: rep.code, Changed: len(rep.stale) > 0}, true, nil
			}
		}
	}
	if line, ok := conflictMarker(f.Source().Raw); ok {
		return nil, false, fmt.Errorf("%s:%d:1: unresolved merge conflict (<<<<<<< … >>>>>>>): resolve it, then recompute; nothing in this file was evaluated or changed", f.Path, line)
	}
	blocks, err := rs.blocks(f)
	if err != nil {
		return nil, false, fmt.Errorf("%s: %w", f.Path, err)
	}
	perr := parseError(f)
	n := len(calcblock.CodeLines(blocks))
	key := rs.key(f)
	if cache != nil {
		if rec, ok := cache.find(rs, f.Path, key, n); ok {
			fr, err := calcblock.Build(f.Path, f.Source(), perr, blocks, rec.outs)
			rs.keepReport(f, fr, rec.okey)
			return fr, true, err
		}
	}
	rec := deps{}
	v := &view{nb: rs.nb, run: rs, rec: rec}
	var env *calc.Env // made on the first line, so a file without code never builds one
	outs := calcblock.Evaluate(blocks, evalFunc(func(code string, lineNo int) calcblock.Outcome {
		if env == nil {
			env = newEnv(v, f, 0)
		}
		return outcomeOf(env.EvalLine(code, lineNo))
	}))
	okey := outsKey(outs)
	if cache != nil {
		cache.store(f.Path, key, rec, outs, okey)
	}
	fr, err := calcblock.Build(f.Path, f.Source(), perr, blocks, outs)
	if err == nil {
		rs.keepReport(f, fr, okey)
	}
	return fr, false, err
}

// keepReport remembers a file's report for the next run.
func (rs *runState) keepReport(f *notebook.File, fr *calcblock.FileReport, key string) {
	if rs.cache == nil || fr == nil {
		return
	}
	stamp := rs.stamps[f.Path]
	if r := rs.cache.fileAt(f.Path, stamp); r != nil && r.report != nil && r.report.key == key && r.report.code == fr.Code &&
		len(r.report.errors) == len(fr.Errors) && len(r.report.stale) == len(fr.Stale) {
		return // known already
	}
	rep := &storedReport{key: key, code: fr.Code, errors: fr.Errors, stale: fr.Stale}
	rs.cache.learn(f.Path, stamp, func(r *fileRec) { r.report = rep })
}

// outsKey hashes a file's outcomes.
func outsKey(outs []calcblock.Outcome) string {
	b := make([]byte, 0, 256)
	for _, o := range outs {
		b = appendBool(b, o.Failed)
		b = binary.AppendUvarint(b, uint64(max(o.Col, 0)))
		b = appendStr(b, o.Text)
	}
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:16])
}

// key names a file's own inputs: the engine, its path (error messages may name it) and its
// person-owned bytes.
func (rs *runState) key(f *notebook.File) string {
	return rs.salt + "\x00" + f.Path + "\x00" + rs.digest(f)
}

type evalFunc func(code string, lineNo int) calcblock.Outcome

func (f evalFunc) EvalLine(code string, lineNo int) calcblock.Outcome { return f(code, lineNo) }

// outcomeOf turns a calc line result into what a result region shows.
func outcomeOf(r calc.LineResult) calcblock.Outcome {
	if r.Err == nil {
		return calcblock.Outcome{Text: r.Display}
	}
	o := calcblock.Outcome{Failed: true, Text: r.Err.Error()}
	var ce *calc.Error
	if errors.As(r.Err, &ce) {
		o.Col = ce.Col
	}
	return o
}

// parseError is the error mdsrc.Parse gave for the file: nil when its front matter closed or
// it has none; otherwise parsed again to get the positioned error the report shows.
func parseError(f *notebook.File) error {
	src := f.Source()
	if src.HasFrontMatter || !bytes.HasPrefix(src.Raw[src.BOM:], []byte("---")) {
		return nil
	}
	_, err := mdsrc.Parse(src.Raw)
	var pe *mdsrc.PosError
	if errors.As(err, &pe) {
		return err
	}
	return nil
}

// NewEnv is the calc environment of one notebook file: its entry's fields as names, the
// entry-bound functions, and the notebook's files for data("...").
func NewEnv(fsys fs.FS, nb *notebook.Notebook, f *notebook.File) *calc.Env {
	rs := newRunState(fsys, nb, "")
	return newEnv(&view{nb: nb, run: rs, rec: deps{}}, f, 0)
}

// newEnv makes the environment of f for an evaluation whose reads v records.
func newEnv(v *view, f *notebook.File, depth int) *calc.Env {
	r := newResolver(v, f.Entry, depth)
	env := library.NewEnv(calc.WithFS(recFS{fsys: v.run.fsys, rec: v.rec}, path.Dir(f.Path)), calc.WithResolver(r))
	r.register(env)
	env.Register(plot.Func(f.Path)) // draws in memory; `cleave calc` writes the file (notebook/plotfiles)
	return env
}

// selector returns a predicate over slash paths for clean slash paths relative to the root.
func selector(paths []string) func(string) bool {
	if len(paths) == 0 {
		return func(string) bool { return true }
	}
	prefixes := append([]string(nil), paths...)
	sort.Strings(prefixes)
	return func(p string) bool {
		for _, pre := range prefixes {
			if pre == "." || p == pre || strings.HasPrefix(p, pre+"/") {
				return true
			}
		}
		return false
	}
}
