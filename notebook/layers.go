package notebook

import (
	"fmt"
	"strings"

	"cleave/calc/quantity"

	"github.com/yuin/goldmark/ast"
	east "github.com/yuin/goldmark/extension/ast"
)

// LayerRow is one row of a wafer's layer table (surface first). Cells are
// trimmed source text; empty cells and "-" give "".
type LayerRow struct {
	Layer, Material, Thickness, Doping, Notes string
	Line                                      int // file line of the row
	ThicknessQ                                quantity.Quantity
	Cells                                     []Cell // every cell of the row, in column order
}

// Cell is one table cell with its column header and file position.
type Cell struct {
	Column    string // header text, lower case
	Text      string
	Line, Col int
}

// readLayers finds the layer table of a wafer entry: the first GFM table
// whose header has `material` and `thickness` (case-insensitive). It reports
// a `Layers` heading without such a table, an empty material and a thickness
// that is not a length with a unit.
func (e *Entry) readLayers() []Problem {
	if e.src == nil || e.src.Doc() == nil {
		return nil
	}
	var probs []Problem
	prob := func(line, col int, format string, args ...any) {
		probs = append(probs, Problem{Path: e.Path, Line: line, Col: max(col, 1), Msg: fmt.Sprintf(format, args...)})
	}
	var layersHeading *ast.Heading // the first heading whose text is "Layers"
	inSection := false
	var sectionTable *east.Table // the first table in the Layers section
	var table *east.Table
	var header []Cell
	for n := e.src.Doc().FirstChild(); n != nil; n = n.NextSibling() {
		switch n := n.(type) {
		case *ast.Heading:
			if layersHeading == nil && strings.EqualFold(strings.TrimSpace(e.inlineText(n)), "layers") {
				layersHeading, inSection = n, true
			} else if inSection && n.Level <= layersHeading.Level {
				inSection = false
			}
		case *east.Table:
			cells := e.headerCells(n)
			if table == nil && hasColumn(cells, "material") && hasColumn(cells, "thickness") {
				table, header = n, cells
			}
			if inSection && sectionTable == nil {
				sectionTable = n
			}
		}
	}
	if table == nil {
		if layersHeading != nil {
			line, col := e.pos(headingPos(e, layersHeading))
			if sectionTable != nil {
				cells := e.headerCells(sectionTable)
				var names []string
				for _, c := range cells {
					names = append(names, c.Column)
				}
				tl, tc := e.pos(sectionTable.Pos())
				var missing []string
				for _, want := range []string{"material", "thickness"} {
					if !hasColumn(cells, want) {
						missing = append(missing, want)
					}
				}
				prob(tl, tc, "layer table: missing column %s (header has: %s)", strings.Join(missing, " and "), strings.Join(names, ", "))
			} else {
				prob(line, col, "Layers section has no table: expected a table with columns material and thickness, surface first")
			}
		}
		return probs
	}
	e.LayerTableLine, _ = e.pos(table.Pos())
	e.layers = []LayerRow{}
	for r := table.FirstChild(); r != nil; r = r.NextSibling() {
		row, ok := r.(*east.TableRow)
		if !ok {
			continue
		}
		lr := LayerRow{}
		i := 0
		for c := row.FirstChild(); c != nil; c, i = c.NextSibling(), i+1 {
			if i >= len(header) {
				break
			}
			cell := e.cell(c, header[i].Column)
			if cell.Line == 0 {
				cell.Line, cell.Col = e.pos(row.Pos())
			}
			if lr.Line == 0 {
				lr.Line, _ = e.pos(row.Pos())
			}
			lr.Cells = append(lr.Cells, cell)
			v := cell.Text
			if v == "-" || v == "—" {
				v = ""
			}
			switch cell.Column {
			case "layer":
				lr.Layer = v
			case "material":
				lr.Material = v
			case "thickness":
				lr.Thickness = v
			case "doping":
				lr.Doping = v
			case "notes":
				lr.Notes = v
			}
		}
		if lr.Line == 0 {
			lr.Line, _ = e.pos(row.Pos())
		}
		mat, th := findCell(lr.Cells, "material"), findCell(lr.Cells, "thickness")
		if lr.Material == "" {
			prob(mat.Line, mat.Col, "layer table: empty material (write the layer's material, e.g. Al0.33Ga0.67As)")
		}
		switch {
		case lr.Thickness == "":
			prob(th.Line, th.Col, "layer table: empty thickness: expected a length with a unit, e.g. `20 nm`")
		default:
			qv, err := quantity.ParseQuantity(lr.Thickness)
			switch {
			case err != nil:
				prob(th.Line, th.Col, "layer table: thickness %q: %v", lr.Thickness, err)
			case qv.Dim() != quantity.Length:
				if qv.Dim().IsDimensionless() {
					prob(th.Line, th.Col, "layer table: thickness %q: expected a length with a unit, e.g. `20 nm`", lr.Thickness)
				} else {
					prob(th.Line, th.Col, "layer table: thickness %q: expected a length, found %s", lr.Thickness, dimName(qv.Dim()))
				}
			case qv.Value() < 0:
				prob(th.Line, th.Col, "layer table: thickness %q is negative", lr.Thickness)
			default:
				lr.ThicknessQ = qv
			}
		}
		e.layers = append(e.layers, lr)
	}
	return probs
}

