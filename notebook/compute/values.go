package compute

import (
	"strings"

	"go.yaml.in/yaml/v3"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/notebook"
)

// nodeValue turns a front-matter node into a calc value. path is the notebook field path of
// the node ("device", "device.as_built"), used by records to name their dependencies.
func nodeValue(n *yaml.Node, path string) calc.Value {
	if n == nil {
		return calc.String("")
	}
	switch n.Kind {
	case yaml.DocumentNode:
		if len(n.Content) > 0 {
			return nodeValue(n.Content[0], path)
		}
		return calc.String("")
	case yaml.AliasNode:
		return nodeValue(n.Alias, path)
	case yaml.SequenceNode:
		l := make(calc.List, 0, len(n.Content))
		for _, c := range n.Content {
			l = append(l, nodeValue(c, path))
		}
		return l
	case yaml.MappingNode:
		r := &calc.Record{Path: path}
		for i := 0; i+1 < len(n.Content); i += 2 {
			k := n.Content[i].Value
			r.Fields = append(r.Fields, calc.RecordField{Name: k, Value: nodeValue(n.Content[i+1], path+"."+k)})
		}
		return r
	}
	return scalarValue(n.Value)
}

// scalarValue reads a front-matter scalar: a quantity when it parses as one ("20 um",
// "3.1e11 cm^-2", "5"), text otherwise.
func scalarValue(s string) calc.Value {
	t := strings.TrimSpace(s)
	if t == "" {
		return calc.String(s)
	}
	if q, u, err := quantity.ParseQuantityUnit(t); err == nil {
		if u.Keep { // 4000 rpm stays in rpm, as the literal does in a calc block
			return calc.Quantity{Q: q, Unit: &u}
		}
		return calc.Q(q)
	}
	return calc.String(s)
}

// entryRecord is an entry's front matter as a record named after its kind; a wafer's record
// also carries its layer table as `layers`.
func entryRecord(e *notebook.Entry, name string) *calc.Record {
	v := nodeValue(e.Front(), name)
	r, ok := v.(*calc.Record)
	if !ok {
		r = &calc.Record{Path: name}
	}
	if e.Kind == notebook.KindWafer && e.LayerRows() != nil {
		r.Fields = append(r.Fields, calc.RecordField{Name: "layers", Value: layersValue(e.LayerRows(), name+".layers")})
	}
	return r
}

// layersValue is a wafer's layer table as a list of records, surface first.
func layersValue(rows []notebook.LayerRow, path string) calc.List {
	l := make(calc.List, 0, len(rows))
	for i, row := range rows {
		var th calc.Value = calc.String(row.Thickness)
		if row.ThicknessQ.Dim() == quantity.Length {
			th = calc.Q(row.ThicknessQ)
		}
		rec := &calc.Record{Path: path, Fields: []calc.RecordField{
			{Name: "index", Value: calc.Q(quantity.Scalar(float64(i + 1)))},
			{Name: "layer", Value: calc.String(row.Layer)},
			{Name: "material", Value: calc.String(row.Material)},
			{Name: "thickness", Value: th},
			{Name: "doping", Value: calc.String(row.Doping)},
		}}
		rec.Fields = append(rec.Fields, growthFields(row)...)
		l = append(l, rec)
	}
	return l
}

// growthFields are a layer row's growth columns, those it has: time, rate, grown (rate ×
// time), nominal (the thickness column, beside grown), t_sub, cells (a record of cell
// temperatures), shutters.
func growthFields(row notebook.LayerRow) []calc.RecordField {
	g := row.Growth
	if g == nil {
		return nil
	}
	var out []calc.RecordField
	add := func(name string, v calc.Value) { out = append(out, calc.RecordField{Name: name, Value: v}) }
	if g.HasTime {
		add("time", calc.Q(g.TimeQ))
	}
	if g.HasRate {
		add("rate", calc.Q(g.RateQ))
	}
	if g.HasGrown {
		add("grown", calc.Q(g.Grown))
		if !g.FromGrowth && row.ThicknessQ.Dim() == quantity.Length {
			add("nominal", calc.Q(row.ThicknessQ))
		}
	}
	if g.HasTSub {
		add("t_sub", calc.Q(g.TSubQ))
	}
	if len(g.CellTemps) > 0 {
		cells := &calc.Record{}
		for _, c := range g.CellTemps {
			cells.Fields = append(cells.Fields, calc.RecordField{Name: c.Cell, Value: calc.Q(c.T)})
		}
		add("cells", cells)
	}
	if g.Shutters != "" {
		add("shutters", calc.String(g.Shutters))
	}
	return out
}
