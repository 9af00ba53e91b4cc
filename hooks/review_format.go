package hooks

import (
	"fmt"
	"io"
	"strings"
)

// The review as text for a terminal and as Markdown for a pull-request comment. Both list the
// same things in the same order: what to look at first (warnings, problems, stale results),
// then the changes by lineage, the data files and the commits.

func short7(id string) string { return id[:min(7, len(id))] }

// relText formats a relative change as a percentage with a sign ("" when there is none).
func relText(r *float64) string {
	if r == nil {
		return ""
	}
	switch v := *r * 100; {
	case v == 0:
		return "0 %"
	case v > -0.01 && v < 0.01:
		return fmt.Sprintf("%+.1e %%", v)
	default:
		return fmt.Sprintf("%+.3g %%", v)
	}
}

func (rv *Review) counts() (added, modified, removed int) {
	for _, g := range rv.Groups {
		for _, e := range g.Entries {
			switch e.Status {
			case "added":
				added++
			case "removed":
				removed++
			default:
				modified++
			}
		}
	}
	return
}

func (rv *Review) authors() string {
	var names []string
	seen := map[string]bool{}
	for i := len(rv.Commits) - 1; i >= 0; i-- {
		if a := rv.Commits[i].Author; !seen[a] {
			seen[a] = true
			names = append(names, a)
		}
	}
	return strings.Join(names, ", ")
}

func (rv *Review) summary() string {
	a, m, r := rv.counts()
	s := plural(len(rv.Commits), "commit", "commits")
	if len(rv.Commits) > 0 {
		s += " by " + rv.authors()
	}
	var parts []string
	for _, c := range []struct {
		n    int
		what string
	}{{a, "added"}, {m, "changed"}, {r, "removed"}} {
		if c.n > 0 {
			parts = append(parts, plural(c.n, "entry", "entries")+" "+c.what)
		}
	}
	if len(parts) == 0 {
		parts = append(parts, "no entry changed")
	}
	s += ": " + strings.Join(parts, ", ")
	if len(rv.Data) > 0 {
		s += "; " + plural(len(rv.Data), "data file", "data files")
	}
	return s
}

// plural is "1 commit", "2 commits".
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

var warningTitles = map[string]string{
	"hall-sdh": "Hall and SdH densities disagree",
	"mobility": "mobility outside the plausible range",
	"plateau":  "plateau where the density does not put it",
	"density":  "density far from the expected one",
	"stale":    "inputs changed, result not recomputed",
	"analysis": "analysis warning",
}

func where(p string, line int) string {
	if line > 0 {
		return fmt.Sprintf("%s:%d", p, line)
	}
	return p
}

// WriteText writes the review for a terminal.
func (rv *Review) WriteText(w io.Writer) {
	fmt.Fprintf(w, "review of %s..%s (%s..%s)\n%s\n", rv.Base, rv.Head, short7(rv.From), short7(rv.To), rv.summary())
	if len(rv.Warnings) > 0 {
		fmt.Fprintf(w, "\nwarnings (%d):\n", len(rv.Warnings))
		for _, x := range rv.Warnings {
			fmt.Fprintf(w, "  %s: %s: %s\n", where(x.Path, x.Line), warningTitles[x.Kind], x.Message)
		}
	} else {
		fmt.Fprintln(w, "\nno physics warnings")
	}
	if len(rv.Problems) > 0 {
		fmt.Fprintf(w, "\nproblems at %s (%d):\n", rv.Head, len(rv.Problems))
		for _, p := range rv.Problems {
			fmt.Fprintf(w, "  %s\n", p)
		}
	}
	if len(rv.Stale) > 0 {
		fmt.Fprintf(w, "\nstale results at %s (%d):\n", rv.Head, len(rv.Stale))
		for _, s := range rv.Stale {
			fmt.Fprintf(w, "  %s: %s → %s\n", where(s.Path, s.Line), orNone(s.Old), s.New)
		}
	}
	for _, g := range rv.Groups {
		fmt.Fprintf(w, "\n%s\n", g.Lineage)
		for _, e := range g.Entries {
			fmt.Fprintf(w, "  %s (%s): %s\n", entryName(e), e.Path, e.Status)
			for _, f := range e.Fields {
				fmt.Fprintf(w, "    %s: %s → %s\n", f.Field, orNone(f.Old), orNone(f.New))
			}
			for _, r := range e.Results {
				writeReviewResult(w, "    ", r)
			}
			if e.Text {
				fmt.Fprintln(w, "    (other text changed)")
			}
		}
	}
	if len(rv.Data) > 0 {
		fmt.Fprintln(w, "\ndata files")
		for _, d := range rv.Data {
			fmt.Fprintf(w, "  %s: %s (%s)%s\n", d.Path, d.Status, sizes(d), readBy(d))
		}
	}
	if len(rv.Commits) > 0 {
		fmt.Fprintln(w, "\ncommits")
		for _, c := range rv.Commits {
			fmt.Fprintf(w, "  %s  %s  %s  %s\n", short7(c.Hash), c.Date.UTC().Format("2006-01-02"), c.Author, c.Subject)
		}
	}
}

func entryName(e ReviewEntry) string {
	if e.ID == "" {
		return "note"
	}
	return e.Kind + " " + e.ID
}