// pos is Src.Pos with the offset kept inside the file (goldmark can place a
// node position past a tab; see yuin/goldmark#604).
func (e *Entry) pos(off int) (line, col int) {
	off = min(max(off, 0), len(e.src.Raw))
	return e.src.Pos(off)
}

func headingPos(e *Entry, h ast.Node) int {
	if l := h.Lines(); l.Len() > 0 {
		return l.At(0).Start
	}
	return h.Pos()
}

func (e *Entry) headerCells(t *east.Table) []Cell {
	var out []Cell
	for r := t.FirstChild(); r != nil; r = r.NextSibling() {
		if h, ok := r.(*east.TableHeader); ok {
			for c := h.FirstChild(); c != nil; c = c.NextSibling() {
				cell := e.cell(c, "")
				cell.Column = strings.ToLower(cell.Text)
				out = append(out, cell)
			}
			break
		}
	}
	return out
}

// cell returns the trimmed source text of a table cell and its position.
func (e *Entry) cell(n ast.Node, column string) Cell {
	c := Cell{Column: column}
	lines := n.Lines()
	if lines.Len() == 0 {
		return c
	}
	seg := lines.At(0)
	src := e.src.Masked()
	if seg.Start < 0 || seg.Stop > len(src) || seg.Start > seg.Stop {
		return c
	}
	c.Text = strings.TrimSpace(strings.ReplaceAll(string(src[seg.Start:seg.Stop]), `\|`, "|"))
	c.Line, c.Col = e.pos(seg.Start)
	return c
}

// inlineText is the source text of a block's lines, trimmed (for headings).
func (e *Entry) inlineText(n ast.Node) string {
	var b strings.Builder
	src := e.src.Masked()
	lines := n.Lines()
	for i := 0; i < lines.Len(); i++ {
		s := lines.At(i)
		if s.Start >= 0 && s.Stop <= len(src) && s.Start <= s.Stop {
			b.Write(src[s.Start:s.Stop])
		}
	}
	return b.String()
}

func hasColumn(cells []Cell, name string) bool {
	for _, c := range cells {
		if c.Column == name {
			return true
		}
	}
	return false
}

func findCell(cells []Cell, name string) Cell {
	for _, c := range cells {
		if c.Column == name {
			return c
		}
	}
	if len(cells) > 0 {
		return Cell{Line: cells[0].Line, Col: cells[0].Col}
	}
	return Cell{Line: 1, Col: 1}
}
