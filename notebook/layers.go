package notebook

import (
	"fmt"
	"strings"

	"cleave/calc/quantity"
)

// LayerRow is one row of a wafer's layer table (surface first). Cells are
// trimmed source text; empty cells and "-" give "".
//
// Besides its final thickness a row may record how the layer was grown
// ([LayerGrowth]): the growth time, the growth rate (nm/s, um/h, Å/s or ML/s,
// where ML alone is a monolayer of the row's material), the substrate
// temperature (column t_sub), the cell temperatures ("Ga 905 °C, Al 1060 °C,
// Si 1180 °C") and shutter notes. With time and rate the grown thickness
// rate × time is Growth.Grown; a row without a thickness takes it as its
// thickness.
type LayerRow struct {
	Layer, Material, Thickness, Doping, Notes string
	Line                                      int // file line of the row
	ThicknessQ                                quantity.Quantity
	Cells                                     []Cell // every cell of the row, in column order
	// Growth is the row's growth log; nil when the table has no growth columns.
	Growth *LayerGrowth
}

// LayerGrowth is what a layer table's growth columns say about one row: the columns as
// written, and as quantities where given and valid (each Has flag says which).
type LayerGrowth struct {
	Time, Rate, TSub, CellText, Shutters string
	TimeQ, RateQ, TSubQ                  quantity.Quantity
	Grown                                quantity.Quantity // RateQ × TimeQ
	HasTime, HasRate, HasTSub, HasGrown  bool
	CellTemps                            []CellTemp // the cell temperatures, in the order written
	// FromGrowth says that the row's ThicknessQ is Grown: it has no thickness of its own.
	FromGrowth bool
}

// CellTemp is the temperature of one effusion cell while a layer grew.
type CellTemp struct {
	Cell string // as written: Ga, Al, Si, As, ...
	T    quantity.Quantity
}

// growthColumns are the optional columns of a layer table that record the growth.
var growthColumns = []string{"time", "rate", "t_sub", "cells", "shutters"}

// Cell is one table cell with its column header and file position.
type Cell struct {
	Column    string // header text, lower case
	Text      string
	Line, Col int
}

// readLayers finds the layer table of a wafer entry: the first GFM table
// whose header has `material` and `thickness`, or `material`, `time` and
// `rate` (case-insensitive). It reports a `Layers` heading without such a
// table, an empty material, a thickness that is not a length with a unit (a
// row may leave it empty when it gives time and rate), and growth columns
// that do not read: a time, a rate (length per time), a substrate temperature,
// cell temperatures as "Ga 905 °C, Si 1180 °C".
func (e *Entry) readLayers() []Problem {
	if e.src == nil {
		return nil
	}
	blocks, why, _ := fastOutline(e.src)
	if why != "" {
		if e.src.Doc() == nil {
			return nil
		}
		blocks = goldmarkOutline(e.src)
	}
	return e.layersOf(blocks)
}

