package constants

import (
	"fmt"
	"sync"

	"cleave/calc/quantity"
)

// Dim returns the SI dimension of the constant.
func (c Constant) Dim() quantity.Dim { return quantity.Dim(c.dim) }

// quantities holds one Quantity per table entry, built once, so that every use of a
// measured constant refers to the same uncertain input and correlates correctly
// (m_e/m_e is exactly 1, and μ_B/m_e carries no spurious uncertainty from two "different" m_e).
var quantities = sync.OnceValue(func() map[string]quantity.Quantity {
	m := make(map[string]quantity.Quantity, len(table))
	// Independent inputs first, then the constants tied to them by exact SI relations.
	for _, c := range table {
		if c.parent != "" {
			continue
		}
		if c.Exact {
			m[c.Symbol] = quantity.New(c.Value, c.Dim())
		} else {
			m[c.Symbol] = quantity.Uncertain(c.Value, c.Uncertainty, c.Dim())
		}
	}
	for _, c := range table {
		if c.parent == "" {
			continue
		}
		p := m[c.parent]
		// mu0 = 1/(eps0 c^2) and mu_B = e hbar/(2 m_e): both go as 1/parent, so
		// d(child)/d(parent) = -child/parent. The published value is kept; its
		// uncertainty becomes the parent's relative uncertainty (1.84e-16 N/A^2 for mu0
		// against the published 1.9e-16, and 2.85e-33 J/T for mu_B against 2.8e-33: the
		// published figures are rounded to two digits).
		m[c.Symbol] = quantity.Derived(c.Value, c.Dim(), []quantity.Quantity{p}, []float64{-c.Value / p.Value()})
	}
	return m
})

// Quantity returns the constant as a quantity.Quantity: exact constants are
// quantity.New values; measured ones are uncertain inputs created once per constant,
// so repeated use correlates correctly.
func (c Constant) Quantity() quantity.Quantity {
	if q, ok := quantities()[c.Symbol]; ok {
		return q
	}
	// A Constant not taken from the table (built by a caller): treat it on its own.
	if c.Exact || c.Uncertainty == 0 {
		return quantity.New(c.Value, c.Dim())
	}
	return quantity.Uncertain(c.Value, c.Uncertainty, c.Dim())
}

// Q returns the quantity of the table constant with the given symbol or alias. It panics
// if the symbol is unknown: it is meant for package-level code with literal symbols.
func Q(sym string) quantity.Quantity {
	c, ok := Lookup(sym)
	if !ok {
		panic(fmt.Sprintf("constants: unknown symbol %q", sym))
	}
	return c.Quantity()
}
