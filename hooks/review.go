package hooks

import (
	"cleave/calc/plot"
	"fmt"
	"io/fs"
	"math"
	"path"
	"sort"
	"strings"
	"testing/fstest"
	"time"

	"github.com/go-git/go-git/v5/plumbing"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/notebook"
	"cleave/notebook/calcblock"
	"cleave/notebook/compute"
)

// Review is the report on a range of commits for a pull request: the entries added, changed and
// removed, grouped by sample lineage, with each field and each result old → new (results with
// their relative change); the data files changed; what is wrong at the head (stale results,
// failed lines, invalid entries); and the physics warnings a reviewer must see.
//
// The range BASE..HEAD is compared as a git host compares a pull request: from the merge base
// of BASE and HEAD to HEAD.
type Review struct {
	Base      string          `json:"base"` // the revisions as given
	Head      string          `json:"head"`
	From      string          `json:"from"` // the commits compared: the merge base …
	To        string          `json:"to"`   // … and the head
	Commits   []ReviewCommit  `json:"commits"`
	Groups    []ReviewGroup   `json:"groups"`
	Data      []DataChange    `json:"data"`
	Stale     []StaleResult   `json:"stale"`
	Problems  []string        `json:"problems"` // path:line:col: message, at the head
	Warnings  []ReviewWarning `json:"warnings"`
	Unchanged bool            `json:"unchanged,omitempty"` // no file differs
}

// ReviewCommit is one commit of the range.
type ReviewCommit struct {
	Hash    string    `json:"hash"`
	Author  string    `json:"author"`
	Date    time.Time `json:"date"`
	Subject string    `json:"subject"`
}

// ReviewGroup gathers the changed entries of one lineage: the wafer they descend from, or a
// mask or process run (shared by several wafers), or the entries removed.
type ReviewGroup struct {
	Lineage string        `json:"lineage"`
	Entries []ReviewEntry `json:"entries"`
}

// ReviewEntry is one changed Markdown file.
type ReviewEntry struct {
	ID      string         `json:"id,omitempty"` // "" for a note without front matter
	Kind    string         `json:"kind,omitempty"`
	Path    string         `json:"path"`
	Status  string         `json:"status"` // added, modified or removed
	Fields  []FieldChange  `json:"fields,omitempty"`
	Results []ReviewResult `json:"results,omitempty"`
	Text    bool           `json:"text,omitempty"`
}

// ReviewResult is a result old → new, with its relative change (new − old)/|old| when both
// read as quantities of the same dimension.
type ReviewResult struct {
	ResultChange
	Relative *float64 `json:"relative,omitempty"`
}

// DataChange is a data file added, changed or removed, with the entries that read it.
type DataChange struct {
	Path    string   `json:"path"`
	Status  string   `json:"status"`
	OldSize int64    `json:"old_size"` // bytes; -1 where it is not there
	NewSize int64    `json:"new_size"`
	ReadBy  []string `json:"read_by"`
}

// StaleResult is a result at the head that differs from what its inputs give now: its inputs
// changed after it was written and nobody recomputed it.
type StaleResult struct {
	Path string `json:"path"`
	Line int    `json:"line"`
	Old  string `json:"old"`
	New  string `json:"new"`
}

// ReviewWarning is a finding a reviewer must see. Kind is one of "hall-sdh" (the Hall and
// SdH densities of a cooldown disagree), "mobility" (outside the plausible range for the
// material and temperature), "plateau" (a quantum Hall plateau where the density does not
// put that filling factor), "density" (far from the wafer's expected density), "stale" (a
// result whose inputs changed but that nobody recomputed) and "analysis" (a warning an
// analysis gave, such as a failed sanity check of a sweep).
type ReviewWarning struct {
	Kind    string `json:"kind"`
	ID      string `json:"id,omitempty"`
	Path    string `json:"path"`
	Line    int    `json:"line,omitempty"`
	Message string `json:"message"`
}

// densityTolerance is how far (relative) a measured density may be from the wafer's expected
// one before the review says so. Designed and measured densities commonly differ by 10–20 %
// (donor activation, surface states, illumination); 30 % is beyond that (common practice).
const densityTolerance = 0.30

