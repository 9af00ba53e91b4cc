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

// Roles are the canonical names by which the analyses look columns up
// ([Dataset.Col] finds a column by its name, then by its role). A column gets
// its role from its name when Read recognises it ("Magnetic Field (T)",
// "field_T" and "B [mT]" are all the field B), or from a layout.
const (
	RoleField       = "B"     // magnetic field, T
	RoleRxx         = "Rxx"   // longitudinal resistance, Ohm
	RoleRxy         = "Rxy"   // Hall resistance, Ohm
	RoleRyx         = "Ryx"   // Hall resistance with current and voltage probes swapped, Ohm
	RoleRyy         = "Ryy"   // longitudinal resistance across the other axis, Ohm
	RoleRxxY        = "Rxx_Y" // out-of-phase (lock-in Y) part of Rxx, Ohm
	RoleRxyY        = "Rxy_Y" // out-of-phase (lock-in Y) part of Rxy, Ohm
	RoleTemperature = "T"     // temperature, K
	RoleCurrent     = "I"     // excitation current, A
	RoleGate        = "Vg"    // gate voltage, V
	RoleDirection   = "dir"   // sweep direction: text such as up/down, or ±1
	RoleTime        = "time"  // time stamp, s
)

// DimVoltage and DimCurrent are the dimensions of V and A.
var (
	DimVoltage = quantity.Dim{quantity.IdxLength: 2, quantity.IdxMass: 1, quantity.IdxTime: -3, quantity.IdxCurrent: -1}
	DimCurrent = quantity.Dim{quantity.IdxCurrent: 1}
)

// roleInfo is what a role requires of its column.
type roleInfo struct {
	name string
	dim  quantity.Dim
	text bool // the direction column may hold text
}

var roles = []roleInfo{
	{RoleField, DimField, false},
	{RoleRxx, DimResistance, false}, {RoleRxy, DimResistance, false},
	{RoleRyx, DimResistance, false}, {RoleRyy, DimResistance, false},
	{RoleRxxY, DimResistance, false}, {RoleRxyY, DimResistance, false},
	{RoleTemperature, DimTemperature, false},
	{RoleCurrent, DimCurrent, false},
	{RoleGate, DimVoltage, false},
	{RoleDirection, quantity.Dimensionless, true},
	{RoleTime, quantity.Time, false},
}

// lookupRole finds a role by its canonical name (case-insensitive).
func lookupRole(name string) (roleInfo, bool) {
	for _, r := range roles {
		if strings.EqualFold(r.name, name) {
			return r, true
		}
	}
	return roleInfo{}, false
}

// roleNames lists the roles for messages.
func roleNames() string {
	names := make([]string, len(roles))
	for i, r := range roles {
		names[i] = r.name
	}
	return strings.Join(names, ", ")
}

// roleSynonyms maps a column name, lower-cased with blanks, '_', '-' and '.'
// removed, to the role it names. These are the spellings measurement scripts
// and instrument exports commonly use (common practice); anything else needs
// a layout.
var roleSynonyms = map[string]string{
	"b": RoleField, "field": RoleField, "bfield": RoleField, "magneticfield": RoleField, "magnetfield": RoleField,
	"rxx": RoleRxx, "rxy": RoleRxy, "ryx": RoleRyx, "ryy": RoleRyy,
	"rxxy": RoleRxxY, "rxyy": RoleRxyY,
	"t": RoleTemperature, "temp": RoleTemperature, "temperature": RoleTemperature, "tmc": RoleTemperature, "tsample": RoleTemperature,
	"i": RoleCurrent, "current": RoleCurrent,
	"vg": RoleGate, "vgate": RoleGate, "gate": RoleGate, "gatevoltage": RoleGate,
	"dir": RoleDirection, "direction": RoleDirection, "sweepdir": RoleDirection, "sweepdirection": RoleDirection,
	"time": RoleTime,
}

// normName lower-cases a column name and drops blanks, '_', '-' and '.'.
func normName(name string) string {
	var b strings.Builder
	for _, r := range strings.ToLower(name) {
		switch r {
		case ' ', '\t', '_', '-', '.':
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// sniffRole returns the role a column name gives, or "".
func sniffRole(name string) string { return roleSynonyms[normName(name)] }

// suffixUnits are the unit symbols Read accepts as a suffix after '_' at the
// end of a column name without a bracketed unit ("field_T", "X1_V",
// "I_nA"): a short list of measurement units, so that names such as "V_g"
// (a gate voltage, not grams) or "Rxx_X" (a lock-in channel) keep their
// meaning.
var suffixUnits = map[string]bool{
	"T": true, "mT": true, "uT": true, "G": true, "kG": true,
	"K": true, "mK": true,
	"V": true, "mV": true, "uV": true, "nV": true,
	"A": true, "mA": true, "uA": true, "nA": true, "pA": true,
	"Ohm": true, "ohm": true, "kOhm": true, "MOhm": true,
	"Hz": true, "s": true, "ms": true,
}

// splitSuffixUnit splits "field_T" into "field" and "T" when the part after
// the last '_' is one of suffixUnits and the part before is not empty.
func splitSuffixUnit(name string) (stem, unit string, ok bool) {
	i := strings.LastIndexByte(name, '_')
	if i <= 0 || i == len(name)-1 {
		return name, "", false
	}
	if !suffixUnits[name[i+1:]] {
		return name, "", false
	}
	return name[:i], name[i+1:], true
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
