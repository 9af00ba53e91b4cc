package band

import (
	"fmt"
	"math"
	"strings"
)

// RegionKind says what a group of layers is for.
type RegionKind int

// Region kinds.
const (
	// RegionBarrier is an undoped group of layers whose lowest conduction edge lies above a
	// neighbour's. Electrons here are a warning sign (for example X states of a thick AlAs
	// layer).
	RegionBarrier RegionKind = iota
	// RegionChannel is the intended channel: a layer named as such (channel, 2DEG, QW,
	// well), or else the undoped well nearest the donors (nearest the surface when there
	// are none).
	RegionChannel
	// RegionDopingWell is a well that holds donors: a narrow GaAs layer clad by AlAs
	// around a Si sheet, or a doped GaAs layer of a short-period superlattice. Its electrons
	// (in its own subband or in the X states of a thin cladding) are reported separately.
	RegionDopingWell
	// RegionCap is the topmost group when its conduction band lies below the next one's
	// (a GaAs cap on an AlGaAs barrier).
	RegionCap
	// RegionDopingLayer is a doped barrier. Electrons left here conduct in parallel.
	RegionDopingLayer
	// RegionWell is an undoped well other than the channel: a parasitic channel when it
	// holds electrons (an undoped buffer, a second quantum well).
	RegionWell
)

// String names the kind as the language shows it.
func (k RegionKind) String() string {
	switch k {
	case RegionChannel:
		return "channel"
	case RegionDopingWell:
		return "doping well"
	case RegionCap:
		return "cap"
	case RegionDopingLayer:
		return "doping layer"
	case RegionWell:
		return "parasitic well"
	}
	return "barrier"
}

// dopingWellMaxM is the widest doped well counted as a doping well: the GaAs doping wells of
// high-mobility wafers and the GaAs layers of short-period-superlattice doping are 1–5 nm
// wide (common practice). A wider doped well is a doping layer whose electrons conduct in
// parallel.
const dopingWellMaxM = 10e-9

// claddingMaxM is the thickest barrier still counted as the cladding of a doping well (the
// AlAs layers of doping wells and short-period superlattices are 1–3 nm; common practice).
const claddingMaxM = 6e-9

// Region is a group of consecutive layers with the same lowest conduction edge, and the
// electrons in it. A subband belongs to the region where its |ψ|² peaks; the X states of
// a thin cladding count with the doping well they clad.
type Region struct {
	Kind RegionKind
	// Name says which region this is: "channel", "doping well 1", "cap", … followed by
	// the layer names or materials.
	Name string
	// FirstLayer and LastLayer are 1-based layer numbers, surface first; 0 stands for the
	// substrate below the last layer.
	FirstLayer, LastLayer int
	StartM, EndM          float64 // depth range, metres from the surface
	EcEV                  float64 // lowest conduction edge of the material (flat band), eV on the common scale
	Donors                bool    // some layer of the region has donors
	N2D                   float64 // electrons in the region's subbands, m^-2
	// BoundN2D is the electrons on neutral shallow donors where their density exceeds the
	// Mott density (an impurity band that conducts in parallel), m^-2. Electrons on deep
	// (DX) donors are localised and not counted.
	BoundN2D  float64
	ValleyN2D [NValleys]float64
	Subbands  []int // indices into Solution.Subbands
}

