package notebook

import (
	"slices"

	"cleave/calc/quantity"
)

// Kind is the kind of an entry, as written in its `kind:` field.
type Kind string

// The six entry kinds.
const (
	KindWafer    Kind = "wafer"
	KindPiece    Kind = "piece"
	KindMask     Kind = "mask"
	KindProcess  Kind = "process"
	KindDevice   Kind = "device"
	KindCooldown Kind = "cooldown"
)

// Kinds returns the known kinds in lineage order (the order of the kind table).
func Kinds() []Kind {
	ks := make([]Kind, len(kindTable))
	for i, ki := range kindTable {
		ks[i] = ki.Kind
	}
	return ks
}

// Known reports whether k is one of [Kinds].
func (k Kind) Known() bool {
	_, ok := LookupKind(k)
	return ok
}

// FieldType says what a front-matter field holds.
type FieldType int

// Field types. A Map or List field may describe its members in Field.Fields.
const (
	TypeText         FieldType = iota // any scalar, kept as text
	TypeDate                          // a date, YYYY-MM-DD
	TypeBool                          // true or false
	TypeEnum                          // one of Field.Values
	TypeQuantity                      // a number with a unit of dimension Field.Dims[0] (or another of Dims)
	TypeLink                          // the id of one entry of one of Field.Kinds
	TypeLinks                         // a list of ids (a single id is accepted as a list of one)
	TypeTextList                      // a list of scalars
	TypeMap                           // a mapping; members in Field.Fields
	TypeList                          // a list of mappings, each with members in Field.Fields
	TypeMapOrList                     // a mapping or a list (e.g. contact numbering)
	TypeQuantityList                  // a list of quantities of dimension Field.Dims[0] (or another of Dims)
	TypeNamedMaps                     // a mapping of names to mappings with members in Field.Fields (plus Field.Variants[kind])
	TypeMetalStack                    // a metal stack, "Ni/AuGe/Ni/Au 5/150/30/100 nm"
)

var typeNames = [...]string{"text", "date", "bool", "enum", "quantity", "link", "list of links", "list", "map", "list of maps", "map or list",
	"list of quantities", "map of named maps", "metal stack"}

func (t FieldType) String() string {
	if int(t) < len(typeNames) {
		return typeNames[t]
	}
	return "unknown"
}

// Field describes one front-matter field of a kind.
type FieldSpec struct {
	Name     string
	Type     FieldType
	Dims     []quantity.Dim // TypeQuantity: accepted dimensions, the first is the usual one
	Example  string         // TypeQuantity: an example value used in messages, e.g. "20 um"
	Kinds    []Kind         // TypeLink, TypeLinks: kinds the link may name
	Values   []string       // TypeEnum: allowed values
	Fields   []FieldSpec    // TypeMap, TypeList: members (other members are allowed)
	TextOK   bool           // TypeMap: a plain text is accepted instead (position: centre; illumination: none)
	Required bool
	Doc      string
	// TypeNamedMaps: each member's `kind` names its variant, whose fields come after Fields
	// (the process steps: a lithography step has a spin speed, an etch a depth).
	Variants map[string][]FieldSpec
}

// Dimensions used by the schema.
var (
	dimLength     = quantity.Length
	dimDensity2D  = quantity.Length.Pow(-2)
	dimTemp       = quantity.Temperature
	dimTime       = quantity.Time
	dimFrequency  = quantity.Time.Pow(-1)
	dimCurrent    = quantity.Current
	dimVoltage    = quantity.Mass.Mul(quantity.Length.Pow(2)).Div(quantity.Time.Pow(3)).Div(quantity.Current)
	dimResistance = dimVoltage.Div(quantity.Current)
	dimField      = quantity.Mass.Div(quantity.Time.Pow(2)).Div(quantity.Current) // tesla
	dimCharge     = quantity.Current.Mul(quantity.Time)
	dimDensity3D  = quantity.Length.Pow(-3)
	dimRate       = quantity.Length.Div(quantity.Time)
	dimPressure   = quantity.Mass.Div(quantity.Length).Div(quantity.Time.Pow(2))
	dimIntensity  = quantity.Mass.Div(quantity.Time.Pow(3))                         // W/m^2
	dimDose       = quantity.Mass.Div(quantity.Time.Pow(2))                         // J/m^2
	dimChargeArea = quantity.Current.Mul(quantity.Time).Div(quantity.Length.Pow(2)) // C/m^2
	dimGasFlow    = quantity.Amount.Div(quantity.Time)
	dimRamp       = quantity.Temperature.Div(quantity.Time)
	dimVolume     = quantity.Length.Pow(3)
	dimPower      = quantity.Mass.Mul(quantity.Length.Pow(2)).Div(quantity.Time.Pow(3))
)