func writeReviewResult(w io.Writer, indent string, r ReviewResult) {
	switch {
	case r.Added:
		fmt.Fprintf(w, "%sline %d %s: %s\n", indent, r.Line, r.Code, orNone(r.New))
	case r.Removed:
		fmt.Fprintf(w, "%sremoved: %s (was %s)\n", indent, r.Code, orNone(r.Old))
	default:
		rel := relText(r.Relative)
		if rel != "" {
			rel = "  (" + rel + ")"
		}
		fmt.Fprintf(w, "%sline %d %s: %s → %s%s\n", indent, r.Line, r.Code, orNone(r.Old), orNone(r.New), rel)
	}
}

func sizes(d DataChange) string {
	switch d.Status {
	case "added":
		return fmt.Sprintf("%d bytes", d.NewSize)
	case "removed":
		return fmt.Sprintf("was %d bytes", d.OldSize)
	}
	return fmt.Sprintf("%d → %d bytes", d.OldSize, d.NewSize)
}

func readBy(d DataChange) string {
	if len(d.ReadBy) == 0 {
		return ", read by no entry"
	}
	return ", read by " + strings.Join(d.ReadBy, ", ")
}

// mdCell escapes text for a Markdown table cell.
func mdCell(s string) string {
	s = strings.ReplaceAll(s, "\\", "\\\\")
	s = strings.ReplaceAll(s, "|", "\\|")
	return strings.ReplaceAll(s, "\n", " ")
}

// mdCode is s as inline code, with a fence longer than any run of backticks in it.
func mdCode(s string) string {
	fence := "`"
	for strings.Contains(s, fence) {
		fence += "`"
	}
	pad := ""
	if strings.HasPrefix(s, "`") || strings.HasSuffix(s, "`") {
		pad = " "
	}
	return fence + pad + s + pad + fence
}

// WriteMarkdown writes the review as a pull-request comment.
func (rv *Review) WriteMarkdown(w io.Writer) {
	fmt.Fprintf(w, "## cleave review: %s..%s\n\n", mdCode(rv.Base), mdCode(rv.Head))
	fmt.Fprintf(w, "Compared %s with %s. %s.\n", mdCode(short7(rv.From)), mdCode(short7(rv.To)), rv.summary())

	fmt.Fprintln(w, "\n### Warnings")
	if len(rv.Warnings) == 0 {
		fmt.Fprintln(w, "\nNo physics warnings.")
	} else {
		fmt.Fprintln(w)
		for _, x := range rv.Warnings {
			fmt.Fprintf(w, "- **%s** (%s): %s\n", warningTitles[x.Kind], mdCode(where(x.Path, x.Line)), mdCell(x.Message))
		}
	}
	if len(rv.Problems) > 0 {
		fmt.Fprintf(w, "\n### Problems at %s\n\n", mdCode(rv.Head))
		for _, p := range rv.Problems {
			fmt.Fprintf(w, "- %s\n", mdCode(p))
		}
	}
	if len(rv.Stale) > 0 {
		fmt.Fprintf(w, "\n### Stale results at %s\n\n| line | stored | its inputs give |\n| --- | --- | --- |\n", mdCode(rv.Head))
		for _, s := range rv.Stale {
			fmt.Fprintf(w, "| %s | %s | %s |\n", mdCode(where(s.Path, s.Line)), mdCell(orNone(s.Old)), mdCell(s.New))
		}
	}
	if len(rv.Groups) > 0 {
		fmt.Fprintln(w, "\n### Changes by lineage")
	}
	for _, g := range rv.Groups {
		fmt.Fprintf(w, "\n#### %s\n", g.Lineage)
		for _, e := range g.Entries {
			fmt.Fprintf(w, "\n**%s** (%s, %s)\n", entryName(e), mdCode(e.Path), e.Status)
			if len(e.Fields) == 0 && len(e.Results) == 0 {
				if e.Text {
					fmt.Fprintln(w, "\nText changed; no field or result did.")
				}
				continue
			}
			fmt.Fprintln(w, "\n| | old | new | change |\n| --- | --- | --- | --- |")
			for _, f := range e.Fields {
				fmt.Fprintf(w, "| %s | %s | %s | |\n", mdCode(f.Field), mdCell(orNone(f.Old)), mdCell(orNone(f.New)))
			}
			for _, r := range e.Results {
				label := fmt.Sprintf("line %d %s", r.Line, mdCode(r.Code))
				change := relText(r.Relative)
				switch {
				case r.Added:
					change = "new line"
				case r.Removed:
					label, change = mdCode(r.Code), "line removed"
				}
				fmt.Fprintf(w, "| %s | %s | %s | %s |\n", mdCell(label), mdCell(orNone(r.Old)), mdCell(orNone(r.New)), change)
			}
			if e.Text {
				fmt.Fprintln(w, "\nOther text changed too.")
			}
		}
	}
	if len(rv.Data) > 0 {
		fmt.Fprintln(w, "\n### Data files\n\n| file | change | read by |\n| --- | --- | --- |")
		for _, d := range rv.Data {
			fmt.Fprintf(w, "| %s | %s (%s) | %s |\n", mdCode(d.Path), d.Status, sizes(d), mdCell(strings.Join(d.ReadBy, ", ")))
		}
	}
	if len(rv.Commits) > 0 {
		fmt.Fprintln(w, "\n### Commits\n\n| commit | date | author | subject |\n| --- | --- | --- | --- |")
		for _, c := range rv.Commits {
			fmt.Fprintf(w, "| %s | %s | %s | %s |\n", mdCode(short7(c.Hash)), c.Date.UTC().Format("2006-01-02"), mdCell(c.Author), mdCell(c.Subject))
		}
	}
}
