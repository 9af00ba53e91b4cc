// Command cleave keeps a semiconductor lab notebook (Markdown files in git) trustworthy: entries
// and their lineage, validation, and calc blocks whose results the tool recomputes and checks.
//
// This file is the command table: flags, wiring and exit codes. Every command calls one
// library function. Exit codes: 0 success, 1 problems found (invalid entries, stale or failed
// results), 2 wrong usage.
package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"os/signal"
	"path/filepath"
	"runtime/debug"
	"runtime/pprof"
	"slices"
	"sort"
	"strconv"
	"strings"
	"syscall"
	"time"
	"unicode/utf8"

	"cleave/calc/plot"
	"cleave/demo"
	"cleave/hooks"
	"cleave/notebook"
	"cleave/notebook/compute"
	"cleave/notebook/plotfiles"
	"cleave/notebook/site"
	"cleave/templates"
)

const version = "0.1.0"

type command struct {
	name, args, summary string
	run                 func(c *cli, args []string) int
}

var commands []command

func init() {
	commands = []command{
		{"init", "[DIR]", "create a notebook: a git repository, the conventional folders and a README", runInit},
		{"new", "KIND ID [--from PARENT]... [--by INITIALS]", "write a new entry from its template (kinds: wafer piece mask process device cooldown)", runNew},
		{"tree", "[ID]", "print the lineage of one sample (ancestors and descendants) or of the whole notebook", runTree},
		{"validate", "", "check every entry: ids, links, kinds, front matter, layer tables, units", runValidate},
		{"calc", "[PATH...]", "recompute calc blocks and write their results", runCalc},
		{"check", "[--staged|--rev REV] [PATH...]", "recompute without writing; list stale results and errors as path:line: old → new (work tree, index or a commit)", runCheck},
		{"eval", "[--in FILE] [--json|--csv] EXPR", "evaluate one expression, in the context of an entry with --in", runEval},
		{"plot", "[--in FILE] EXPR -o OUT.svg", "draw a value (a data set, a fit, a band result, a scorecard, a mask) as an SVG file", runPlot},
		{"site", "DIR", "write the notebook as a static HTML site into DIR (new, empty, or a site written before)", runSite},
		{"serve", "[--addr 127.0.0.1:PORT]", "preview the notebook's site locally; rebuilds what changed and reloads the page", runServe},
		{"history", "ID [--rev REV] [--json]", "the life of a sample: its lineage and, commit by commit, what changed in its records, its ancestors' and their data", runHistory},
		{"review", "BASE..HEAD [--json] [--markdown]", "a report for a pull request: entries changed by lineage, results old → new, stale results, physics warnings", runReview},
		{"hooks", "install|uninstall", "set up (or remove) the hook that recomputes staged results and the merge driver (git runs their subcommands)", runHooks},
		{"demo", "[DIR]", "write the demo notebook (to DIR or a new temp folder) and run everything on it", runDemo},
		{"version", "", "print the version", runVersion},
	}
}

// cli carries the global options and the output streams.
type cli struct {
	dir      string // -C: run as if started in this directory
	out, err io.Writer
}

func main() {
	// A run is short and allocates mostly what it keeps until the end (the notebook, the
	// cache): the garbage collector waits until the heap nears 1 GiB, which a check of ten
	// thousand entries does not reach (about 120 MiB cold), and then works as usual. GOGC or
	// GOMEMLIMIT in the environment take precedence.
	if os.Getenv("GOGC") == "" && os.Getenv("GOMEMLIMIT") == "" {
		debug.SetMemoryLimit(1 << 30)
		debug.SetGCPercent(-1)
	}
	os.Exit(profiled(func() int { return run(os.Args[1:], os.Stdout, os.Stderr) }))
}

// profiled runs f, writing a CPU profile of it to the file CLEAVE_CPUPROFILE names when that
// is set (for contributors measuring a command as users run it: `go tool pprof` reads it).
func profiled(f func() int) int {
	out := os.Getenv("CLEAVE_CPUPROFILE")
	if out == "" {
		return f()
	}
	file, err := os.Create(out)
	if err != nil {
		fmt.Fprintln(os.Stderr, "cleave: CLEAVE_CPUPROFILE:", err)
		return f()
	}
	defer file.Close()
	if err := pprof.StartCPUProfile(file); err != nil {
		fmt.Fprintln(os.Stderr, "cleave: CLEAVE_CPUPROFILE:", err)
		return f()
	}
	defer pprof.StopCPUProfile()
	return f()
}