// celsiusHint explains a temperature written with C, the coulomb: "is a charge (C is the
// coulomb): write °C or degC for degrees Celsius". It is "" unless a temperature was
// expected and a charge found.
func celsiusHint(got, want quantity.Dim) string {
	if want == dimTemp && got == dimCharge {
		return "is a charge (C is the coulomb): write °C or degC for degrees Celsius"
	}
	return ""
}

// dimNames names the dimensions the schema uses, for messages.
var dimNames = map[quantity.Dim]string{
	dimLength:     "a length",
	dimDensity2D:  "a sheet density",
	dimTemp:       "a temperature",
	dimTime:       "a time",
	dimFrequency:  "a frequency",
	dimCurrent:    "a current",
	dimVoltage:    "a voltage",
	dimResistance: "a resistance",
	dimField:      "a magnetic field",
	dimCharge:     "a charge",
	dimDensity3D:  "a volume density",
	dimRate:       "a rate (length per time)",
	dimPressure:   "a pressure",
	dimIntensity:  "an intensity (power per area)",
	dimDose:       "a dose (energy per area)",
	dimChargeArea: "a dose (charge per area)",
	dimGasFlow:    "a gas flow",
	dimRamp:       "a ramp rate (temperature per time)",
	dimVolume:     "a volume",
	dimPower:      "a power",
}

func dimName(d quantity.Dim) string {
	if n, ok := dimNames[d]; ok {
		return n
	}
	if d.IsDimensionless() {
		return "a dimensionless number"
	}
	return "a quantity of dimension " + d.String()
}

func q(name string, d quantity.Dim, example, doc string) FieldSpec {
	return FieldSpec{Name: name, Type: TypeQuantity, Dims: []quantity.Dim{d}, Example: example, Doc: doc}
}

func text(name, doc string) FieldSpec { return FieldSpec{Name: name, Type: TypeText, Doc: doc} }

func link(name string, required bool, doc string, kinds ...Kind) FieldSpec {
	return FieldSpec{Name: name, Type: TypeLink, Kinds: kinds, Required: required, Doc: doc}
}

func links(name string, doc string, kinds ...Kind) FieldSpec {
	return FieldSpec{Name: name, Type: TypeLinks, Kinds: kinds, Doc: doc}
}

// common fields every entry may carry.
var common = []FieldSpec{
	{Name: "id", Type: TypeText, Required: true, Doc: "unique id: letters, digits, '-', '_', '.'"},
	{Name: "kind", Type: TypeEnum, Required: true, Doc: "the entry kind", Values: kindNames()},
	text("title", "free title"),
	{Name: "date", Type: TypeDate, Doc: "date of the record"},
	text("by", "initials of who did it"),
	{Name: "tags", Type: TypeTextList, Doc: "free tags"},
	text("notes", "free notes"),
}

var probeFields = []FieldSpec{
	text("name", "probe name"),
	q("position", dimLength, "250 um", "position along the bar from the source end"),
	q("arm_width", dimLength, "10 um", "width of the probe arm"),
	{Name: "side", Type: TypeEnum, Values: []string{"top", "bottom"}, Doc: "side of the bar: top is left of the current's path seen from above"},
	text("section", "the section of an L-shaped bar the probe is on"),
}

var sectionFields = []FieldSpec{
	text("name", "section name"),
	q("width", dimLength, "50 um", "channel width of the section"),
	q("length", dimLength, "600 um", "centre-line length from the previous bend (or the source end) to the next (or the drain end)"),
	text("direction", "crystal direction of the current in it, e.g. [1-10]"),
}