// ReviewRange reviews the commits of rng: "BASE..HEAD" (or "BASE...HEAD"), or "BASE" for
// BASE..HEAD.
func (r *Repo) ReviewRange(rng string) (*Review, error) {
	base, head, ok := strings.Cut(rng, "...")
	if !ok {
		base, head, ok = strings.Cut(rng, "..")
	}
	if !ok {
		head = "HEAD"
	}
	if base == "" {
		return nil, fmt.Errorf("%q: expected BASE..HEAD", rng)
	}
	if head == "" {
		head = "HEAD"
	}
	baseID, err := r.Resolve(base)
	if err != nil {
		return nil, err
	}
	headID, err := r.Resolve(head)
	if err != nil {
		return nil, err
	}
	mb, err := r.git().line("merge-base", baseID.String(), headID.String())
	if err != nil || !plumbing.IsHash(mb) {
		return nil, fmt.Errorf("%s and %s have no commit in common", base, head)
	}
	objs, err := r.OpenObjects()
	if err != nil {
		return nil, err
	}
	defer objs.Close()
	rv := &Review{Base: base, Head: head, From: mb, To: headID.String(), Commits: []ReviewCommit{}, Groups: []ReviewGroup{},
		Data: []DataChange{}, Stale: []StaleResult{}, Problems: []string{}, Warnings: []ReviewWarning{}}
	if err := rv.readCommits(r, objs); err != nil {
		return nil, err
	}
	from, err := objs.Commit(plumbing.NewHash(mb))
	if err != nil {
		return nil, err
	}
	to, err := objs.Commit(headID)
	if err != nil {
		return nil, err
	}
	changed, err := objs.diffTrees(from.TreeHash, to.TreeHash)
	if err != nil {
		return nil, err
	}
	rv.Unchanged = len(changed) == 0

	fsys, err := objs.TreeFS(headID)
	if err != nil {
		return nil, err
	}
	nb, err := notebook.Load(fsys)
	if err != nil {
		return nil, err
	}
	rep, _, err := r.evaluate(fsys, nil)
	if err != nil {
		return nil, err
	}
	rd := &reviewer{rv: rv, objs: objs, fsys: fsys, nb: nb, changed: map[string]changedFile{}, wafers: map[string]*expectation{}}
	for _, c := range changed {
		rd.changed[c.path] = c
	}
	if err := rd.entries(changed); err != nil {
		return nil, err
	}
	rd.dataFiles(changed)
	rd.atHead(rep)
	rd.physics(changed)
	return rv, nil
}

// readCommits lists the commits of the range, newest first.
func (rv *Review) readCommits(r *Repo, objs *Objects) error {
	out, err := r.git().line("rev-list", rv.From+".."+rv.To)
	if err != nil {
		return err
	}
	for _, id := range strings.Fields(out) {
		c, err := objs.Commit(plumbing.NewHash(id))
		if err != nil {
			return err
		}
		rv.Commits = append(rv.Commits, ReviewCommit{Hash: id, Author: c.Author.Name, Date: c.Author.When, Subject: subject(c.Message)})
	}
	return nil
}

// reviewer holds what the parts of a review share.
type reviewer struct {
	rv      *Review
	objs    *Objects
	fsys    fs.FS
	nb      *notebook.Notebook
	changed map[string]changedFile
	wafers  map[string]*expectation
}

func (rd *reviewer) blob(h plumbing.Hash) ([]byte, error) {
	if h.IsZero() {
		return nil, nil
	}
	return rd.objs.Blob(h)
}