// regionsOf groups the layers of a stack. bottomM is the depth of the end of the grid
// (metres); when it lies below the last layer, the substrate joins the last group if it has
// the same edge, or forms a group of its own.
func regionsOf(s Stack, ps []Params, bottomM float64) []Region {
	var rs []Region
	depth := 0.0
	sameEdge := func(a, b float64) bool { return math.Abs(a-b) < 1e-6 }
	var pendingDelta []int // zero-thickness layers waiting for a group
	for i, l := range s.Layers {
		top := depth
		depth += l.ThicknessM
		if l.ThicknessM == 0 {
			// A delta layer joins the group before it when their materials have the same
			// edge, otherwise the group after it.
			if n := len(rs); n > 0 && sameEdge(rs[n-1].EcEV, ps[i].EcEV) {
				rs[n-1].LastLayer = i + 1
				rs[n-1].Donors = rs[n-1].Donors || hasDonors(l)
			} else {
				pendingDelta = append(pendingDelta, i)
			}
			continue
		}
		if n := len(rs); n > 0 && sameEdge(rs[n-1].EcEV, ps[i].EcEV) {
			for _, d := range pendingDelta {
				rs[n-1].Donors = rs[n-1].Donors || hasDonors(s.Layers[d])
			}
			pendingDelta = nil
			rs[n-1].LastLayer = i + 1
			rs[n-1].EndM = depth
			rs[n-1].Donors = rs[n-1].Donors || hasDonors(l)
			continue
		}
		r := Region{FirstLayer: i + 1, LastLayer: i + 1, StartM: top, EndM: depth, EcEV: ps[i].EcEV, Donors: hasDonors(l)}
		for _, d := range pendingDelta {
			if sameEdge(ps[d].EcEV, r.EcEV) || len(rs) == 0 {
				r.FirstLayer = min(r.FirstLayer, d+1)
				r.Donors = r.Donors || hasDonors(s.Layers[d])
			} else {
				rs[len(rs)-1].LastLayer = d + 1
				rs[len(rs)-1].Donors = rs[len(rs)-1].Donors || hasDonors(s.Layers[d])
			}
		}
		pendingDelta = nil
		rs = append(rs, r)
	}
	for _, d := range pendingDelta { // delta layers at the very end
		rs[len(rs)-1].LastLayer = d + 1
		rs[len(rs)-1].Donors = rs[len(rs)-1].Donors || hasDonors(s.Layers[d])
	}
	if bottomM > depth+1e-15 {
		sub := ps[len(s.Layers)]
		if last := &rs[len(rs)-1]; sameEdge(last.EcEV, sub.EcEV) {
			last.EndM = bottomM
		} else {
			rs = append(rs, Region{StartM: depth, EndM: bottomM, EcEV: sub.EcEV})
		}
	}
	// Wells: below both neighbours (the surface bounds the first group from above, the end
	// of the grid the last one from below).
	well := make([]bool, len(rs))
	for k := range rs {
		lower := true
		if k > 0 && !(rs[k].EcEV < rs[k-1].EcEV-1e-9) {
			lower = false
		}
		if k+1 < len(rs) && !(rs[k].EcEV < rs[k+1].EcEV-1e-9) {
			lower = false
		}
		if len(rs) == 1 {
			lower = false
		}
		well[k] = lower
	}
	// Named channels.
	named := false
	for k := range rs {
		for li := rs[k].FirstLayer; li <= rs[k].LastLayer && li >= 1; li++ {
			if channelName(s.Layers[li-1].Name) {
				rs[k].Kind = RegionChannel
				named = true
			}
		}
	}
	for k := range rs {
		if rs[k].Kind == RegionChannel {
			continue
		}
		switch {
		case k == 0 && well[k] && len(rs) > 1:
			rs[k].Kind = RegionCap
		case well[k] && rs[k].Donors && rs[k].EndM-rs[k].StartM <= dopingWellMaxM:
			rs[k].Kind = RegionDopingWell
		case well[k]:
			rs[k].Kind = RegionWell
		case rs[k].Donors:
			rs[k].Kind = RegionDopingLayer
		default:
			rs[k].Kind = RegionBarrier
		}
	}
	// Short-period superlattice doping: thin undoped wells joined to a doping well through
	// thin barriers (the undoped GaAs layers of a GaAs/AlAs superlattice around the doped
	// ones) belong to the doping structure.
	for changed := true; changed; {
		changed = false
		for k := range rs {
			if rs[k].Kind != RegionWell || rs[k].EndM-rs[k].StartM > dopingWellMaxM {
				continue
			}
			for _, d := range []int{-1, 1} {
				b, w := k+d, k+2*d
				if w < 0 || w >= len(rs) || rs[w].Kind != RegionDopingWell || rs[b].EndM-rs[b].StartM > claddingMaxM {
					continue
				}
				rs[k].Kind = RegionDopingWell
				changed = true
				break
			}
		}
	}
	if !named {
		// The undoped well nearest the donors (nearest the surface without donors).
		best, bestD := -1, math.Inf(1)
		for k := range rs {
			if rs[k].Kind != RegionWell {
				continue
			}
			d := donorDistance(s, rs[k])
			if best < 0 || d < bestD-1e-12 {
				best, bestD = k, d
			}
		}
		if best >= 0 {
			rs[best].Kind = RegionChannel
		}
	}
	// Names.
	nDW := 0
	for k := range rs {
		kind := rs[k].Kind.String()
		if rs[k].Kind == RegionDopingWell {
			nDW++
			kind = fmt.Sprintf("doping well %d", nDW)
		}
		rs[k].Name = kind + " (" + regionLayers(s, rs[k]) + ")"
	}
	return rs
}

