package compute

import (
	"encoding/json"
	"testing"

	"cleave/calc"
	"cleave/calc/library"
)

// TestJSONOfRecord: a record carries each field as a nested object of the same form, in
// SI, and a field named like a reserved key is left out rather than overwriting it.
func TestJSONOfRecord(t *testing.T) {
	v, err := library.NewEnv().Eval("GaAs")
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(JSONOf(v))
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatalf("%v in %s", err, b)
	}
	ms, ok := m["mstar"].(map[string]any)
	if !ok {
		t.Fatalf("no nested mstar in %s", b)
	}
	// m* = 0.067 m_e for GaAs; m_e = 9.1093837015e-31 kg (CODATA 2018).
	if got, want := ms["value"].(float64), 0.067*9.1093837015e-31; got < want*(1-1e-12) || got > want*(1+1e-12) {
		t.Errorf("mstar value %g, want %g", got, want)
	}
	if ms["unit"] != "kg" || m["type"] != "record" {
		t.Errorf("mstar unit %v, type %v", ms["unit"], m["type"])
	}
	rec := calc.NewRecord("", "value", calc.String("shadowed"), "n", calc.Q(calc.Quantity{}.Q))
	b, _ = json.Marshal(JSONOf(rec))
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if _, ok := m["value"]; ok {
		t.Errorf("a field named value took the reserved key: %s", b)
	}
	if _, ok := m["n"]; !ok {
		t.Errorf("field n missing: %s", b)
	}
}