// entries describes each changed Markdown file and sorts them into lineages.
func (rd *reviewer) entries(changed []changedFile) error {
	groups := map[string][]ReviewEntry{}
	for _, c := range changed {
		if !strings.HasSuffix(c.path, ".md") {
			continue
		}
		old, err := rd.blob(c.old)
		if err != nil {
			return err
		}
		cur, err := rd.blob(c.new)
		if err != nil {
			return err
		}
		re := ReviewEntry{Path: c.path, Status: "modified"}
		switch {
		case c.old.IsZero():
			re.Status = "added"
		case c.new.IsZero():
			re.Status = "removed"
		}
		var e *notebook.Entry
		if f, ok := rd.nb.File(c.path); ok && f.Entry != nil {
			e = f.Entry
		} else if old != nil {
			e = entryOf(c.path, old)
		}
		if e != nil {
			re.ID, re.Kind = e.ID, string(e.Kind)
		}
		d := diffFiles(c.path, old, cur)
		if re.Status == "modified" {
			re.Fields, re.Text = d.Fields, d.Text
		}
		for _, res := range d.Results {
			re.Results = append(re.Results, ReviewResult{ResultChange: res, Relative: relativeChange(res.Old, res.New)})
		}
		if re.Status == "modified" && len(re.Fields) == 0 && len(re.Results) == 0 && !re.Text {
			re.Text = true // only blanks or result spacing moved
		}
		label := "notes"
		switch {
		case re.Status == "removed":
			label = "removed"
		case e != nil:
			label = rd.lineage(e)
		}
		groups[label] = append(groups[label], re)
	}
	labels := make([]string, 0, len(groups))
	for l := range groups {
		labels = append(labels, l)
	}
	sort.Slice(labels, func(i, j int) bool {
		return groupRank(labels[i]) < groupRank(labels[j]) || groupRank(labels[i]) == groupRank(labels[j]) && labels[i] < labels[j]
	})
	for _, l := range labels {
		es := groups[l]
		sort.SliceStable(es, func(i, j int) bool {
			if a, b := kindRank(es[i].Kind), kindRank(es[j].Kind); a != b {
				return a < b
			}
			return es[i].ID < es[j].ID
		})
		rd.rv.Groups = append(rd.rv.Groups, ReviewGroup{Lineage: l, Entries: es})
	}
	return nil
}

// entryOf parses one file on its own (a removed entry: its id and kind).
func entryOf(p string, raw []byte) *notebook.Entry {
	nb, err := notebook.Load(fstest.MapFS{p: {Data: raw}})
	if err != nil {
		return nil
	}
	if f, ok := nb.File(p); ok {
		return f.Entry
	}
	return nil
}

// lineage names the group of an entry: the wafer it descends from; a mask or a process run
// on its own (they serve several wafers).
func (rd *reviewer) lineage(e *notebook.Entry) string {
	if w, ok := rd.nb.Nearest(e, notebook.KindWafer); ok {
		return "wafer " + w.ID
	}
	return string(e.Kind) + " " + e.ID
}

func groupRank(label string) int {
	switch {
	case strings.HasPrefix(label, "wafer "):
		return 0
	case label == "notes":
		return 2
	case label == "removed":
		return 3
	}
	return 1
}

func kindRank(k string) int {
	for i, kk := range []notebook.Kind{notebook.KindWafer, notebook.KindPiece, notebook.KindMask, notebook.KindProcess, notebook.KindDevice, notebook.KindCooldown} {
		if string(kk) == k {
			return i
		}
	}
	return 99
}

// dataFiles lists the changed files that are not Markdown, with the entries that read them.
func (rd *reviewer) dataFiles(changed []changedFile) {
	readers := map[string][]string{}
	for _, e := range rd.nb.Entries {
		for _, p := range dataFiles(rd.fsys, rd.nb, e) {
			readers[p] = append(readers[p], e.ID)
		}
	}
	for _, c := range changed {
		if strings.HasSuffix(c.path, ".md") || isPlotFile(c.path) {
			continue // entries are reported by lineage; plot files follow their results
		}
		dc := DataChange{Path: c.path, Status: "modified", OldSize: -1, NewSize: -1, ReadBy: readers[c.path]}
		if dc.ReadBy == nil {
			dc.ReadBy = []string{}
		}
		if old, err := rd.blob(c.old); err == nil && !c.old.IsZero() {
			dc.OldSize = int64(len(old))
		}
		if cur, err := rd.blob(c.new); err == nil && !c.new.IsZero() {
			dc.NewSize = int64(len(cur))
		}
		switch {
		case c.old.IsZero():
			dc.Status = "added"
		case c.new.IsZero():
			dc.Status = "removed"
		}
		rd.rv.Data = append(rd.rv.Data, dc)
	}
}

