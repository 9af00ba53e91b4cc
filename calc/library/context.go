package library

import (
	"strings"

	"cleave/calc"
	"cleave/calc/quantity"
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
func field(r *calc.Record, path ...string) calc.Value {
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
func fieldText(r *calc.Record, path ...string) string {
	switch v := field(r, path...).(type) {
	case calc.String:
		return strings.TrimSpace(string(v))
	case calc.Quantity:
		return calc.Display(v)
	}
	return ""
}

// fieldQuantity is a quantity field of dimension d.
func fieldQuantity(r *calc.Record, d quantity.Dim, path ...string) (quantity.Quantity, bool) {
	v, ok := field(r, path...).(calc.Quantity)
	if !ok || v.Q.Dim() != d {
		return quantity.Quantity{}, false
	}
	return v.Q, true
}