// MaskShapes are the shapes a mask may have (the `shape:` field; hall-bar when absent).
var MaskShapes = []string{"hall-bar", "L", "van-der-pauw", "cloverleaf", "corbino"}

// calibrationFields are a calibration wafer's records of a cell: the cell temperature, and
// the density measured in a doped layer grown at growth_rate, or the sheet density of a
// delta layer with its shutter time.
var calibrationFields = []FieldSpec{
	text("cell", "the effusion cell, e.g. Si, Be"),
	q("cell_temperature", dimTemp, "1150 °C", "cell temperature during the calibration layer"),
	q("density", dimDensity3D, "1.1e18 cm^-3", "density measured in the layer (Hall, SIMS, C-V)"),
	q("growth_rate", dimRate, "1 ML(GaAs)/s", "growth rate of the doped layer (gives the flux)"),
	q("sheet_density", dimDensity2D, "2.5e12 cm^-2", "sheet density of a delta layer"),
	q("time", dimTime, "100 s", "shutter time of a delta layer"),
	text("method", "how the density was measured, e.g. Hall at 300 K"),
}

// tlmPatternFields describe a transfer-length pattern on a mask.
var tlmPatternFields = []FieldSpec{
	q("width", dimLength, "100 um", "contact (and channel) width"),
	q("contact_length", dimLength, "100 um", "length of each contact pad along the current"),
	{Name: "gaps", Type: TypeQuantityList, Dims: []quantity.Dim{dimLength}, Example: "[5 um, 10 um, 20 um, 40 um]", Doc: "gaps between neighbouring pads, in measuring order"},
}

// stepFields are the fields every process step may carry; stepKinds add each kind's own.
var stepFields = []FieldSpec{
	{Name: "kind", Type: TypeEnum, Required: true, Doc: "what the step does", Values: stepKindNames()},
	text("caution", "the usual caution for this step; local rules and the SOP come first"),
	{Name: "date", Type: TypeDate, Doc: "date of the step"},
	text("by", "initials"),
	text("tool", "tool or bench"),
	text("sop", "the SOP followed"),
	text("notes", "free notes"),
}

// stepKinds are the kinds of process step and their fields.
var stepKinds = map[string][]FieldSpec{
	"clean": {text("solvents", "solvents in order"), q("time", dimTime, "5 min", "time in each"),
		q("temperature", dimTemp, "50 °C", "bath temperature"), {Name: "ultrasonic", Type: TypeBool, Doc: "ultrasonic bath"}},
	"lithography": {text("resist", "resist"), q("spin", dimFrequency, "4000 rpm", "spin speed"), q("spin_time", dimTime, "45 s", "spin time"),
		q("bake", dimTemp, "115 °C", "soft-bake temperature"), q("bake_time", dimTime, "90 s", "soft-bake time"),
		text("mask", "mask id and layer, or pattern file"), q("intensity", dimIntensity, "12 mW/cm^2", "lamp intensity"),
		q("exposure", dimTime, "6 s", "exposure time"),
		{Name: "dose", Type: TypeQuantity, Dims: []quantity.Dim{dimDose, dimChargeArea}, Example: "72 mJ/cm^2", Doc: "exposure dose (optical, or e-beam in uC/cm^2)"},
		text("developer", "developer"), q("develop_time", dimTime, "45 s", "develop time")},
	"etch": {text("etchant", "chemistry and ratio, or the dry recipe"), text("method", "wet or dry"),
		q("temperature", dimTemp, "21 °C", "etch temperature"), q("time", dimTime, "4 min", "etch time"),
		q("target", dimLength, "150 nm", "target depth"), q("depth", dimLength, "148 nm", "measured depth"),
		q("rate", dimRate, "37 nm/min", "etch rate, when known beforehand")},
	"dip": {text("solution", "solution and ratio"), q("time", dimTime, "30 s", "dip time"), q("rinse", dimTime, "30 s", "rinse time")},
	"metal": {{Name: "stack", Type: TypeMetalStack, Doc: `metals bottom first and their thicknesses, e.g. "Ni/AuGe/Ni/Au 5/150/30/100 nm"`},
		text("method", "evaporation, sputtering"), q("base_pressure", dimPressure, "2e-7 Torr", "base pressure"),
		q("rate", dimRate, "0.1 nm/s", "deposition rate")},
	"liftoff": {text("solvent", "solvent"), q("time", dimTime, "30 min", "time"), {Name: "ultrasonic", Type: TypeBool, Doc: "ultrasonic bath"}},
	"anneal": {q("temperature", dimTemp, "440 °C", "anneal temperature"), q("time", dimTime, "60 s", "time at temperature"),
		text("gas", "ambient"), q("flow", dimGasFlow, "500 sccm", "gas flow"), q("ramp", dimRamp, "20 °C/s", "ramp rate")},
	"dielectric": {text("material", "e.g. Al2O3"), text("precursors", "precursors"), q("temperature", dimTemp, "150 °C", "deposition temperature"),
		text("cycles", "ALD cycles"), q("thickness", dimLength, "30 nm", "thickness")},
	"tlm": {text("pattern", "the TLM pattern on the mask"), text("mask", "the mask's id, when not in the entry's lineage"),
		{Name: "gaps", Type: TypeQuantityList, Dims: []quantity.Dim{dimLength}, Example: "[5 um, 10 um, 20 um]", Doc: "gaps, when no pattern is named"},
		{Name: "resistances", Type: TypeQuantityList, Dims: []quantity.Dim{dimResistance}, Example: "[60 Ohm, 110 Ohm, 210 Ohm]", Doc: "total resistance across each gap"},
		q("width", dimLength, "100 um", "contact width, when no pattern is named"), q("contact_length", dimLength, "100 um", "contact length"),
		q("temperature", dimTemp, "21 °C", "measurement temperature")},
	"bond":  {text("carrier", "chip carrier"), text("wire", "wire and diameter"), text("glue", "glue")},
	"other": {},
}