// atHead records what is wrong at the head: stale results (one warning per file), failed
// lines, invalid entries, files that could not be evaluated.
func (rd *reviewer) atHead(rep *compute.Report) {
	for _, f := range rep.Files {
		var lines []string
		for _, ch := range f.Stale {
			if calcblock.IsError(ch.New) {
				continue
			}
			rd.rv.Stale = append(rd.rv.Stale, StaleResult{Path: f.Path, Line: ch.Line, Old: ch.Old, New: ch.New})
			lines = append(lines, fmt.Sprint(ch.Line))
		}
		if len(lines) > 0 {
			rd.warn("stale", entryID(rd.nb, f.Path), f.Path, f.Stale[0].Line, fmt.Sprintf("%d result(s) whose inputs changed were not recomputed (line %s): run `cleave calc` (or commit through the hook) and push again",
				len(lines), strings.Join(lines, ", ")))
		}
		for _, ch := range f.Errors {
			rd.rv.Problems = append(rd.rv.Problems, ch.ErrorString())
		}
	}
	for _, p := range rep.Problems {
		rd.rv.Problems = append(rd.rv.Problems, p.Error())
	}
	for _, err := range rep.Failures {
		rd.rv.Problems = append(rd.rv.Problems, err.Error())
	}
}

func entryID(nb *notebook.Notebook, p string) string {
	if f, ok := nb.File(p); ok && f.Entry != nil {
		return f.Entry.ID
	}
	return ""
}

func (rd *reviewer) warn(kind, id, p string, line int, msg string) {
	rd.rv.Warnings = append(rd.rv.Warnings, ReviewWarning{Kind: kind, ID: id, Path: p, Line: line, Message: msg})
}

// relativeChange reads two result texts as quantities and returns (new − old)/|old|.
func relativeChange(old, new string) *float64 {
	a, ok1 := mainQuantity(old)
	b, ok2 := mainQuantity(new)
	if !ok1 || !ok2 || a.Dim() != b.Dim() || a.Value() == 0 {
		return nil
	}
	r := (b.Value() - a.Value()) / math.Abs(a.Value())
	return &r
}

// mainQuantity reads the value a result region shows first: "22.246 ± 0.014 Ohm",
// "(1.07909 ± 0.00068)e6 cm^2/(V s)", or a record's main field "tau_q = 1.5028 ± 0.0035 ps, …".
func mainQuantity(text string) (quantity.Quantity, bool) {
	if text == "" || calcblock.IsError(text) {
		return quantity.Quantity{}, false
	}
	t, _, _ := strings.Cut(text, "; warning:")
	t, rest, _ := strings.Cut(t, ", ")
	if rest != "" && strings.ContainsAny(rest[:1], "0123456789+-.") {
		return quantity.Quantity{}, false // a list of values, not one
	}
	if _, v, ok := strings.Cut(t, " = "); ok {
		t = v
	}
	q, err := quantity.ParseQuantity(strings.TrimSpace(t))
	return q, err == nil
}

// expectation is what a wafer leads a reviewer to expect.
type expectation struct {
	density  quantity.Quantity // expected sheet density; zero value when unknown
	has      bool
	source   string
	material string
	carrier  string
}

// expect reads the wafer of an entry: its designed density (the design_density field, or the
// first expected_density result of its calc blocks), channel material and carrier type.
func (rd *reviewer) expect(e *notebook.Entry) *expectation {
	w, ok := rd.nb.Nearest(e, notebook.KindWafer)
	if !ok {
		return &expectation{}
	}
	if x, ok := rd.wafers[w.ID]; ok {
		return x
	}
	x := &expectation{}
	x.material, _ = w.Text("channel")
	x.carrier, _ = w.Text("carrier")
	if q, err := w.Quantity("design_density"); err == nil && q.Dim() == dimDensity {
		x.density, x.has, x.source = q, true, w.ID+" design_density"
	} else if f, ok := rd.nb.File(w.Path); ok {
		for _, v := range rd.evaluate(f) {
			if r, ok := v.value.(*calc.AnalysisResult); ok && r.Kind == "expected_density" {
				if n, ok := quantityField(r, "n"); ok {
					x.density, x.has, x.source = n, true, fmt.Sprintf("%s expected_density (line %d)", w.ID, v.line)
					break
				}
			}
		}
	}
	rd.wafers[w.ID] = x
	return x
}

