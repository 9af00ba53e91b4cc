package transport

import (
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

// knownDim returns the dimension a column must have judging by its name, the SI
// unit assumed when the header gives none, and whether the name is known.
//
// Known names (case-insensitive, underscores ignored): B, Field, Bfield → field;
// names starting with Rxx, Rxy, Ryx, Ryy, Rhoxx, Rhoxy → resistance (lock-in parts
// such as Rxx_X and Rxx_Y included); T, Temp, Temperature, Tmc, Tsample → temperature.
func knownDim(name string) (quantity.Dim, string, bool) {
	n := strings.ToLower(strings.ReplaceAll(name, "_", ""))
	switch n {
	case "b", "field", "bfield":
		return DimField, "T", true
	case "t", "temp", "temperature", "tmc", "tsample":
		return DimTemperature, "K", true
	}
	for _, p := range []string{"rxx", "rxy", "ryx", "ryy", "rhoxx", "rhoxy"} {
		if strings.HasPrefix(n, p) {
			return DimResistance, "Ohm", true
		}
	}
	return quantity.Dim{}, "", false
}

// parseUnit turns a header unit into an SI scale factor and a dimension, using
// the same unit parser as calc blocks.
func parseUnit(s string) (float64, quantity.Dim, error) {
	u, err := quantity.ParseUnit(s)
	if err != nil {
		return 0, quantity.Dim{}, err
	}
	return u.Scale, u.D, nil
}
