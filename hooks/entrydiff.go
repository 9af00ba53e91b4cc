package hooks

import (
	"bytes"
	"fmt"
	"strings"
	"testing/fstest"

	"go.yaml.in/yaml/v3"

	"cleave/notebook"
	"cleave/notebook/calcblock"
	"cleave/notebook/mdsrc"
)

// What changed between two versions of one Markdown file, as a reviewer reads it: the fields
// of the entry (front matter and layer table) old → new, each stored result old → new, and
// whether any other text changed. history and review both use it.

// FieldChange is one field of an entry that changed. Field is its path: `width`,
// `as_built.width`, `probes[4].position` (a list item is named by its name, file, channel or id
// when it has one, else by its 1-based place), `layers[3].thickness`. Old or New is "" when the
// field was added or removed.
type FieldChange struct {
	Field string `json:"field"`
	Old   string `json:"old"`
	New   string `json:"new"`
}

// ResultChange is one result of a calc line that changed. Line is the line in the newer file
// (in the older one for a removed line); Code is the line's code.
type ResultChange struct {
	Line int    `json:"line"`
	Code string `json:"code"`
	Old  string `json:"old"`
	New  string `json:"new"`
	// Added or Removed is set for a calc line that exists on one side only.
	Added   bool `json:"added,omitempty"`
	Removed bool `json:"removed,omitempty"`
}

// FileDiff is what changed in one Markdown file.
type FileDiff struct {
	Fields  []FieldChange  `json:"fields,omitempty"`
	Results []ResultChange `json:"results,omitempty"`
	// Text is set when text outside the fields and the calc lines changed (prose, headings,
	// the code of a calc line that kept its result).
	Text bool `json:"text,omitempty"`
}

// Empty reports whether nothing changed.
func (d FileDiff) Empty() bool { return len(d.Fields) == 0 && len(d.Results) == 0 && !d.Text }

// parsedFile is one version of a Markdown file, parsed once.
type parsedFile struct {
	src    *mdsrc.Source
	fields map[string]string
	order  []string
	code   []*calcblock.Line
	rest   string // the file without front matter and calc lines
}

func parseVersion(path string, raw []byte) *parsedFile {
	pf := &parsedFile{fields: map[string]string{}}
	if raw == nil {
		return pf
	}
	// The file as the engine reads it: one parse gives its source, its front matter (decoded
	// within the loader's bounds, so a hostile alias cannot make the walk below run away) and
	// its layer table.
	src, err := mdsrc.Parse(raw)
	if err != nil {
		pf.rest = string(raw)
		return pf
	}
	pf.src = src
	var entry *notebook.Entry
	if nb, err := notebook.Load(fstest.MapFS{path: {Data: raw}}); err == nil {
		if f, ok := nb.File(path); ok {
			entry = f.Entry
		}
	}
	frontText := raw[src.FrontMatter.Start:src.FrontMatter.End]
	switch {
	case entry != nil:
		if front := entry.Front(); front != nil {
			flatten(front, "", pf.fields, &pf.order)
		}
	case src.HasFrontMatter:
		// Not an entry: its fields if they decode within the bounds, else its text.
		if front, err := notebook.DecodeFrontMatter(frontText); err == nil && front != nil {
			flatten(front, "", pf.fields, &pf.order)
		} else if err != nil {
			pf.rest = string(frontText)
		}
	}
	// The layer table, as the engine reads it.
	if entry != nil {
		for i, row := range entry.LayerRows() {
			for _, c := range row.Cells {
				k := fmt.Sprintf("layers[%d].%s", i+1, c.Column)
				pf.fields[k] = c.Text
				pf.order = append(pf.order, k)
			}
		}
	}
	blocks, err := calcblock.Find(src)
	if err == nil {
		pf.code = calcblock.CodeLines(blocks)
	}
	// Everything but the front matter and the code lines, to tell whether other text changed.
	skip := map[int]bool{}
	for _, l := range pf.code {
		skip[l.LineNo] = true
	}
	var b strings.Builder
	body := raw[src.Body:]
	line := bytes.Count(raw[:src.Body], []byte("\n")) + 1
	for _, l := range bytes.SplitAfter(body, []byte("\n")) {
		if !skip[line] {
			b.Write(l)
		}
		line++
	}
	pf.rest += b.String()
	return pf
}

