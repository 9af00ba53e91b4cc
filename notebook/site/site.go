// Package site writes a notebook as a static HTML site: one page per Markdown file (an
// entry's page shows its kind, its front matter, its ancestors and children as navigation,
// its text with calc blocks as tables and its plots), an index page, an index per kind, a
// table per wafer of its devices' key results, and an offline search over ids, titles and
// fields. The output is deterministic: the same notebook gives the same bytes.
//
// Nothing from an entry reaches a page as markup: raw HTML is dropped, text is escaped,
// links go only to http(s), mailto, fragments or other pages of the site, images only to
// raster images inside the notebook (copied byte for byte after a check of their first
// bytes) and to plots, which are drawn afresh from the blocks (a plot file on disk is never
// copied, so an SVG with script in the notebook never reaches the site).
package site

import (
	"bytes"
	"crypto/sha256"
	"embed"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"html/template"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/parser"
	"github.com/yuin/goldmark/text"
	"github.com/yuin/goldmark/util"
	"go.yaml.in/yaml/v3"

	"cleave/notebook"
	"cleave/notebook/calcblock"
	"cleave/notebook/plotfiles"
	"cleave/notebook/render"
)

//go:embed assets/*
var assets embed.FS

// Options tune a build.
type Options struct {
	// Live adds the script that reloads a page when `cleave serve` rebuilt the site.
	Live bool
}

// Site is a built site: file contents by slash path.
type Site struct {
	Files map[string][]byte
}

// Paths lists the site's files, sorted.
func (s *Site) Paths() []string {
	out := make([]string, 0, len(s.Files))
	for p := range s.Files {
		out = append(out, p)
	}
	sort.Strings(out)
	return out
}

// marker is the file that marks a folder as a site cleave wrote (so that a later build may
// replace it).
const marker = ".cleave-site"

// Write writes the site into dir, which must be new, empty, or a site written before (its
// files not in this build are removed).
func (s *Site) Write(dir string) error {
	ents, err := os.ReadDir(dir)
	switch {
	case os.IsNotExist(err):
	case err != nil:
		return err
	case len(ents) > 0:
		if _, err := os.Stat(filepath.Join(dir, marker)); err != nil {
			return fmt.Errorf("%s is not empty and holds no site written by cleave; choose a new folder", dir)
		}
		old := map[string]bool{}
		_ = filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
			if err == nil && !d.IsDir() {
				rel, _ := filepath.Rel(dir, p)
				old[filepath.ToSlash(rel)] = true
			}
			return nil
		})
		for p := range old {
			if _, ok := s.Files[p]; !ok && p != marker {
				os.Remove(filepath.Join(dir, filepath.FromSlash(p)))
			}
		}
	}
	for _, p := range s.Paths() {
		full := filepath.Join(dir, filepath.FromSlash(p))
		if old, err := os.ReadFile(full); err == nil && bytes.Equal(old, s.Files[p]) {
			continue
		}
		if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(full, s.Files[p], 0o644); err != nil {
			return err
		}
	}
	return os.WriteFile(filepath.Join(dir, marker), []byte("written by cleave site\n"), 0o644)
}

// Builder builds sites of one notebook folder and keeps what it rendered, so that a rebuild
// after a change renders again only the files whose text changed (and the plots, when
// anything they could read changed).
type Builder struct {
	Root string
	Opt  Options

	mu     sync.Mutex
	bodies map[string]*body               // hash of (path, text, plots drawn) → body HTML
	plots  map[string]map[string]*plotSVG // hash of (path, text, inputs) → path → svg
}

type plotSVG struct{ svg []byte }

// body is a rendered page body and the raster images it shows (to copy).
type body struct {
	html    []byte
	rasters []string
}

// Build builds the site of the notebook at root.
func Build(root string, opt Options) (*Site, error) {
	b := &Builder{Root: root, Opt: opt}
	return b.Build()
}

