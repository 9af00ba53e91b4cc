package hooks

import (
	"strings"
)

// Plausible mobilities of two-dimensional systems, for the review's warnings. A mobility above
// the upper bound is beyond anything reported for the material (a geometry, a unit or a density
// is wrong far more often than a record is broken); one below the lower bound is lower than a
// two-dimensional gas that shows quantum oscillations has. The upper bounds sit about twice
// above the best values reported; the figures are from memory, with the work that reported
// them, and are meant to catch mistakes, not to judge samples.
type mobilityRange struct {
	material, carrier string  // channel material as the wafer names it; "electrons" or "holes"
	lowT, roomT       float64 // upper bounds, cm^2/(V s), below 10 K and above 200 K
	source            string
}

var mobilityRanges = []mobilityRange{
	// Best GaAs/AlGaAs 2DEGs: about 5e7 cm^2/(V s) at 0.3 K (Y. J. Chung et al., Nature
	// Materials 20, 632 (2021), from memory); at room temperature polar optical phonons limit
	// them to about 8e3–9e3 (K. Hirakawa and H. Sakaki, Phys. Rev. B 33, 8291 (1986), from
	// memory).
	{"GaAs", "electrons", 1e8, 1.2e4, "Chung et al. 2021; Hirakawa & Sakaki 1986"},
	// 2D holes in GaAs: a few 1e6 at low temperature (from memory); room temperature about 400.
	{"GaAs", "holes", 1e7, 1e3, "common values (from memory)"},
	// InAs quantum wells: about 2.4e6 at low temperature (T. Tschirky et al., Phys. Rev. B 95,
	// 115304 (2017), from memory); bulk InAs about 3e4 at 300 K.
	{"InAs", "electrons", 5e6, 5e4, "Tschirky et al. 2017; bulk value (from memory)"},
	// InSb quantum wells: a few 1e5 at low temperature (from memory); bulk InSb about 7.7e4 at
	// 300 K.
	{"InSb", "electrons", 1e6, 1e5, "common values (from memory)"},
	// Strained Ge/SiGe holes: about 3e6 at low temperature (from memory); a few 1e3 at 300 K.
	{"Ge", "holes", 1e7, 5e3, "common values (from memory)"},
	// Si/SiGe electrons about 2e6 at low temperature, Si MOS far less (from memory); bulk Si
	// about 1.4e3 at 300 K.
	{"Si", "electrons", 5e6, 3e3, "common values (from memory)"},
	{"Si", "holes", 1e6, 1e3, "common values (from memory)"},
	// Graphene encapsulated in hBN: a few 1e6 at low temperature; the acoustic-phonon limit at
	// room temperature is about 2e5 (S. V. Morozov et al., Phys. Rev. Lett. 100, 016602 (2008),
	// from memory).
	{"graphene", "electrons", 1e7, 3e5, "Morozov et al. 2008; common values (from memory)"},
	{"graphene", "holes", 1e7, 3e5, "Morozov et al. 2008; common values (from memory)"},
}

// minMobility is the lower bound, cm^2/(V s): a 2D gas whose Landau levels are resolved below
// 10 T needs mu B > 1, so mu > 1e3 cm^2/(V s); a hundred times less is a mistake (common
// practice).
const minMobility = 10.0

// plausibleMobility returns the range for a channel material and carrier type, matched by name
// (an alloy or a well like "In0.75Ga0.25As" finds nothing and is not judged).
func plausibleMobility(material, carrier string) (mobilityRange, bool) {
	m := strings.TrimSpace(material)
	if carrier == "" {
		carrier = "electrons"
		if m == "Ge" {
			carrier = "holes"
		}
	}
	for _, r := range mobilityRanges {
		if strings.EqualFold(r.material, m) && r.carrier == carrier {
			return r, true
		}
	}
	return mobilityRange{}, false
}

// upper is the upper bound at temperature T (kelvin; 0 when unknown, taken as low).
func (r mobilityRange) upper(T float64) float64 {
	if T > 200 {
		return r.roomT
	}
	return r.lowT
}
