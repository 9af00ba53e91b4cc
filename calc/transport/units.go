package transport

import (
	"fmt"
	"strings"

	"cleave/calc/quantity"
)

// SI dimensions of the columns the analyses know by name.
var (
	// DimField is the dimension of a magnetic flux density, T = kg s^-2 A^-1.
	DimField = quantity.Dim{quantity.IdxMass: 1, quantity.IdxTime: -2, quantity.IdxCurrent: -1}
	// DimResistance is the dimension of a resistance, Ohm = kg m^2 s^-3 A^-2.
	DimResistance = quantity.Dim{quantity.IdxLength: 2, quantity.IdxMass: 1, quantity.IdxTime: -3, quantity.IdxCurrent: -2}
	// DimTemperature is the dimension of a temperature, K.
	DimTemperature = quantity.Temperature
)

// knownDim returns the dimension a column must have judging by its name, and
// whether the name is known; a known column without a unit is in the SI unit
// of that dimension (T, Ohm or K).
//
// Known names (case-insensitive, underscores ignored): B, Field, Bfield → field;
// names starting with Rxx, Rxy, Ryx, Ryy, Rhoxx, Rhoxy → resistance (lock-in parts
// such as Rxx_X and Rxx_Y included); T, Temp, Temperature, Tmc, Tsample → temperature.
func knownDim(name string) (quantity.Dim, bool) {
	n := strings.ToLower(strings.ReplaceAll(name, "_", ""))
	switch n {
	case "b", "field", "bfield":
		return DimField, true
	case "t", "temp", "temperature", "tmc", "tsample":
		return DimTemperature, true
	}
	for _, p := range []string{"rxx", "rxy", "ryx", "ryy", "rhoxx", "rhoxy"} {
		if strings.HasPrefix(n, p) {
			return DimResistance, true
		}
	}
	return quantity.Dim{}, false
}

// dimNames names the dimensions a data column is likely to carry, with a
// unit a person would write for each, for error messages.
var dimNames = []struct {
	d    quantity.Dim
	name string
}{
	{DimField, "a magnetic field (T)"},
	{DimResistance, "a resistance (Ohm)"},
	{DimTemperature, "a temperature (K)"},
	{quantity.Dim{quantity.IdxLength: 2, quantity.IdxMass: 1, quantity.IdxTime: -3, quantity.IdxCurrent: -1}, "a voltage (V)"},
	{quantity.Dim{quantity.IdxCurrent: 1}, "a current (A)"},
	{quantity.Dim{quantity.IdxLength: -2, quantity.IdxMass: -1, quantity.IdxTime: 3, quantity.IdxCurrent: 2}, "a conductance (S)"},
	{quantity.Dim{quantity.IdxLength: 1}, "a length (m)"},
	{quantity.Dim{quantity.IdxTime: 1}, "a time (s)"},
	{quantity.Dim{quantity.IdxTime: -1}, "a frequency (Hz)"},
	{quantity.Dim{quantity.IdxLength: -2}, "a sheet density (m^-2)"},
	{quantity.Dimensionless, "a plain number (no unit)"},
}

// dimName says what kind of quantity d is, "a resistance (Ohm)", falling back
// to the SI base units, "a quantity in kg m s^-2", for the rest.
func dimName(d quantity.Dim) string {
	for _, e := range dimNames {
		if e.d == d {
			return e.name
		}
	}
	return "a quantity in " + d.String()
}

// dimKind is dimName without the unit: "a resistance".
func dimKind(d quantity.Dim) string {
	s := dimName(d)
	if i := strings.LastIndex(s, " ("); i > 0 {
		return s[:i]
	}
	return s
}

// parseUnit turns a header unit into an SI scale factor and a dimension, using
// the same unit parser as calc blocks.
func parseUnit(s string) (float64, quantity.Dim, error) {
	u, err := quantity.ParseUnit(s)
	if err != nil {
		return 0, quantity.Dim{}, err
	}
	if u.Offset != 0 {
		// Columns are scaled, never shifted: an absolute °C column would read 273.15 K low.
		return 0, quantity.Dim{}, fmt.Errorf("a column in °C holds absolute temperatures with an offset, which data files do not convert: write the column in K")
	}
	return u.Scale, u.D, nil
}