func run(args []string, stdout, stderr io.Writer) int {
	c := &cli{out: stdout, err: stderr}
	fs := flag.NewFlagSet("cleave", flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.StringVar(&c.dir, "C", "", "run as if cleave was started in `DIR`")
	fs.Usage = func() { usage(stderr) }
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	rest := fs.Args()
	if len(rest) == 0 {
		usage(stderr)
		return 2
	}
	name := rest[0]
	if name == "help" || name == "-h" || name == "--help" {
		if len(rest) > 1 {
			if cmd, ok := lookup(rest[1]); ok {
				fmt.Fprintf(stdout, "usage: cleave %s %s\n  %s\n", cmd.name, cmd.args, cmd.summary)
				return 0
			}
		}
		usage(stdout)
		return 0
	}
	cmd, ok := lookup(name)
	if !ok {
		fmt.Fprintf(stderr, "cleave: unknown command %q\n", name)
		usage(stderr)
		return 2
	}
	if wantsHelp(rest[1:]) {
		fmt.Fprintf(stdout, "usage: cleave %s %s\n  %s\n", cmd.name, cmd.args, cmd.summary)
		return 0
	}
	return cmd.run(c, rest[1:])
}

// wantsHelp reports whether a command's arguments ask for its help (-h, -help or --help
// before any "--").
func wantsHelp(args []string) bool {
	for _, a := range args {
		switch a {
		case "--":
			return false
		case "-h", "-help", "--help":
			return true
		}
	}
	return false
}

// plural is "1 entry" or "3 entries".
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

func lookup(name string) (command, bool) {
	for _, cmd := range commands {
		if cmd.name == name {
			return cmd, true
		}
	}
	return command{}, false
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "usage: cleave [-C DIR] COMMAND [ARGS]")
	fmt.Fprintln(w, "\ncommands:")
	width := 0
	for _, cmd := range commands {
		width = max(width, utf8.RuneCountInString(cmd.args))
	}
	for _, cmd := range commands {
		fmt.Fprintf(w, "  %-9s %-*s %s\n", cmd.name, width, cmd.args, cmd.summary)
	}
	fmt.Fprintln(w, "\n`cleave help COMMAND` shows one command. Exit codes: 0 ok, 1 problems found, 2 wrong usage.")
}

// usageErr prints a command's usage line after a message and returns exit code 2.
func (c *cli) usageErr(name, msg string) int {
	cmd, _ := lookup(name)
	if msg != "" {
		fmt.Fprintf(c.err, "cleave %s: %s\n", name, msg)
	}
	fmt.Fprintf(c.err, "usage: cleave %s %s\n", cmd.name, cmd.args)
	return 2
}

// fail prints an error and returns exit code 1.
func (c *cli) fail(name string, err error) int {
	fmt.Fprintf(c.err, "cleave %s: %v\n", name, err)
	return 1
}