// Build builds the site of b.Root, reusing what an earlier build rendered.
func (b *Builder) Build() (*Site, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.bodies == nil {
		b.bodies, b.plots = map[string]*body{}, map[string]map[string]*plotSVG{}
	}
	fsys := os.DirFS(b.Root)
	nb, err := notebook.Load(fsys)
	if err != nil {
		return nil, err
	}
	st := &build{b: b, fsys: fsys, nb: nb, site: &Site{Files: map[string][]byte{}}, inputs: inputsDigest(b.Root)}
	if err := st.run(); err != nil {
		return nil, err
	}
	return st.site, nil
}

// build is one run.
type build struct {
	b      *Builder
	fsys   fs.FS
	nb     *notebook.Notebook
	site   *Site
	inputs string

	mu      sync.Mutex
	index   []searchItem
	used    map[string]bool // bodies and plot sets this build used (the rest is dropped)
	rasters map[string]bool // images to copy
}

type searchItem struct {
	ID    string `json:"id"`
	Title string `json:"title"`
	Kind  string `json:"kind"`
	URL   string `json:"url"`
	Text  string `json:"text"`
}

func (st *build) put(p string, data []byte) {
	st.mu.Lock()
	st.site.Files[p] = data
	st.mu.Unlock()
}

func (st *build) run() error {
	st.used = map[string]bool{}
	st.rasters = map[string]bool{}
	for _, name := range []string{"style.css", "search.js", "live.js", "icon.svg"} {
		data, err := assets.ReadFile("assets/" + name)
		if err != nil {
			return err
		}
		if name == "live.js" && !st.b.Opt.Live {
			continue
		}
		st.put("_cleave/"+name, data)
	}
	// Pages, in parallel: each worker has its own Markdown converter.
	files := st.nb.Files
	errs := make([]error, len(files))
	var next int
	var nmu sync.Mutex
	var wg sync.WaitGroup
	for range max(1, min(runtime.GOMAXPROCS(0), len(files))) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			pr := st.newPageRenderer()
			for {
				nmu.Lock()
				i := next
				next++
				nmu.Unlock()
				if i >= len(files) {
					return
				}
				errs[i] = pr.page(files[i])
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	for p := range st.rasters {
		// Only regular files: a FIFO named like an image would block the build for ever.
		if fi, err := fs.Stat(st.fsys, p); err != nil || !fi.Mode().IsRegular() {
			continue
		}
		data, err := fs.ReadFile(st.fsys, p)
		if err == nil && isRaster(data) {
			st.put(p, data)
		}
	}
	if err := st.indexes(); err != nil {
		return err
	}
	sort.Slice(st.index, func(i, j int) bool { return st.index[i].URL < st.index[j].URL })
	js, err := json.Marshal(st.index)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	buf.WriteString("window.cleaveIndex = ")
	buf.Write(js)
	buf.WriteString(";\n")
	st.put("_cleave/search-index.js", buf.Bytes())
	// Keep only what this build used.
	for k := range st.b.bodies {
		if !st.used[k] {
			delete(st.b.bodies, k)
		}
	}
	for k := range st.b.plots {
		if !st.used[k] {
			delete(st.b.plots, k)
		}
	}
	return nil
}

// pageURL is the site path of the page of the Markdown file at p.
func pageURL(p string) string { return strings.TrimSuffix(p, ".md") + ".html" }

// rel is the address of the site path target from the page at site path from.
func rel(from, target string) string {
	depth := strings.Count(from, "/")
	return strings.Repeat("../", depth) + target
}

// pageRenderer renders pages one at a time with its own goldmark instance.
type pageRenderer struct {
	st      *build
	md      goldmark.Markdown
	file    string          // the Markdown file being rendered
	plots   map[string]bool // plot paths (relative to the file's folder) drawn for it
	rasters []string        // raster images the body shows (slash paths in the notebook)
}

func (st *build) newPageRenderer() *pageRenderer {
	pr := &pageRenderer{st: st}
	pr.md = goldmark.New(
		goldmark.WithExtensions(extension.GFM, render.Blocks(render.WithImageURL(func(p string) (string, bool) {
			return p, pr.plots[p]
		}))),
		goldmark.WithParserOptions(parser.WithASTTransformers(util.Prioritized(&linkGuard{pr: pr}, 100))),
	)
	return pr
}

// entryPage is what the page template shows.
type entryPage struct {
	Base      string // the way back to the site's root ("../" per folder level)
	Live      bool
	Title     string
	ID, Kind  string
	Path      string
	Fields    []fieldRow
	Ancestors []link
	Children  []link
	Wafer     *waferTable
	Body      template.HTML
}

type link struct {
	URL, ID, Kind, Title string
}

type fieldRow struct {
	Name  string
	Value string
	Block bool // shown as preformatted YAML
}

func (pr *pageRenderer) page(f *notebook.File) error {
	st := pr.st
	pr.file = f.Path
	url := pageURL(f.Path)
	raw := f.Source().Raw
	// Plots: drawn from the blocks (never copied from disk), cached while nothing they could
	// read changed.
	pr.plots = map[string]bool{}
	var drawn []string
	if refs := plotfiles.Refs(f.Path, raw); len(refs) > 0 {
		key := hashOf("plots", f.Path, string(raw), st.inputs)
		st.mu.Lock()
		set, ok := st.b.plots[key]
		st.used[key] = true
		st.mu.Unlock()
		if !ok {
			set = map[string]*plotSVG{}
			figs, err := plotfiles.Draw(st.fsys, st.nb, f.Path)
			if err == nil {
				for _, fig := range figs {
					set[fig.Path] = &plotSVG{svg: fig.SVG}
				}
			}
			st.mu.Lock()
			st.b.plots[key] = set
			st.mu.Unlock()
		}
		for p, s := range set {
			pr.plots[p] = true
			drawn = append(drawn, p)
			st.put(path.Join(path.Dir(f.Path), p), s.svg)
		}
		sort.Strings(drawn)
	}
	key := hashOf("body", f.Path, string(raw), strings.Join(drawn, "\x00"))
	st.mu.Lock()
	cached, ok := st.b.bodies[key]
	st.used[key] = true
	st.mu.Unlock()
	if !ok {
		var buf bytes.Buffer
		pr.rasters = nil
		if err := pr.md.Convert(f.Source().Masked(), &buf); err != nil {
			return fmt.Errorf("%s: %w", f.Path, err)
		}
		cached = &body{html: buf.Bytes(), rasters: pr.rasters}
		st.mu.Lock()
		st.b.bodies[key] = cached
		st.mu.Unlock()
	}
	st.mu.Lock()
	for _, r := range cached.rasters {
		st.rasters[r] = true
	}
	st.mu.Unlock()
	body := cached.html
	pg := entryPage{Base: rel(url, ""), Live: st.b.Opt.Live, Path: f.Path, Body: template.HTML(body), Title: f.Path}
	item := searchItem{Title: f.Path, URL: url}
	if e := f.Entry; e != nil {
		pg.ID, pg.Kind = e.ID, string(e.Kind)
		pg.Title = e.ID
		if t, ok := e.Text("title"); ok && t != "" {
			pg.Title = e.ID + " — " + t
			item.Title = t
		} else {
			item.Title = e.ID
		}
		item.ID, item.Kind = e.ID, string(e.Kind)
		pg.Fields, item.Text = fields(e)
		for _, a := range st.nb.Ancestors(e.ID) {
			pg.Ancestors = append(pg.Ancestors, st.linkTo(url, a))
		}
		for _, c := range st.nb.Children(e) {
			pg.Children = append(pg.Children, st.linkTo(url, c))
		}
		if e.Kind == notebook.KindWafer {
			pg.Wafer = st.waferTable(url, e)
		}
	}
	var out bytes.Buffer
	if err := pageTmpl().Execute(&out, pg); err != nil {
		return err
	}
	st.put(url, out.Bytes())
	st.mu.Lock()
	st.index = append(st.index, item)
	st.mu.Unlock()
	return nil
}

func (st *build) linkTo(from string, e *notebook.Entry) link {
	l := link{URL: rel(from, pageURL(e.Path)), ID: e.ID, Kind: string(e.Kind)}
	if t, ok := e.Text("title"); ok {
		l.Title = t
	}
	return l
}

// fields lists an entry's front matter (scalars as text, the rest as YAML) and the text the
// search looks in.
func fields(e *notebook.Entry) ([]fieldRow, string) {
	front := e.Front()
	if front == nil || front.Kind != yaml.MappingNode {
		return nil, ""
	}
	var rows []fieldRow
	var words []string
	for i := 0; i+1 < len(front.Content); i += 2 {
		k, v := front.Content[i], front.Content[i+1]
		if k.Value == "id" || k.Value == "kind" || k.Value == "title" {
			continue
		}
		r := fieldRow{Name: k.Value}
		if v.Kind == yaml.ScalarNode {
			r.Value = v.Value
		} else {
			out, err := yaml.Marshal(v)
			if err == nil {
				r.Value = strings.TrimRight(string(out), "\n")
			}
			r.Block = true
		}
		rows = append(rows, r)
		words = append(words, k.Value+": "+r.Value)
	}
	return rows, strings.Join(words, " ")
}

func hashOf(parts ...string) string {
	h := sha256.New()
	for _, p := range parts {
		fmt.Fprintf(h, "%d:%s", len(p), p)
	}
	return hex.EncodeToString(h.Sum(nil)[:16])
}

// inputsDigest hashes the stat data of every file under root but the site's own plots
// folders and .git: anything a plot could read.
func inputsDigest(root string) string {
	h := sha256.New()
	_ = filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return nil
		}
		if d.IsDir() && (d.Name() == ".git" || d.Name() == "plots") && p != root {
			return filepath.SkipDir
		}
		if d.IsDir() {
			return nil
		}
		fi, err := d.Info()
		if err != nil {
			return nil
		}
		fmt.Fprintf(h, "%s\x00%d\x00%d\n", p, fi.Size(), fi.ModTime().UnixNano())
		return nil
	})
	return hex.EncodeToString(h.Sum(nil))
}