func hasDonors(l Layer) bool { return l.Doping.Donor() && l.Doping.Density > 0 }

// channelName reports whether a layer name says the layer is meant to hold the 2D gas.
func channelName(name string) bool {
	n := strings.ToLower(name)
	if strings.Contains(n, "doping") || strings.Contains(n, "donor") {
		return false
	}
	for _, w := range []string{"channel", "2deg", "2des", "qw", "well"} {
		if strings.Contains(n, w) {
			return true
		}
	}
	return false
}

// donorDistance is the distance from a region to the nearest donor layer (metres); +Inf
// without donors, in which case regions nearer the surface come first.
func donorDistance(s Stack, r Region) float64 {
	best := math.Inf(1)
	depth := 0.0
	for _, l := range s.Layers {
		top := depth
		depth += l.ThicknessM
		if !hasDonors(l) {
			continue
		}
		c := 0.5 * (top + depth)
		d := math.Max(0, math.Max(r.StartM-c, c-r.EndM))
		best = math.Min(best, d)
	}
	if math.IsInf(best, 1) {
		return 1 + r.StartM // no donors: the shallowest well
	}
	return best
}

// regionLayers names the layers of a region: their names, or their materials.
func regionLayers(s Stack, r Region) string {
	if r.FirstLayer == 0 {
		return "substrate"
	}
	var parts []string
	seen := map[string]bool{}
	for li := r.FirstLayer; li <= r.LastLayer; li++ {
		l := s.Layers[li-1]
		n := l.Name
		if n == "" {
			n = l.Material
		}
		if !seen[n] {
			seen[n] = true
			parts = append(parts, n)
		}
	}
	return strings.Join(parts, ", ")
}

// regionAt returns the index of the region holding depth z.
func regionAt(rs []Region, z float64) int {
	for k := range rs {
		if z <= rs[k].EndM+1e-15 {
			return k
		}
	}
	return len(rs) - 1
}

// dopingWellReachM is how far from a doping well a state outside any well may peak and still
// count with the well: its charge bends the neighbouring barrier into notches a few
// nanometres wide, which hold some of its electrons (common practice).
const dopingWellReachM = 20e-9

// claddedWell returns the doping well that a state peaking at depth z in region k belongs to:
// region k clads the well (a thin barrier next to it), or k is a barrier and the well lies
// within dopingWellReachM of z. Otherwise -1.
func claddedWell(rs []Region, k int, z float64) int {
	switch rs[k].Kind {
	case RegionDopingWell, RegionChannel, RegionCap, RegionWell:
		return -1
	}
	thin := rs[k].EndM-rs[k].StartM <= claddingMaxM
	best, bestD := -1, math.Inf(1)
	for _, w := range []int{k - 1, k + 1, k - 2, k + 2} {
		if w < 0 || w >= len(rs) || rs[w].Kind != RegionDopingWell {
			continue
		}
		d := math.Max(0, math.Max(rs[w].StartM-z, z-rs[w].EndM))
		if (thin && (w == k-1 || w == k+1)) || d <= dopingWellReachM {
			if d < bestD {
				best, bestD = w, d
			}
		}
	}
	return best
}

// interfaceReachM is how far from a channel's interface a subband's electrons may lie and
// still belong to the channel: the subbands of a heterojunction 2DEG lie within some tens of
// nanometres of the interface (common practice); states farther into a thick channel layer
// sit in the flat band of the buffer and form a parasitic channel.
const interfaceReachM = 100e-9

// nearInterface reports whether at least half of |ψ|² lies within interfaceReachM of a
// boundary of region r that faces another region (not the end of the grid).
func nearInterface(rs []Region, k int, z, psi []float64, h float64) bool {
	r := rs[k]
	top := k > 0
	bottom := k+1 < len(rs)
	in := 0.0
	for j, p := range psi {
		if z[j] < r.StartM || z[j] > r.EndM {
			in += p * p * h // outside the region: in a barrier next to it
			continue
		}
		if (top && z[j]-r.StartM <= interfaceReachM) || (bottom && r.EndM-z[j] <= interfaceReachM) {
			in += p * p * h
		}
	}
	return in >= 0.5
}