// lineValue is the value one calc line evaluated to.
type lineValue struct {
	line  int
	value calc.Value
}

// evaluate runs the calc lines of a file of the head notebook and returns their values.
func (rd *reviewer) evaluate(f *notebook.File) []lineValue {
	blocks, err := calcblock.Find(f.Source())
	if err != nil {
		return nil
	}
	env := compute.NewEnv(rd.fsys, rd.nb, f)
	var out []lineValue
	for _, l := range calcblock.CodeLines(blocks) {
		r := env.EvalLine(l.Input(), l.LineNo)
		if r.Err == nil && r.Value != nil {
			out = append(out, lineValue{l.LineNo, r.Value})
		}
	}
	return out
}

var (
	dimDensity  = quantity.Length.Pow(-2)
	dimMobility = mustDim("1 cm^2/(V s)")
	dimField    = mustDim("1 T")
)

func mustDim(s string) quantity.Dim {
	q, err := quantity.ParseQuantity(s)
	if err != nil {
		panic("hooks: " + err.Error())
	}
	return q.Dim()
}

func quantityField(f calc.Fielder, name string) (quantity.Quantity, bool) {
	v, ok := f.Field(name)
	if !ok {
		return quantity.Quantity{}, false
	}
	q, ok := v.(calc.Quantity)
	return q.Q, ok
}

// physics evaluates every changed entry with calc blocks at the head and looks for what a
// reviewer must see.
func (rd *reviewer) physics(changed []changedFile) {
	for _, c := range changed {
		if c.new.IsZero() || !strings.HasSuffix(c.path, ".md") {
			continue
		}
		if f, ok := rd.nb.File(c.path); ok && f.Entry != nil {
			rd.checkEntry(f)
		}
	}
}

func (rd *reviewer) checkEntry(f *notebook.File) {
	e := f.Entry
	values := rd.evaluate(f)
	if len(values) == 0 {
		return // no calc block, or nothing it computed
	}
	// A finding is reported once per file, however many lines lead to it (the review's own
	// comparison of the Hall and SdH densities and a compare_densities line give the same
	// warning of the engine).
	seen := map[string]bool{}
	warnOnce := func(kind string, line int, key, msg string) {
		if !seen[key] {
			seen[key] = true
			rd.warn(kind, e.ID, f.Path, line, msg)
		}
	}
	warn := func(kind string, line int, msg string) { warnOnce(kind, line, msg, msg) }
	var hall, sdh *calc.AnalysisResult
	var hallLine, sdhLine int
	for _, v := range values {
		r, ok := v.value.(*calc.AnalysisResult)
		if !ok {
			continue
		}
		switch {
		case r.Kind == "hall_density" && hall == nil:
			hall, hallLine = r, v.line
		case r.Kind == "sdh_density" && sdh == nil:
			sdh, sdhLine = r, v.line
		}
	}
	env := compute.NewEnv(rd.fsys, rd.nb, f)

	// Hall against SdH, by the engine's own comparison.
	if hall != nil && sdh != nil {
		env.Set("review_hall", hall)
		env.Set("review_sdh", sdh)
		if v, err := env.Eval("compare_densities(review_hall, review_sdh)"); err == nil {
			if r, ok := v.(*calc.AnalysisResult); ok {
				for _, w := range r.Warnings {
					warnOnce("hall-sdh", sdhLine, w, fmt.Sprintf("Hall (line %d) against SdH (line %d): %s", hallLine, sdhLine, w))
				}
			}
		}
	}
	density, densityLine := quantity.Quantity{}, 0
	if hall != nil {
		if n, ok := quantityField(hall, "n"); ok {
			density, densityLine = n, hallLine
		}
	} else if sdh != nil {
		if n, ok := quantityField(sdh, "n"); ok {
			density, densityLine = n, sdhLine
		}
	}
	x := rd.expect(e)
	T := 0.0
	if q, err := e.Quantity("base_temperature"); err == nil && q.Dim() == quantity.Temperature {
		T = q.Value()
	}

	for _, v := range values {
		// Every warning an analysis gave.
		if r, ok := v.value.(*calc.AnalysisResult); ok {
			for _, w := range r.Warnings {
				warnOnce("analysis", v.line, w, fmt.Sprintf("%s: %s", r.Kind, w))
			}
			if r.Kind == "plateaus" && density.Dim() == dimDensity && densityLine > 0 {
				rd.checkPlateaus(env, r, density, densityLine, v.line, warn)
			}
		}
		// Mobilities against the plausible range of the material.
		q, ok := v.value.(calc.Quantity)
		if !ok || q.Q.Dim() != dimMobility || e.Kind != notebook.KindCooldown {
			continue
		}
		mu := q.Q.Value() * 1e4 // m^2/(V s) → cm^2/(V s)
		rng, known := plausibleMobility(x.material, x.carrier)
		switch {
		case mu < minMobility:
			warn("mobility", v.line, fmt.Sprintf("mobility %.3g cm^2/(V s) is below what any two-dimensional gas in a cryostat shows (%.0f): check the geometry, the units and the density", mu, minMobility))
		case known && mu > rng.upper(T):
			warn("mobility", v.line, fmt.Sprintf("mobility %.3g cm^2/(V s) is above what %s %s have reached at %s (about %.0e; %s): check the geometry, the units and the density",
				mu, x.material, rng.carrier, temperatureText(T), rng.upper(T), rng.source))
		}
	}

	// The measured density against the wafer's expectation.
	if x.has && density.Dim() == dimDensity && e.Kind == notebook.KindCooldown {
		ratio := density.Value() / x.density.Value()
		if math.Abs(ratio-1) > densityTolerance {
			warn("density", densityLine, fmt.Sprintf("measured density %s is %+.0f %% from the expected %s (%s)",
				quantity.Format(density), 100*(ratio-1), quantity.Format(x.density), x.source))
		}
	}
}