// isRaster reports whether data starts like a PNG, JPEG, GIF or WebP image.
func isRaster(data []byte) bool {
	switch {
	case bytes.HasPrefix(data, []byte("\x89PNG\r\n\x1a\n")),
		bytes.HasPrefix(data, []byte("\xff\xd8\xff")),
		bytes.HasPrefix(data, []byte("GIF87a")), bytes.HasPrefix(data, []byte("GIF89a")):
		return true
	case len(data) > 12 && bytes.Equal(data[:4], []byte("RIFF")) && bytes.Equal(data[8:12], []byte("WEBP")):
		return true
	}
	return false
}

// linkGuard rewrites the links and images of a page: see the package comment.
type linkGuard struct{ pr *pageRenderer }

var rasterExt = map[string]bool{".png": true, ".jpg": true, ".jpeg": true, ".gif": true, ".webp": true}

// Transform implements parser.ASTTransformer.
func (g *linkGuard) Transform(doc *ast.Document, reader text.Reader, _ parser.Context) {
	src := reader.Source()
	var replace []ast.Node
	_ = ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		switch x := n.(type) {
		case *ast.Link:
			if d, ok := g.linkDest(string(x.Destination)); ok {
				x.Destination = []byte(d)
				x.Title = nil
			} else {
				replace = append(replace, x)
			}
		case *ast.Image:
			if d, ok := g.imageDest(string(x.Destination)); ok {
				x.Destination = []byte(d)
			} else {
				replace = append(replace, x)
			}
		case *ast.AutoLink:
			u := string(x.URL(src))
			if _, ok := g.linkDest(u); !ok || x.AutoLinkType != ast.AutoLinkURL {
				replace = append(replace, x)
			}
		case *ast.RawHTML, *ast.HTMLBlock:
			replace = append(replace, x)
		}
		return ast.WalkContinue, nil
	})
	for _, n := range replace {
		p := n.Parent()
		if p == nil {
			continue
		}
		switch x := n.(type) {
		case *ast.Link:
			for c := x.FirstChild(); c != nil; {
				next := c.NextSibling()
				p.InsertBefore(p, x, c)
				c = next
			}
			p.RemoveChild(p, x)
		case *ast.Image:
			alt := ast.NewString([]byte("[image: " + plainText(x, src) + "]"))
			p.ReplaceChild(p, x, alt)
		case *ast.AutoLink:
			p.ReplaceChild(p, x, ast.NewString(x.URL(src)))
		default:
			p.RemoveChild(p, n)
		}
	}
}