func stepKindNames() []string {
	return []string{"clean", "lithography", "etch", "dip", "metal", "liftoff", "anneal", "dielectric", "tlm", "bond", "other"}
}

// KindInfo describes one entry kind: everything `validate`, `new`, `init`, the templates and
// the tests read about it. Adding a kind is one row of kindTable plus its template
// (templates/defaults/KIND.md).
type KindInfo struct {
	Kind   Kind
	Folder string      // the conventional folder: `init` creates it, `new` writes there
	Doc    string      // what an entry of this kind records
	Fields []FieldSpec // its own fields (the common ones come first, see [Schema]); link fields name the kinds they may point at
}

// Parents is how many parent ids `cleave new KIND ID --from PARENT` takes: the first link
// field decides (one for a single link, any number for a list, none without links).
func (ki KindInfo) Parents() int {
	for _, f := range ki.Fields {
		switch f.Type {
		case TypeLink:
			return 1
		case TypeLinks:
			return -1
		}
	}
	return 0
}

// kindTable is the one table of entry kinds, in lineage order.
var kindTable = []KindInfo{
	{Kind: KindWafer, Folder: "wafers", Doc: "a growth run: substrate, material system, layer stack, growth notes", Fields: []FieldSpec{
		{Name: "grown", Type: TypeDate, Doc: "growth date"},
		text("system", "growth chamber"),
		text("substrate", `substrate, e.g. "GaAs (001), semi-insulating, 3 inch"`),
		text("material_system", `e.g. "GaAs/AlGaAs"`),
		text("channel", "material of the 2D gas"),
		{Name: "carrier", Type: TypeEnum, Values: []string{"electrons", "holes"}, Doc: "carrier type"},
		{Name: "doping_scheme", Type: TypeEnum, Values: []string{"uniform", "delta", "none"}, Doc: "doping scheme"},
		{Name: "rotation", Type: TypeBool, Doc: "substrate rotation during growth"},
		q("design_density", dimDensity2D, "3e11 cm^-2", "designed sheet density"),
		{Name: "calibration", Type: TypeList, Fields: calibrationFields, Doc: "a calibration wafer's cell calibrations (cell_calibration reads them)"},
	}},
	{Kind: KindPiece, Folder: "pieces", Doc: "a part cleaved from a wafer or another piece: size, position on the wafer", Fields: []FieldSpec{
		link("from", true, "the wafer or piece it was cleaved from", KindWafer, KindPiece),
		q("width", dimLength, "4 mm", "piece width"),
		q("length", dimLength, "5 mm", "piece length"),
		{Name: "position", Type: TypeMap, TextOK: true, Doc: `position on the wafer: x, y from the centre, or a text such as "centre"`,
			Fields: []FieldSpec{q("x", dimLength, "5 mm", "x from the wafer centre"), q("y", dimLength, "-3 mm", "y from the wafer centre")}},
		text("orientation", "long edge relative to the major flat and crystal direction"),
		{Name: "cleaved", Type: TypeDate, Doc: "cleave date"},
	}},
	{Kind: KindMask, Folder: "masks", Doc: "a photomask or e-beam pattern: Hall-bar geometry, probes, contact numbering", Fields: []FieldSpec{
		text("version", "mask version"),
		{Name: "shape", Type: TypeEnum, Values: MaskShapes, Doc: "device shape (hall-bar when absent)"},
		q("width", dimLength, "20 um", "channel width"),
		q("length", dimLength, "500 um", "source-drain length"),
		{Name: "probes", Type: TypeList, Fields: probeFields, Doc: "voltage probes"},
		{Name: "sections", Type: TypeList, Fields: sectionFields, Doc: "the straight sections of an L-shaped bar, from source to drain"},
		q("inner_radius", dimLength, "100 um", "inner radius of a Corbino disc"),
		q("outer_radius", dimLength, "500 um", "outer radius of a Corbino disc"),
		q("size", dimLength, "5 mm", "side of a van der Pauw square or cloverleaf"),
		{Name: "contacts", Type: TypeMapOrList, Doc: "contacts: source and drain (a bar), corners (van der Pauw), inner and outer (Corbino), pads"},
		{Name: "tlm", Type: TypeNamedMaps, Fields: tlmPatternFields, Doc: "transfer-length patterns by name: width, contact_length, gaps"},
	}},
	{Kind: KindProcess, Folder: "processes", Doc: "a fabrication run: ordered steps with parameters and cautions", Fields: []FieldSpec{
		links("pieces", "the pieces it treated", KindPiece),
		links("masks", "the masks it used", KindMask),
		{Name: "steps", Type: TypeNamedMaps, Fields: stepFields, Variants: stepKinds, Doc: "the steps in order, by name: each a map with its kind and quantities"},
	}},
	{Kind: KindDevice, Folder: "devices", Doc: "one patterned device on a piece", Fields: []FieldSpec{
		link("from", true, "the piece it was patterned on", KindPiece),
		link("mask", false, "the mask used", KindMask),
		links("process", "fabrication runs", KindProcess),
		text("axis", "Hall-bar axis relative to the crystal, e.g. [1-10]"),
		{Name: "as_built", Type: TypeMap, Doc: "measured geometry overriding the mask's",
			Fields: []FieldSpec{q("width", dimLength, "19.6 um", "as-built channel width"), q("length", dimLength, "500 um", "as-built length"),
				{Name: "probes", Type: TypeList, Fields: probeFields, Doc: "as-built probes"},
				{Name: "sections", Type: TypeList, Fields: sectionFields, Doc: "as-built sections of an L-shaped bar"},
				q("inner_radius", dimLength, "100 um", "as-built inner radius of a Corbino disc"),
				q("outer_radius", dimLength, "500 um", "as-built outer radius of a Corbino disc")}},
		{Name: "good_contacts", Type: TypeTextList, Doc: "contacts that work"},
		{Name: "bonding", Type: TypeMap, Doc: "pin to contact"},
	}},
	{Kind: KindCooldown, Folder: "cooldowns", Doc: "one measurement session: system, temperatures, illumination, wiring, data files", Fields: []FieldSpec{
		links("devices", "devices measured", KindDevice),
		text("system", "cryostat"),
		text("thermometer", "which thermometer a temperature means"),
		q("base_temperature", dimTemp, "20 mK", "base temperature"),
		{Name: "magnet", Type: TypeMap, Doc: "magnet", Fields: []FieldSpec{
			q("max_field", dimField, "12 T", "maximum field"), q("offset", dimField, "2 mT", "field offset near zero")}},
		{Name: "illumination", Type: TypeMap, TextOK: true, Doc: "illumination, or none", Fields: []FieldSpec{
			text("source", "light source"), q("current", dimCurrent, "1 mA", "LED current"),
			q("duration", dimTime, "60 s", "duration"), q("temperature", dimTemp, "4.2 K", "temperature during illumination"),
			q("gate_bias", dimVoltage, "0 V", "gate bias during illumination")}},
		{Name: "excitation", Type: TypeMap, Doc: "excitation", Fields: []FieldSpec{
			q("bias_resistor", dimResistance, "10 MOhm", "bias resistor"), q("source_voltage", dimVoltage, "1 V", "source voltage"),
			q("current", dimCurrent, "100 nA", "measured current"), q("frequency", dimFrequency, "13 Hz", "lock-in frequency")}},
		{Name: "lockins", Type: TypeList, Doc: "lock-in settings", Fields: []FieldSpec{
			text("channel", "instrument channel"), q("time_constant", dimTime, "300 ms", "time constant"),
			text("phase", "phase setting"),
			{Name: "sensitivity", Type: TypeQuantity, Dims: []quantity.Dim{dimVoltage, dimCurrent}, Example: "10 mV", Doc: "sensitivity (voltage or current input)"}}},
		{Name: "wiring", Type: TypeMap, Doc: `instrument channel to contacts: current "1 -> 5" (source to drain), a voltage "7 - 3" (V7 − V3)`},
		{Name: "convention", Type: TypeMap, Doc: "sign convention of the Hall data", Fields: []FieldSpec{
			{Name: "field", Type: TypeEnum, Values: []string{"up", "down"}, Doc: "B > 0 points out of the grown surface (up, the default) or into it"},
			{Name: "electrons", Type: TypeEnum, Values: []string{"negative", "positive"}, Doc: "the sign of the Hall slope electrons give in this cooldown's files (overrides the wiring)"}}},
		{Name: "gate_history", Type: TypeTextList, Doc: "gate biases in order"},
		{Name: "data", Type: TypeList, Doc: "data files", Fields: []FieldSpec{
			text("file", "path relative to the entry"), text("note", "what it is"),
			text("layout", "how the file is written: the name of a layout in the notebook's layouts/ folder"),
			q("temperature", dimTemp, "20 mK", "temperature"), q("gate", dimVoltage, "-0.2 V", "gate voltage")}},
	}},
}