// parse parses flags that may stand before, between or after positional arguments.
func parse(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		if args[0] == "--" {
			return append(pos, args[1:]...), nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func (c *cli) flags(name string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	return fs
}

// root is the notebook the command works on: the git work tree around -C or the current dir.
func (c *cli) root() (string, error) {
	start := c.dir
	if start == "" {
		start = "."
	}
	abs, err := filepath.Abs(start)
	if err != nil {
		return "", err
	}
	r, err := notebook.FindRoot(abs)
	if err != nil {
		return "", fmt.Errorf("no notebook here (%s is not inside a git work tree; run `cleave init` first): %w", abs, err)
	}
	return r, nil
}

// path resolves a command-line path against -C.
func (c *cli) path(p string) string {
	if c.dir == "" || filepath.IsAbs(p) {
		return p
	}
	return filepath.Join(c.dir, p)
}

func runInit(c *cli, args []string) int {
	pos, err := parse(c.flags("init"), args)
	if err != nil || len(pos) > 1 {
		return c.usageErr("init", flagMsg(err, "too many arguments"))
	}
	dir := c.path(".")
	if len(pos) == 1 {
		dir = c.path(pos[0])
	}
	readme, err := templates.Render(nil, "notebook-readme", templates.Data{Date: today()})
	if err != nil {
		return c.fail("init", err)
	}
	created, err := hooks.InitNotebook(dir, readme)
	if err != nil {
		return c.fail("init", err)
	}
	if len(created) == 0 {
		fmt.Fprintf(c.out, "%s is already a notebook; nothing to do\n", dir)
		return 0
	}
	fmt.Fprintf(c.out, "notebook ready in %s: created %s\n", dir, strings.Join(created, " "))
	fmt.Fprintln(c.out, "next: cleave new wafer ID")
	return 0
}

func runNew(c *cli, args []string) int {
	fs := c.flags("new")
	var from multi
	fs.Var(&from, "from", "parent id (repeatable)")
	by := fs.String("by", os.Getenv("CLEAVE_BY"), "initials of the author")
	pos, err := parse(fs, args)
	if err != nil || len(pos) < 2 {
		return c.usageErr("new", flagMsg(err, "need KIND and ID"))
	}
	if len(pos) > 2 {
		return c.usageErr("new", fmt.Sprintf("too many arguments: %q after KIND and ID", pos[2:]))
	}
	kind, id := notebook.Kind(pos[0]), pos[1]
	if !kind.Known() {
		return c.usageErr("new", fmt.Sprintf("unknown kind %q (known: %s)", kind, kindList()))
	}
	root, err := c.root()
	if err != nil {
		return c.fail("new", err)
	}
	nb, err := notebook.LoadDir(root)
	if err != nil {
		return c.fail("new", err)
	}
	if err := nb.CheckNew(kind, id, from); err != nil {
		return c.fail("new", err)
	}
	var override = os.DirFS(filepath.Join(root, "templates"))
	body, err := templates.Render(override, string(kind), templates.Data{Kind: string(kind), ID: id, Parents: from, Date: today(), By: *by})
	if err != nil {
		return c.fail("new", err)
	}
	rel := notebook.DefaultPath(kind, id)
	full := filepath.Join(root, filepath.FromSlash(rel))
	if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
		return c.fail("new", err)
	}
	f, err := os.OpenFile(full, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return c.fail("new", err)
	}
	if _, err := f.Write(body); err != nil {
		f.Close()
		return c.fail("new", err)
	}
	if err := f.Close(); err != nil {
		return c.fail("new", err)
	}
	fmt.Fprintf(c.out, "wrote %s\n", rel)
	return 0
}

func runTree(c *cli, args []string) int {
	pos, err := parse(c.flags("tree"), args)
	if err != nil || len(pos) > 1 {
		return c.usageErr("tree", flagMsg(err, "too many arguments"))
	}
	root, err := c.root()
	if err != nil {
		return c.fail("tree", err)
	}
	nb, err := notebook.LoadDir(root)
	if err != nil {
		return c.fail("tree", err)
	}
	id := ""
	if len(pos) == 1 {
		id = pos[0]
	}
	if err := nb.Tree(c.out, id); err != nil {
		return c.fail("tree", err)
	}
	return 0
}

func runValidate(c *cli, args []string) int {
	pos, err := parse(c.flags("validate"), args)
	if err != nil || len(pos) > 0 {
		return c.usageErr("validate", flagMsg(err, "takes no arguments"))
	}
	root, err := c.root()
	if err != nil {
		return c.fail("validate", err)
	}
	nb, err := notebook.LoadDir(root)
	if err != nil {
		return c.fail("validate", err)
	}
	probs := nb.Validate()
	for _, p := range probs {
		fmt.Fprintln(c.out, p.Error())
	}
	if len(probs) > 0 {
		fmt.Fprintf(c.err, "cleave validate: %s in %s\n", plural(len(probs), "problem", "problems"), plural(len(nb.Entries), "entry", "entries"))
		return 1
	}
	fmt.Fprintf(c.out, "%s, %s: no problems\n", plural(len(nb.Entries), "entry", "entries"), plural(len(nb.Files), "file", "files"))
	return 0
}

func runCalc(c *cli, args []string) int  { return c.recompute("calc", args, true) }
func runCheck(c *cli, args []string) int { return c.recompute("check", args, false) }

func (c *cli) recompute(name string, args []string, write bool) int {
	fs := c.flags(name)
	noCache := fs.Bool("no-cache", false, "evaluate everything, ignoring cached results")
	var staged bool
	var rev string
	if !write {
		fs.BoolVar(&staged, "staged", false, "check the content staged in the git index (what the next commit holds)")
		fs.StringVar(&rev, "rev", "", "check the notebook as commit `REV` holds it")
	}
	pos, err := parse(fs, args)
	if err != nil {
		return c.usageErr(name, flagMsg(err, ""))
	}
	if staged || rev != "" {
		if staged && rev != "" {
			return c.usageErr(name, "--staged and --rev exclude each other")
		}
		return c.checkGit(pos, staged, rev)
	}
	wt, err := c.workTree()
	if err != nil {
		return c.fail(name, err)
	}
	paths := make([]string, len(pos))
	for i, p := range pos {
		paths[i] = c.path(p)
	}
	rel, err := wt.Rel(paths)
	if err != nil {
		return c.fail(name, err)
	}
	res, err := wt.Check(compute.CheckOptions{Write: write, NoCache: *noCache, Paths: rel})
	if err != nil {
		return c.fail(name, err)
	}
	for _, p := range res.Removed {
		fmt.Fprintf(c.err, "cleave %s: removed %s, a temporary file an interrupted calc left\n", name, p)
	}
	if res.Unchanged {
		fmt.Fprintf(c.err, "cleave %s: nothing changed since the last check that found no problem\n", name)
		return 0
	}
	plotProbs, err := c.plotFiles(wt, rel, write, res.Notebook)
	if err != nil {
		return c.fail(name, err)
	}
	if len(plotProbs) > 0 {
		wt.ForgetGoodCheck()
	}
	if write {
		for _, p := range res.Written {
			fmt.Fprintf(c.out, "updated %s\n", p)
		}
		for _, f := range res.Files {
			for _, ch := range f.Errors {
				fmt.Fprintln(c.out, ch.ErrorString())
			}
		}
		for _, p := range res.Problems {
			fmt.Fprintln(c.out, p.Error())
		}
		for _, e := range res.Failures {
			fmt.Fprintln(c.out, e.Error())
		}
		for _, e := range res.WriteFailures {
			fmt.Fprintln(c.out, e.Error())
		}
	} else {
		for _, l := range res.Lines() {
			fmt.Fprintln(c.out, l)
		}
	}
	for _, p := range plotProbs {
		fmt.Fprintln(c.out, p.Error())
	}
	bad := res.Bad(write) + len(plotProbs)
	fmt.Fprintf(c.err, "cleave %s: %d file(s) with calc blocks, %d line(s) evaluated, %d from cache, %d problem(s)\n",
		name, len(res.Files), res.Evaluated, res.CacheHits, bad)
	if bad > 0 {
		return 1
	}
	return 0
}

// plotFiles brings the plot files of plot(...) lines up to date (calc) or reports those that
// are missing or differ from their result regions (check).
func (c *cli) plotFiles(wt compute.WorkTree, rel []string, write bool, nb *notebook.Notebook) ([]plotfiles.Problem, error) {
	in := selectPaths(rel)
	// Only files that may draw a plot need a look, the others are not read again: for a check,
	// those holding a plot result; for calc, which has just written results, those with a
	// calc block.
	sel := func(p string) bool {
		if in != nil && !in(p) {
			return false
		}
		f, ok := nb.File(p)
		if !ok {
			return true
		}
		if write {
			return f.MayHoldBlock()
		}
		return f.MayHoldPlot()
	}
	if !write {
		return plotfiles.Verify(wt.Root, nb, sel)
	}
	r, err := plotfiles.Sync(wt.Root, nb, sel)
	if err != nil {
		return nil, err
	}
	for _, p := range r.Written {
		fmt.Fprintf(c.out, "drew %s\n", p)
	}
	for _, p := range r.Removed {
		fmt.Fprintf(c.out, "removed %s (no plot line draws it)\n", p)
	}
	return r.Problems, nil
}

// selectPaths is a predicate over slash paths for the clean slash paths of a run (nil: all).
func selectPaths(rel []string) func(string) bool {
	if len(rel) == 0 {
		return nil
	}
	return func(p string) bool {
		for _, pre := range rel {
			if pre == "." || p == pre || strings.HasPrefix(p, pre+"/") {
				return true
			}
		}
		return false
	}
}

// checkGit is `cleave check --staged` and `cleave check --rev REV`: the engine over the index
// or a commit, nothing written.
func (c *cli) checkGit(pos []string, staged bool, rev string) int {
	repo, err := hooks.Locate(c.path("."))
	if err != nil {
		return c.fail("check", err)
	}
	paths := make([]string, len(pos))
	for i, p := range pos {
		paths[i] = c.path(p)
	}
	rel, err := repo.Rel(paths)
	if err != nil {
		return c.fail("check", err)
	}
	var rep *compute.Report
	what := "the index"
	if staged {
		rep, err = repo.CheckStaged(rel)
	} else {
		var id string
		rep, id, err = repo.CheckRev(rev, rel)
		what = "commit " + id[:min(len(id), 12)]
	}
	if err != nil {
		return c.fail("check", err)
	}
	lines := rep.Lines()
	for _, l := range lines {
		fmt.Fprintln(c.out, l)
	}
	fmt.Fprintf(c.err, "cleave check: %s: %d file(s) with calc blocks, %d line(s) evaluated, %d from cache, %d problem(s)\n",
		what, len(rep.Files), rep.Evaluated, rep.CacheHits, len(lines))
	if !rep.OK() {
		return 1
	}
	return 0
}

// workTree is the notebook the command runs in, with the tool's state folder under its git
// directory.
func (c *cli) workTree() (compute.WorkTree, error) {
	root, err := c.root()
	if err != nil {
		return compute.WorkTree{}, err
	}
	state, err := hooks.StateDir(root)
	if err != nil {
		state = "" // no git directory: no cache, nothing remembered
	}
	return compute.WorkTree{Root: root, StateDir: state}, nil
}

func runEval(c *cli, args []string) int {
	fs := c.flags("eval")
	in := fs.String("in", "", "evaluate in the context of this entry `FILE`")
	asJSON := fs.Bool("json", false, "print one JSON object: value, unit, display, uncertainty")
	asCSV := fs.Bool("csv", false, "print a data-set value (a data file, a symmetrised sweep, a band profile) as CSV")
	pos, err := parse(fs, args)
	if err != nil || len(pos) == 0 {
		return c.usageErr("eval", flagMsg(err, "need an expression"))
	}
	expr := strings.Join(pos, " ")
	root := ""
	if *in != "" {
		if root, err = c.root(); err != nil {
			return c.fail("eval", err)
		}
		*in = c.path(*in)
	}
	v, err := compute.Eval(root, *in, expr)
	if err != nil {
		return c.fail("eval", err)
	}
	if *asCSV {
		if err := compute.WriteCSV(c.out, v); err != nil {
			return c.fail("eval", err)
		}
		return 0
	}
	if *asJSON {
		enc := json.NewEncoder(c.out)
		if err := enc.Encode(compute.JSONOf(v)); err != nil {
			return c.fail("eval", err)
		}
		return 0
	}
	fmt.Fprintln(c.out, compute.JSONOf(v).Display)
	return 0
}

func runPlot(c *cli, args []string) int {
	fs := c.flags("plot")
	in := fs.String("in", "", "evaluate in the context of this entry `FILE`")
	out := fs.String("o", "", "write the SVG to `FILE` (- for standard output)")
	pos, err := parse(fs, args)
	if err != nil || len(pos) == 0 {
		return c.usageErr("plot", flagMsg(err, "need an expression"))
	}
	if *out == "" {
		return c.usageErr("plot", "need -o OUT.svg (or -o - for standard output)")
	}
	expr := strings.Join(pos, " ")
	root := ""
	if *in != "" {
		if root, err = c.root(); err != nil {
			return c.fail("plot", err)
		}
		*in = c.path(*in)
	}
	env, err := compute.EvalEnv(root, *in)
	if err != nil {
		return c.fail("plot", err)
	}
	if *in == "" {
		env.Register(plot.Func(""))
	}
	v, err := env.Eval(expr)
	if err != nil {
		return c.fail("plot", err)
	}
	fig, ok := v.(*plot.Figure)
	var svg []byte
	if ok {
		svg = fig.SVG
	} else {
		pic, err := plot.Draw(v, plot.Options{})
		if err != nil {
			return c.fail("plot", err)
		}
		svg = pic.SVG
	}
	if *out == "-" {
		_, err = c.out.Write(svg)
	} else {
		err = os.WriteFile(c.path(*out), svg, 0o644)
	}
	if err != nil {
		return c.fail("plot", err)
	}
	if *out != "-" {
		fmt.Fprintf(c.out, "wrote %s\n", *out)
	}
	return 0
}

func runSite(c *cli, args []string) int {
	pos, err := parse(c.flags("site"), args)
	if err != nil || len(pos) != 1 {
		return c.usageErr("site", flagMsg(err, "need the folder to write the site into"))
	}
	root, err := c.root()
	if err != nil {
		return c.fail("site", err)
	}
	s, err := site.Build(root, site.Options{})
	if err != nil {
		return c.fail("site", err)
	}
	dir := c.path(pos[0])
	if err := s.Write(dir); err != nil {
		return c.fail("site", err)
	}
	abs, _ := filepath.Abs(filepath.Join(dir, "index.html"))
	fmt.Fprintf(c.out, "wrote %d files; open file://%s\n", len(s.Files), filepath.ToSlash(abs))
	return 0
}

// serveReady, when set (by tests), hears the address the preview listens on.
var serveReady func(addr string)

// serveStop, when set (by tests), ends the preview.
var serveStop context.Context

func runServe(c *cli, args []string) int {
	fs := c.flags("serve")
	addr := fs.String("addr", "127.0.0.1:8765", "listen on `HOST:PORT` (loopback by default)")
	pos, err := parse(fs, args)
	if err != nil || len(pos) > 0 {
		return c.usageErr("serve", flagMsg(err, "takes no arguments"))
	}
	root, err := c.root()
	if err != nil {
		return c.fail("serve", err)
	}
	if host, _, err := net.SplitHostPort(*addr); err != nil {
		return c.usageErr("serve", fmt.Sprintf("--addr %q: %v", *addr, err))
	} else if ip := net.ParseIP(host); host != "localhost" && (ip == nil || !ip.IsLoopback()) {
		fmt.Fprintf(c.err, "cleave serve: warning: %s is not a loopback address; the notebook is visible to other machines\n", host)
	}
	srv, err := site.NewServer(root)
	if err != nil {
		return c.fail("serve", err)
	}
	ln, err := net.Listen("tcp", *addr)
	if err != nil {
		return c.fail("serve", err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	if serveStop != nil {
		var cancel context.CancelFunc
		ctx, cancel = context.WithCancel(ctx)
		go func() { <-serveStop.Done(); cancel() }()
	}
	go srv.Watch(ctx, 500*time.Millisecond, func(changed bool, err error) {
		if err != nil {
			fmt.Fprintf(c.err, "cleave serve: rebuild failed: %v\n", err)
		} else if changed {
			fmt.Fprintln(c.err, "cleave serve: rebuilt")
		}
	})
	hs := &http.Server{Handler: srv, ReadHeaderTimeout: 10 * time.Second}
	go func() { <-ctx.Done(); _ = hs.Close() }()
	fmt.Fprintf(c.out, "serving the notebook at http://%s/ (Ctrl-C stops)\n", ln.Addr())
	if serveReady != nil {
		serveReady(ln.Addr().String())
	}
	if err := hs.Serve(ln); err != nil && !errors.Is(err, http.ErrServerClosed) {
		return c.fail("serve", err)
	}
	return 0
}

func runHistory(c *cli, args []string) int {
	fs := c.flags("history")
	rev := fs.String("rev", "HEAD", "read the lineage at commit `REV` and walk back from it")
	asJSON := fs.Bool("json", false, "print the history as one JSON object")
	pos, err := parse(fs, args)
	if err != nil || len(pos) != 1 {
		return c.usageErr("history", flagMsg(err, "need one ID"))
	}
	repo, err := hooks.Locate(c.path("."))
	if err != nil {
		return c.fail("history", err)
	}
	h, err := repo.SampleHistory(pos[0], *rev)
	if err != nil {
		return c.fail("history", err)
	}
	if *asJSON {
		enc := json.NewEncoder(c.out)
		enc.SetIndent("", "  ")
		if err := enc.Encode(h); err != nil {
			return c.fail("history", err)
		}
		return 0
	}
	h.WriteText(c.out)
	return 0
}

func runReview(c *cli, args []string) int {
	fs := c.flags("review")
	asJSON := fs.Bool("json", false, "print the review as one JSON object")
	asMarkdown := fs.Bool("markdown", false, "print the review as Markdown, ready to paste as a pull-request comment")
	pos, err := parse(fs, args)
	if err != nil || len(pos) != 1 {
		return c.usageErr("review", flagMsg(err, "need one range BASE..HEAD"))
	}
	if *asJSON && *asMarkdown {
		return c.usageErr("review", "--json and --markdown exclude each other")
	}
	repo, err := hooks.Locate(c.path("."))
	if err != nil {
		return c.fail("review", err)
	}
	rv, err := repo.ReviewRange(pos[0])
	if err != nil {
		return c.fail("review", err)
	}
	switch {
	case *asJSON:
		enc := json.NewEncoder(c.out)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rv); err != nil {
			return c.fail("review", err)
		}
	case *asMarkdown:
		rv.WriteMarkdown(c.out)
	default:
		rv.WriteText(c.out)
	}
	return 0
}

func runHooks(c *cli, args []string) int {
	if len(args) == 0 {
		return c.usageErr("hooks", "need install, uninstall, pre-commit or merge")
	}
	sub, rest := args[0], args[1:]
	switch sub {
	case "install", "uninstall":
		pos, err := parse(c.flags("hooks"), rest)
		if err != nil || len(pos) > 0 {
			return c.usageErr("hooks", flagMsg(err, sub+" takes no arguments"))
		}
		var done []string
		if sub == "install" {
			bin, _ := os.Executable()
			done, err = hooks.Install(c.path("."), bin)
		} else {
			done, err = hooks.Uninstall(c.path("."))
		}
		for _, d := range done {
			fmt.Fprintln(c.out, d)
		}
		if err != nil {
			return c.fail("hooks "+sub, err)
		}
		return 0
	case "pre-commit", "pre-merge-commit":
		fs := c.flags("hooks")
		framework := fs.Bool("framework", false, "leave the index alone: write results into the work tree and fail (for the general-purpose hook framework)")
		pos, err := parse(fs, rest)
		if err != nil || len(pos) > 0 {
			return c.usageErr("hooks", flagMsg(err, sub+" takes no arguments"))
		}
		mode := hooks.StageResults
		switch {
		case *framework:
			mode = hooks.FixWorkTree
		case sub == "pre-merge-commit":
			mode = hooks.StageAndStop
		}
		h, err := hooks.PreCommit(c.path("."), mode)
		if err != nil {
			return c.fail("pre-commit", err)
		}
		return c.hookReport("cleave "+sub, h, mode)
	case "merge":
		return c.mergeDriver(rest)
	}
	return c.usageErr("hooks", fmt.Sprintf("unknown subcommand %q", sub))
}

// mergeDriver is `cleave hooks merge O A B L P`, run by git as the merge driver: exit 0 for a
// clean merge, 1 when conflicts are left with markers, and above 128 when nothing could be
// written (git then stops the merge rather than take the current side as merged).
func (c *cli) mergeDriver(args []string) int {
	if len(args) != 5 {
		return c.usageErr("hooks", "merge needs the ancestor, current and other files, the marker size and the path (%O %A %B %L %P)")
	}
	size, err := strconv.Atoi(args[3])
	if err != nil || size <= 0 {
		return c.usageErr("hooks", fmt.Sprintf("merge: marker size %q is not a positive number", args[3]))
	}
	root, err := c.root()
	if err != nil {
		root = "" // no work tree (a bare repository): nothing to recompute in
	}
	res, err := hooks.MergeDriver(root, args[0], args[1], args[2], size, args[4])
	if err != nil {
		fmt.Fprintf(c.err, "cleave merge driver: %s: %v\n", args[4], err)
		return 255
	}
	switch {
	case res.Conflicts > 0:
		fmt.Fprintf(c.err, "cleave merge driver: %s: %d conflict(s) left with markers", args[4], res.Conflicts)
		if res.Resolved > 0 {
			fmt.Fprintf(c.err, "; %d conflict(s) inside result regions resolved (recompute after resolving the rest)", res.Resolved)
		}
		fmt.Fprintln(c.err)
		return 1
	case res.Recomputed:
		fmt.Fprintf(c.err, "cleave merge driver: %s: %d conflict(s) inside result regions resolved by recomputing the merged file\n", args[4], res.Resolved)
	case res.Resolved > 0:
		fmt.Fprintf(c.err, "cleave merge driver: %s: %d conflict(s) inside result regions resolved with the current side's results (%s)\n", args[4], res.Resolved, res.Note)
	}
	return 0
}

// hookReport prints what the pre-commit hook found and did, and returns the exit code that lets
// the commit go on (0) or stops it (1).
func (c *cli) hookReport(name string, h *hooks.HookReport, mode hooks.HookMode) int {
	if h.Operation != "" {
		name += " (during a " + h.Operation + ")"
	}
	if len(h.Unmerged) > 0 {
		for _, p := range h.Unmerged {
			fmt.Fprintf(c.out, "%s:1:1: unmerged: resolve the conflict and git add the file\n", p)
		}
		fmt.Fprintf(c.err, "%s: resolve the conflicts first; nothing was changed\n", name)
		return 1
	}
	rep := h.Report
	for _, l := range rep.Lines() {
		fmt.Fprintln(c.out, l)
	}
	if h.Blocked(mode) {
		switch {
		case h.Failed():
			fmt.Fprintf(c.err, "%s: the staged notebook has the problems listed above; fix them and stage the fix (or commit with --no-verify); nothing was changed\n", name)
		case mode == hooks.StageAndStop:
			for _, p := range h.Staged {
				fmt.Fprintf(c.out, "recomputed %s\n", p)
			}
			fmt.Fprintf(c.err, "%s: the merged notebook had stale results; they are recomputed and staged. git writes a merge commit before this hook runs, so it stops here: run `git commit` to conclude the merge with them\n", name)
		case h.TempIndex:
			fmt.Fprintf(c.err, "%s: the results listed above are stale in what this commit holds, and `git commit PATH...` commits a temporary index that the hook cannot update; nothing was changed.\nStage the files and commit without paths, so the hook recomputes them in the index:\n    git add PATH... && git commit\n", name)
		default:
			for _, p := range h.WorkTree {
				fmt.Fprintf(c.out, "recomputed %s in the work tree\n", p)
			}
			for _, k := range h.Kept {
				fmt.Fprintf(c.out, "kept %s\n", k)
			}
			fmt.Fprintf(c.err, "%s: results were stale and are recomputed in the work tree; review and stage them, then commit again\n", name)
		}
		return 1
	}
	if len(h.Staged) > 0 {
		for _, p := range h.Staged {
			where := "index"
			if slices.Contains(h.WorkTree, p) {
				where = "index and work tree"
			}
			fmt.Fprintf(c.out, "recomputed %s (%s)\n", p, where)
		}
		for _, k := range h.Kept {
			fmt.Fprintf(c.out, "kept %s\n", k)
		}
		fmt.Fprintf(c.err, "%s: %d file(s) with stale results recomputed and staged; the commit goes on\n", name, len(h.Staged))
	}
	return 0
}

func runVersion(c *cli, args []string) int {
	pos, err := parse(c.flags("version"), args)
	if err != nil || len(pos) > 0 {
		return c.usageErr("version", flagMsg(err, "takes no arguments"))
	}
	fmt.Fprintln(c.out, "cleave", version)
	return 0
}

func runDemo(c *cli, args []string) int {
	pos, err := parse(c.flags("demo"), args)
	if err != nil || len(pos) > 1 {
		return c.usageErr("demo", flagMsg(err, "too many arguments"))
	}
	dir := ""
	if len(pos) == 1 {
		dir = c.path(pos[0])
	}
	if err := demo.Run(demo.Scenario(), dir, c.out); err != nil {
		return c.fail("demo", err)
	}
	return 0
}

type multi []string

func (m *multi) String() string     { return strings.Join(*m, ",") }
func (m *multi) Set(v string) error { *m = append(*m, v); return nil }

func flagMsg(err error, otherwise string) string {
	if err != nil {
		return err.Error()
	}
	return otherwise
}

func kindList() string {
	var ks []string
	for _, k := range notebook.Kinds() {
		ks = append(ks, string(k))
	}
	sort.Strings(ks)
	return strings.Join(ks, ", ")
}

func today() string { return time.Now().Format("2006-01-02") }