func plainText(n ast.Node, src []byte) string {
	var b strings.Builder
	_ = ast.Walk(n, func(c ast.Node, entering bool) (ast.WalkStatus, error) {
		if entering {
			if t, ok := c.(*ast.Text); ok {
				b.Write(t.Segment.Value(src))
			}
		}
		return ast.WalkContinue, nil
	})
	return b.String()
}

// linkDest is the address a link keeps: http(s) and mailto as they are, a fragment, or
// another Markdown file of the notebook as its page. Anything else is dropped.
func (g *linkGuard) linkDest(d string) (string, bool) {
	d = strings.TrimSpace(d)
	lower := strings.ToLower(d)
	switch {
	case d == "":
		return "", false
	case strings.HasPrefix(lower, "http://"), strings.HasPrefix(lower, "https://"), strings.HasPrefix(lower, "mailto:"):
		if strings.ContainsAny(d, "\"'<>` \t\r\n\\") {
			return "", false
		}
		return d, true
	case strings.HasPrefix(d, "#"):
		return d, !strings.ContainsAny(d, "\"'<> ")
	}
	target, frag, ok := g.local(d)
	if !ok {
		return "", false
	}
	if strings.HasSuffix(target, ".md") {
		if _, ok := g.pr.st.nb.File(target); ok {
			return rel(pageURL(g.pr.file), pageURL(target)) + frag, true
		}
		return "", false
	}
	if rasterExt[strings.ToLower(path.Ext(target))] {
		g.pr.rasters = append(g.pr.rasters, target)
		return rel(pageURL(g.pr.file), target), true
	}
	return "", false
}

