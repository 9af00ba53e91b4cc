package library

import (
	"strings"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// This file reads what the notebook records around a calc block, through the Env's
// resolver, so that every field read is a dependency of the line: the cooldown's data
// entries, excitation current, magnet offset, wiring and convention, and the wafer's carrier
// type. Outside a notebook (no resolver) nothing is found and the functions fall back to
// their defaults.

// entryRecord is the nearest entry of a kind ("cooldown", "wafer", "device", "mask") in the
// lineage of the entry being evaluated, or nil.
func entryRecord(e *calc.Env, kind string) *calc.Record {
	v, err := e.Eval(kind)
	if err != nil {
		return nil
	}
	r, _ := v.(*calc.Record)
	return r
}

// field follows a path of field names from a record; nil when a step is missing.
func pathField(r *calc.Record, path ...string) calc.Value {
	var v calc.Value = r
	for _, p := range path {
		rec, ok := v.(*calc.Record)
		if !ok || rec == nil {
			return nil
		}
		v, ok = rec.Field(p)
		if !ok {
			return nil
		}
	}
	return v
}

// fieldText is a text field ("" when missing or not text).
func pathText(r *calc.Record, path ...string) string {
	switch v := pathField(r, path...).(type) {
	case calc.String:
		return strings.TrimSpace(string(v))
	case calc.Quantity:
		return calc.Display(v)
	}
	return ""
}

// fieldQuantity is a quantity field of dimension d.
func pathQuantity(r *calc.Record, d quantity.Dim, path ...string) (quantity.Quantity, bool) {
	v, ok := pathField(r, path...).(calc.Quantity)
	if !ok || v.Q.Dim() != d {
		return quantity.Quantity{}, false
	}
	return v.Q, true
}

// ParsePair reads one wiring entry: "1 -> 5" (current from 1 to 5) or "3 - 7" (the voltage
// V3 − V7, the lock-in's A and B inputs). The separators "->", "→", " - ", "-", "–" and
// " to " are accepted; names are trimmed.
func ParsePair(s string) (a, b string, ok bool) {
	s = strings.TrimSpace(s)
	for _, sep := range []string{"->", "→", " - ", " – ", " to ", "–", "-", ","} {
		if i := strings.Index(s, sep); i > 0 {
			a, b = strings.TrimSpace(s[:i]), strings.TrimSpace(s[i+len(sep):])
			if a != "" && b != "" && !strings.ContainsAny(b, "→>") {
				return a, b, true
			}
		}
	}
	return "", "", false
}

// hallOptions are the sign options of a Hall fit of column ycol: the carrier type the wafer
// records, and the orientation of the measured column relative to ρ_xy from the cooldown's
// stated convention or from its wiring read against the geometry (see README, "Sign
// conventions"). Without a notebook there are none (the default convention).
func hallOptions(e *calc.Env, ycol string) []transport.Option {
	var opts []transport.Option
	w := entryRecord(e, "wafer")
	if c := pathText(w, "carrier"); c == "electrons" || c == "holes" {
		from := "the wafer"
		if id := pathText(w, "id"); id != "" {
			from = "wafer " + id
		}
		opts = append(opts, transport.WithCarrier(c, from))
	}
	cd := entryRecord(e, "cooldown")
	if cd == nil {
		return opts
	}
	switch pathText(cd, "convention", "electrons") {
	case "negative":
		return append(opts, transport.WithOrientation(1, "the cooldown's convention (electrons: negative)"))
	case "positive":
		return append(opts, transport.WithOrientation(-1, "the cooldown's convention (electrons: positive)"))
	}
	field, fdesc := 1, "B up (out of the grown surface)"
	if pathText(cd, "convention", "field") == "down" {
		field, fdesc = -1, "B down (into the grown surface, convention: {field: down})"
	}
	src, drn, ok1 := ParsePair(pathText(cd, "wiring", "current"))
	pair := pathText(cd, "wiring", ycol)
	if pair == "" {
		pair = pathText(cd, "wiring", "Rxy")
	}
	plus, minus, ok2 := ParsePair(pair)
	if !ok1 || !ok2 {
		return opts
	}
	g, err := geometryOf(e)
	if err != nil {
		return opts
	}
	hb, err := g.hallBar()
	if err != nil {
		return opts
	}
	o, desc, err := hb.HallOrientation(src, drn, plus, minus)
	if err != nil {
		return opts
	}
	return append(opts, transport.WithOrientation(o*field, "the wiring ("+desc+", "+fdesc+")"))
}