// flatten records every scalar below n under its field path.
func flatten(n *yaml.Node, prefix string, out map[string]string, order *[]string) {
	join := func(k string) string {
		if prefix == "" {
			return k
		}
		return prefix + "." + k
	}
	switch n.Kind {
	case yaml.MappingNode:
		for i := 0; i+1 < len(n.Content); i += 2 {
			flatten(n.Content[i+1], join(n.Content[i].Value), out, order)
		}
	case yaml.SequenceNode:
		for i, c := range n.Content {
			flatten(c, fmt.Sprintf("%s[%s]", prefix, itemName(c, i)), out, order)
		}
	case yaml.AliasNode:
		if n.Alias != nil {
			flatten(n.Alias, prefix, out, order)
		}
	case yaml.ScalarNode:
		out[prefix] = n.Value
		*order = append(*order, prefix)
	}
}

// itemName names a list item by the field that identifies it, or by its 1-based place.
func itemName(n *yaml.Node, i int) string {
	if n.Kind == yaml.MappingNode {
		for _, key := range []string{"name", "id", "file", "channel"} {
			for j := 0; j+1 < len(n.Content); j += 2 {
				if n.Content[j].Value == key && n.Content[j+1].Kind == yaml.ScalarNode && n.Content[j+1].Value != "" {
					return n.Content[j+1].Value
				}
			}
		}
	}
	return fmt.Sprint(i + 1)
}

// diffFiles compares two versions of a Markdown file; nil stands for a file that is not there.
func diffFiles(path string, old, new []byte) FileDiff {
	a, b := parseVersion(path, old), parseVersion(path, new)
	var d FileDiff
	for _, k := range b.order {
		if ov, ok := a.fields[k]; !ok || ov != b.fields[k] {
			d.Fields = append(d.Fields, FieldChange{Field: k, Old: a.fields[k], New: b.fields[k]})
		}
	}
	for _, k := range a.order {
		if _, ok := b.fields[k]; !ok {
			d.Fields = append(d.Fields, FieldChange{Field: k, Old: a.fields[k]})
		}
	}
	d.Results = diffResults(a.code, b.code)
	d.Text = a.rest != b.rest && old != nil && new != nil
	return d
}

// diffResults pairs the calc lines of two versions by their code (a longest common
// subsequence, so inserted and removed lines do not shift the pairing) and reports each pair
// whose result changed, and each line on one side only.
func diffResults(a, b []*calcblock.Line) []ResultChange {
	n, m := len(a), len(b)
	lcs := make([][]int, n+1)
	for i := range lcs {
		lcs[i] = make([]int, m+1)
	}
	for i := n - 1; i >= 0; i-- {
		for j := m - 1; j >= 0; j-- {
			if a[i].Input() == b[j].Input() {
				lcs[i][j] = lcs[i+1][j+1] + 1
			} else {
				lcs[i][j] = max(lcs[i+1][j], lcs[i][j+1])
			}
		}
	}
	var out []ResultChange
	i, j := 0, 0
	for i < n || j < m {
		switch {
		case i < n && j < m && a[i].Input() == b[j].Input():
			if a[i].Old != b[j].Old {
				out = append(out, ResultChange{Line: b[j].LineNo, Code: b[j].Input(), Old: a[i].Old, New: b[j].Old})
			}
			i++
			j++
		case j < m && (i == n || lcs[i][j+1] >= lcs[i+1][j]):
			out = append(out, ResultChange{Line: b[j].LineNo, Code: b[j].Input(), New: b[j].Old, Added: true})
			j++
		default:
			out = append(out, ResultChange{Line: a[i].LineNo, Code: a[i].Input(), Old: a[i].Old, Removed: true})
			i++
		}
	}
	return out
}