// layersOf is readLayers on the top-level headings and tables of the file, as
// goldmarkOutline or fastOutline reads them.
func (e *Entry) layersOf(blocks []mdBlock) []Problem {
	var probs []Problem
	prob := func(line, col int, format string, args ...any) {
		probs = append(probs, Problem{Path: e.Path, Line: line, Col: max(col, 1), Msg: fmt.Sprintf(format, args...)})
	}
	var layersHeading *mdBlock // the first heading whose text is "Layers"
	inSection := false
	var sectionTable *mdBlock // the first table in the Layers section
	var table *mdBlock
	var header []Cell
	for i := range blocks {
		n := &blocks[i]
		if !n.Table {
			if layersHeading == nil && strings.EqualFold(strings.TrimSpace(n.Text), "layers") {
				layersHeading, inSection = n, true
			} else if inSection && n.Level <= layersHeading.Level {
				inSection = false
			}
			continue
		}
		cells := e.headerCells(n)
		if table == nil && hasColumn(cells, "material") && (hasColumn(cells, "thickness") || hasColumn(cells, "time") && hasColumn(cells, "rate")) {
			table, header = n, cells
		}
		if inSection && sectionTable == nil {
			sectionTable = n
		}
	}
	if table == nil {
		if layersHeading != nil {
			line, col := e.pos(layersHeading.Pos)
			if sectionTable != nil {
				cells := e.headerCells(sectionTable)
				var names []string
				for _, c := range cells {
					names = append(names, c.Column)
				}
				tl, tc := e.pos(sectionTable.Pos)
				var missing []string
				for _, want := range []string{"material", "thickness"} {
					if !hasColumn(cells, want) {
						if want == "thickness" {
							want = "thickness (or the growth columns time and rate)"
						}
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
	e.LayerTableLine, _ = e.pos(table.Pos)
	e.layers = make([]LayerRow, 0, len(table.Rows))
	for _, row := range table.Rows {
		lr := LayerRow{}
		if n := min(len(row.Cells), len(header)); n > 0 {
			lr.Cells = make([]Cell, 0, n) // each cell is appended below
		}
		for i, c := range row.Cells {
			if i >= len(header) {
				break
			}
			cell := e.cell(c, header[i].Column)
			if cell.Line == 0 {
				cell.Line, cell.Col = e.pos(row.Pos)
			}
			if lr.Line == 0 {
				lr.Line, _ = e.pos(row.Pos)
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
			case "time":
				lr.growth().Time = v
			case "rate":
				lr.growth().Rate = v
			case "t_sub":
				lr.growth().TSub = v
			case "cells":
				lr.growth().CellText = v
			case "shutters":
				lr.growth().Shutters = v
			}
		}
		if lr.Line == 0 {
			lr.Line, _ = e.pos(row.Pos)
		}
		mat, th := findCell(lr.Cells, "material"), findCell(lr.Cells, "thickness")
		if lr.Material == "" {
			prob(mat.Line, mat.Col, "layer table: empty material (write the layer's material, e.g. Al0.33Ga0.67As)")
		}
		g := lr.Growth
		if g != nil {
			probs = append(probs, e.readGrowth(&lr)...)
		}
		switch {
		case lr.Thickness == "" && g != nil && g.HasGrown:
			lr.ThicknessQ, g.FromGrowth = g.Grown, true
		case lr.Thickness == "" && g != nil && (g.Time != "" || g.Rate != ""):
			// a growth column is wrong or missing: reported by readGrowth or here
			if g.Time == "" || g.Rate == "" {
				prob(th.Line, th.Col, "layer table: no thickness and no %s: give the thickness, or the layer's growth time and rate", map[bool]string{true: "growth rate", false: "growth time"}[g.Time != ""])
			}
		case lr.Thickness == "":
			prob(th.Line, th.Col, "layer table: empty thickness: expected a length with a unit, e.g. `20 nm` (or the layer's growth time and rate)")
		default:
			qv, err := quantity.ParseQuantity(lr.Thickness)
			switch {
			case err != nil:
				prob(th.Line, th.Col, "layer table: thickness %q: %s", lr.Thickness, quantity.Reason(err))
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

func (e *Entry) headerCells(t *mdBlock) []Cell {
	var out []Cell
	if len(t.Header) > 0 {
		out = make([]Cell, 0, len(t.Header))
	}
	for _, c := range t.Header {
		cell := e.cell(c, "")
		cell.Column = strings.ToLower(cell.Text)
		out = append(out, cell)
	}
	return out
}

// cell returns the trimmed source text of a table cell and its position.
func (e *Entry) cell(n mdCell, column string) Cell {
	c := Cell{Column: column}
	if !n.Line {
		return c
	}
	src := e.src.Masked()
	if n.Start < 0 || n.Stop > len(src) || n.Start > n.Stop {
		return c
	}
	c.Text = strings.TrimSpace(strings.ReplaceAll(string(src[n.Start:n.Stop]), `\|`, "|"))
	c.Line, c.Col = e.pos(n.Start)
	return c
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

// readGrowth reads the growth columns of a row (lr.Growth is set): time, rate (a bare ML is a
// monolayer of the row's material), t_sub and cells, with the grown thickness rate × time.
func (e *Entry) readGrowth(lr *LayerRow) []Problem {
	var probs []Problem
	at := func(col string) Cell { return findCell(lr.Cells, col) }
	prob := func(col, format string, args ...any) {
		c := at(col)
		probs = append(probs, Problem{Path: e.Path, Line: c.Line, Col: max(c.Col, 1), Msg: fmt.Sprintf(format, args...)})
	}
	read := func(col, text string, want quantity.Dim, what, example string) (quantity.Quantity, bool) {
		if text == "" {
			return quantity.Quantity{}, false
		}
		q, err := quantity.ParseQuantity(text)
		switch {
		case err != nil:
			prob(col, "layer table: %s %q: %s (expected %s, e.g. `%s`)", col, text, quantity.Reason(err), what, example)
		case q.Dim() != want:
			if hint := celsiusHint(q.Dim(), want); hint != "" {
				prob(col, "layer table: %s %q %s", col, text, hint)
			} else if q.Dim().IsDimensionless() {
				prob(col, "layer table: %s %q: expected %s with a unit, e.g. `%s`", col, text, what, example)
			} else {
				prob(col, "layer table: %s %q is %s, expected %s, e.g. `%s`", col, text, dimName(q.Dim()), what, example)
			}
		case q.Value() < 0 && want != quantity.Temperature:
			prob(col, "layer table: %s %q is negative", col, text)
		default:
			return q, true
		}
		return quantity.Quantity{}, false
	}
	g := lr.Growth
	g.TimeQ, g.HasTime = read("time", g.Time, quantity.Time, "a time", "212 s")
	g.RateQ, g.HasRate = read("rate", monolayerOf(g.Rate, lr.Material), quantity.Length.Div(quantity.Time), "a growth rate", "1 ML/s` or `0.28 nm/s")
	g.TSubQ, g.HasTSub = read("t_sub", g.TSub, quantity.Temperature, "a substrate temperature", "600 °C")
	if g.HasTime && g.HasRate {
		g.Grown, g.HasGrown = quantity.Mul(g.RateQ, g.TimeQ), true
	}
	if g.CellText != "" {
		cells, err := ParseCellTemps(g.CellText)
		if err != nil {
			prob("cells", "layer table: cells %q: %v", g.CellText, err)
		}
		g.CellTemps = cells
	}
	return probs
}

// growth returns the row's growth log, made on first use.
func (lr *LayerRow) growth() *LayerGrowth {
	if lr.Growth == nil {
		lr.Growth = &LayerGrowth{}
	}
	return lr.Growth
}

// monolayerOf writes a bare ML in a growth rate as ML(material): in a layer table a monolayer
// is one of the row's material. ML followed by "(" names its own material and is kept.
func monolayerOf(rate, material string) string {
	if material == "" || !strings.Contains(rate, "ML") {
		return rate
	}
	var b strings.Builder
	for i := 0; i < len(rate); i++ {
		if strings.HasPrefix(rate[i:], "ML") && (i == 0 || !isLetter(rate[i-1])) &&
			(i+2 == len(rate) || rate[i+2] != '(' && !isLetter(rate[i+2])) {
			b.WriteString("ML(" + material + ")")
			i++
			continue
		}
		b.WriteByte(rate[i])
	}
	return b.String()
}

func isLetter(c byte) bool { return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c == '_' }

// ParseCellTemps reads the cells column of a layer table: cell names each followed by a
// temperature, separated by commas or semicolons: "Ga 905 °C, Al 1060 °C, Si 1180 °C". A
// cell name is a word (Ga, Al, Si, As4); the temperature is a quantity of dimension
// temperature (°C or K). "-" or an empty text gives no cells.
func ParseCellTemps(s string) ([]CellTemp, error) {
	s = strings.TrimSpace(s)
	if s == "" || s == "-" || s == "—" {
		return nil, nil
	}
	var out []CellTemp
	for _, part := range strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ';' }) {
		part = strings.TrimSpace(part)
		name, rest, ok := strings.Cut(part, " ")
		if !ok || name == "" {
			return out, fmt.Errorf("%q: expected a cell and its temperature, e.g. `Ga 905 °C`", part)
		}
		for _, r := range name {
			if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '_' || r == '-') {
				return out, fmt.Errorf("%q: the cell name %q is not a word (expected e.g. Ga, Al, Si)", part, name)
			}
		}
		q, err := quantity.ParseQuantity(strings.TrimSpace(rest))
		if err != nil {
			return out, fmt.Errorf("%s %q: %s", name, strings.TrimSpace(rest), quantity.Reason(err))
		}
		if q.Dim() != quantity.Temperature {
			if hint := celsiusHint(q.Dim(), quantity.Temperature); hint != "" {
				return out, fmt.Errorf("%s %s %s", name, strings.TrimSpace(rest), hint)
			}
			return out, fmt.Errorf("%s %s is not a temperature (expected e.g. `%s 905 °C`)", name, strings.TrimSpace(rest), name)
		}
		out = append(out, CellTemp{Cell: name, T: q})
	}
	return out, nil
}