// checkPlateaus checks each plateau at positive field against the filling factor the density
// gives there (filling_factor(n, B) at both ends of the plateau, widened by one half).
func (rd *reviewer) checkPlateaus(env *calc.Env, r *calc.AnalysisResult, n quantity.Quantity, nLine, line int, warn func(string, int, string)) {
	list, ok := r.Field("plateaus")
	if !ok {
		return
	}
	items, ok := list.(calc.List)
	if !ok {
		return
	}
	env.Set("review_n", calc.Q(n))
	nuAt := func(B quantity.Quantity) (float64, bool) {
		env.Set("review_B", calc.Q(B))
		v, err := env.Eval("filling_factor(review_n, review_B)")
		if err != nil {
			return 0, false
		}
		q, ok := v.(calc.Quantity)
		return q.Q.Value(), ok
	}
	for _, it := range items {
		rec, ok := it.(calc.Fielder)
		if !ok {
			continue
		}
		nu, ok1 := quantityField(rec, "nu")
		from, ok2 := quantityField(rec, "from")
		to, ok3 := quantityField(rec, "to")
		if !ok1 || !ok2 || !ok3 || from.Dim() != dimField || from.Value() <= 0 {
			continue
		}
		lo, okLo := nuAt(to)
		hi, okHi := nuAt(from)
		if !okLo || !okHi {
			continue
		}
		if v := nu.Value(); v < lo-0.5 || v > hi+0.5 {
			warn("plateau", line, fmt.Sprintf("plateau at ν = %g (%s to %s), but the density on line %d (%s) gives ν = %.2f–%.2f there",
				v, quantity.Format(from), quantity.Format(to), nLine, quantity.Format(n), lo, hi))
		}
	}
}

func temperatureText(T float64) string {
	if T == 0 {
		return "low temperature"
	}
	return quantity.Format(quantity.New(T, quantity.Temperature))
}

// isPlotFile reports whether p is an SVG in a plots folder the tool owns (written by `cleave
// calc` beside an entry): a drawing of results already reviewed, not a data file.
func isPlotFile(p string) bool {
	dir := path.Dir(p)
	return strings.HasSuffix(p, ".svg") && (path.Base(path.Dir(dir)) == plot.Dir || path.Base(dir) == plot.Dir)
}