// imageDest is the address an image keeps: a raster image inside the notebook (copied to
// the site) or a plot drawn for this file.
func (g *linkGuard) imageDest(d string) (string, bool) {
	target, _, ok := g.local(strings.TrimSpace(d))
	if !ok {
		return "", false
	}
	dir := path.Dir(g.pr.file)
	if r, err := filepath.Rel(dir, target); err == nil && g.pr.plots[filepath.ToSlash(r)] {
		return rel(pageURL(g.pr.file), target), true
	}
	if rasterExt[strings.ToLower(path.Ext(target))] {
		g.pr.rasters = append(g.pr.rasters, target)
		return rel(pageURL(g.pr.file), target), true
	}
	return "", false
}

// local resolves a relative address (no scheme, no leading slash) against the page's file:
// the slash path inside the notebook and the fragment. ok is false for anything that leaves
// the notebook or is not a plain path.
func (g *linkGuard) local(d string) (target, frag string, ok bool) {
	if d == "" || strings.Contains(d, ":") || strings.HasPrefix(d, "/") || strings.HasPrefix(d, "\\") || strings.ContainsAny(d, "?\"'<>\\ \t\r\n") {
		return "", "", false
	}
	if i := strings.IndexByte(d, '#'); i >= 0 {
		d, frag = d[:i], d[i:]
	}
	target = path.Join(path.Dir(g.pr.file), d)
	if target == "." || strings.HasPrefix(target, "../") || target == ".." || !fs.ValidPath(target) {
		return "", "", false
	}
	for _, part := range strings.Split(target, "/") {
		if strings.HasPrefix(part, ".") {
			return "", "", false
		}
	}
	return target, frag, true
}

// calcValue is the stored result of the first code line of the file that assigns name.
func calcValue(f *notebook.File, names ...string) string {
	blocks, err := calcblock.Find(f.Source())
	if err != nil {
		return ""
	}
	for _, name := range names {
		for _, l := range calcblock.CodeLines(blocks) {
			code := strings.TrimSpace(l.Code)
			if strings.HasPrefix(code, name) {
				rest := strings.TrimSpace(code[len(name):])
				if strings.HasPrefix(rest, "=") && !strings.HasPrefix(rest, "==") && l.Old != "" {
					return l.Old
				}
			}
		}
	}
	return ""
}