// KindTable returns the kind table (a copy), in lineage order.
func KindTable() []KindInfo { return slices.Clone(kindTable) }

// LookupKind returns the row of the kind table for k.
func LookupKind(k Kind) (KindInfo, bool) {
	for _, ki := range kindTable {
		if ki.Kind == k {
			return ki, true
		}
	}
	return KindInfo{}, false
}

func kindNames() []string {
	var ns []string
	for _, ki := range kindTable {
		ns = append(ns, string(ki.Kind))
	}
	return ns
}

// Schema returns the fields of kind k: the fields common to all kinds first
// (id, kind, title, date, by, tags, notes), then the kind's own. It returns
// false for an unknown kind. The returned slice is a copy.
func Schema(k Kind) ([]FieldSpec, bool) {
	fs, ok := fullSchemas[k]
	return slices.Clone(fs), ok
}

// fullSchemas and linkFieldsOf are built once from schemas; never modified.
var fullSchemas, linkFieldsOf = func() (map[Kind][]FieldSpec, map[Kind][]FieldSpec) {
	full, lf := map[Kind][]FieldSpec{}, map[Kind][]FieldSpec{}
	for _, ki := range kindTable {
		k := ki.Kind
		full[k] = append(slices.Clone(common), ki.Fields...)
		for _, f := range ki.Fields {
			if f.Type == TypeLink || f.Type == TypeLinks {
				lf[k] = append(lf[k], f)
			}
		}
	}
	return full, lf
}()

// lookupField finds a field in a field list by name.
func lookupField(fields []FieldSpec, name string) (FieldSpec, bool) {
	for _, f := range fields {
		if f.Name == name {
			return f, true
		}
	}
	return FieldSpec{}, false
}

// linkFields returns the link fields of kind k in schema order.
func linkFields(k Kind) []FieldSpec { return linkFieldsOf[k] }
