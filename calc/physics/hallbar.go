package physics

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"cleave/calc/quantity"
)

// Probe is one voltage probe of a Hall bar.
type Probe struct {
	Name     string
	Position quantity.Quantity // centre of the probe's arm along the channel, from the source end (of its section, on an L-shaped bar)
	ArmWidth quantity.Quantity // width of the arm where it meets the channel; the zero Quantity means unknown
	// Side is "top" or "bottom": top is on the left of the current's path from source to
	// drain, seen from above (the grown surface facing the viewer), so with the source on
	// the left of the drawing, top is the upper edge.
	Side string
	// Section names the section of an L-shaped bar the probe sits on ("" on a straight bar).
	Section string
}

// Section is one straight part of an L-shaped (or longer, bent) Hall bar, in the order the
// current passes them from source to drain. Positions along a section run along its centre
// line from the point where it meets the previous section's centre line (the source end for
// the first); Length runs to where it meets the next one's (the drain end for the last).
type Section struct {
	Name      string
	Width     quantity.Quantity
	Length    quantity.Quantity
	Direction string // the crystal direction of the current in it, e.g. "[1-10]" (for the record)
}

// HallBar is the drawn (or as-built) geometry of a Hall bar: channel width and probes, or,
// for an L-shaped bar, its sections with their own widths. Source and Drain name the end
// contacts (the mask's contacts.source and contacts.drain), when known.
type HallBar struct {
	Width    quantity.Quantity
	Probes   []Probe
	Sections []Section
	Source   string
	Drain    string
}

// Thresholds for the geometry warnings (common practice). The aspect-ratio rule follows the
// classic Hall-plate analyses: Chwang, Smith & Crowell, Solid-State Electron. 17, 1217 (1974);
// Perloff, Solid-State Electron. 20, 681 (1977).
const (
	minAspect       = 3.0 // probe spacing over channel width
	armOverSpacing  = 0.2 // arm width at most spacing/5
	armOverWidth    = 0.2 // arm width at most W/5 (common practice)
	alignedFraction = 1e-3
)

// ErrUnknownProbe is returned (wrapped) when a probe name is not on the bar.
var ErrUnknownProbe = errors.New("unknown probe")

func (h HallBar) probe(name string) (Probe, error) {
	for _, p := range h.Probes {
		if p.Name == name {
			return p, nil
		}
	}
	names := make([]string, len(h.Probes))
	for i, p := range h.Probes {
		names[i] = p.Name
	}
	return Probe{}, fmt.Errorf("%w %q (the bar has %v)", ErrUnknownProbe, name, names)
}

// Validate checks the dimensions and values of the geometry: a positive width (of the bar,
// or of each section with a positive length), positions and arm widths that are lengths,
// non-negative arm widths, unique names, sides "top" or "bottom", and on a bar with sections
// a known section for every probe. It returns every problem joined.
func (h HallBar) Validate() error {
	var errs []error
	if len(h.Sections) == 0 {
		if err := positive("hall_bar", "width", h.Width, kLength); err != nil {
			errs = append(errs, err)
		}
	}
	secs := map[string]bool{}
	for i, sec := range h.Sections {
		label := fmt.Sprintf("sections[%d]", i)
		if sec.Name == "" {
			errs = append(errs, domain("hall_bar", label, "section has no name"))
		} else if secs[sec.Name] {
			errs = append(errs, domain("hall_bar", label, "duplicate section name %q", sec.Name))
		}
		secs[sec.Name] = true
		if err := positive("hall_bar", label+".width", sec.Width, kLength); err != nil {
			errs = append(errs, err)
		}
		if err := positive("hall_bar", label+".length", sec.Length, kLength); err != nil {
			errs = append(errs, err)
		}
	}
	seen := map[string]bool{}
	for i, p := range h.Probes {
		label := fmt.Sprintf("probes[%d]", i)
		if p.Name == "" {
			errs = append(errs, domain("hall_bar", label, "probe has no name"))
		} else if seen[p.Name] {
			errs = append(errs, domain("hall_bar", label, "duplicate probe name %q", p.Name))
		}
		seen[p.Name] = true
		if err := check("hall_bar", label+".position", p.Position, kLength); err != nil {
			errs = append(errs, err)
		}
		if armKnown(p) {
			if err := nonNegative("hall_bar", label+".arm_width", p.ArmWidth, kLength); err != nil {
				errs = append(errs, err)
			}
		}
		if p.Side != "top" && p.Side != "bottom" {
			errs = append(errs, domain("hall_bar", label+".side", "expected \"top\" or \"bottom\", got %q", p.Side))
		}
		if len(h.Sections) > 0 && !secs[p.Section] {
			errs = append(errs, domain("hall_bar", label+".section", "probe %q: section %q is not one of the bar's sections %v", p.Name, p.Section, h.sectionNames()))
		}
	}
	return errors.Join(errs...)
}

func (h HallBar) sectionNames() []string {
	names := make([]string, len(h.Sections))
	for i, s := range h.Sections {
		names[i] = s.Name
	}
	return names
}

// section returns the index of the probe's section (0 on a straight bar).
func (h HallBar) section(p Probe) int {
	for i, s := range h.Sections {
		if s.Name == p.Section {
			return i
		}
	}
	return 0
}

// widthAt is the channel width of section i (the bar's width on a straight bar).
func (h HallBar) widthAt(i int) quantity.Quantity {
	if len(h.Sections) == 0 {
		return h.Width
	}
	return h.Sections[i].Width
}

// armKnown reports whether the arm width was given (the zero Quantity means unknown).
func armKnown(p Probe) bool {
	return p.ArmWidth.Dim() != quantity.Dimensionless || p.ArmWidth.Value() != 0 || p.ArmWidth.HasUncertainty()
}

// Squares returns the number of squares between probes a and b along the current's path,
// a pure number with propagated uncertainty; the sheet resistance is then R_xx/squares
// ([SheetResistance]). On a straight bar it is |x_a − x_b|/W, the centre-to-centre spacing
// over the channel width. On a bar with sections it is the sum over the sections the path
// between the probes passes of the length in each over that section's width:
// (L_i − x_a)/W_i + Σ L_k/W_k + x_b/W_j for a on section i before b on section j, counted
// along the centre lines (common practice). At a bend the current crowds to the inner
// corner, so the corner region (W_i × W_j, counted here as W_j/(2W_i) + W_i/(2W_j), 1 for
// equal widths) conducts better than that: a square corner of equal widths is worth about
// 0.56 squares (conformal mapping; from memory). [HallBar.Warnings] says so for pairs
// across a bend; a pair on one section avoids the question.
func (h HallBar) Squares(a, b string) (quantity.Quantity, error) {
	if err := h.Validate(); err != nil {
		return quantity.Quantity{}, err
	}
	pa, err := h.probe(a)
	if err != nil {
		return quantity.Quantity{}, err
	}
	pb, err := h.probe(b)
	if err != nil {
		return quantity.Quantity{}, err
	}
	ia, ib := h.section(pa), h.section(pb)
	if ia > ib {
		pa, pb, ia, ib = pb, pa, ib, ia
	}
	if ia == ib {
		d, err := quantity.Sub(pa.Position, pb.Position)
		if err != nil {
			return quantity.Quantity{}, err
		}
		if d.Value() == 0 {
			return quantity.Quantity{}, domain("squares", a+", "+b, "the probes sit at the same position along the bar (a Hall pair, not a longitudinal pair)")
		}
		return quantity.Div(abs(d), h.widthAt(ia)), nil
	}
	// From a to the end of its section, the sections between, then into b's.
	rest, err := quantity.Sub(h.Sections[ia].Length, pa.Position)
	if err != nil {
		return quantity.Quantity{}, err
	}
	if rest.Value() < 0 || pb.Position.Value() < 0 {
		return quantity.Quantity{}, domain("squares", a+", "+b, "a probe lies outside its section (position beyond the section's length, or negative)")
	}
	sq := quantity.Div(rest, h.widthAt(ia))
	for k := ia + 1; k < ib; k++ {
		if sq, err = quantity.Add(sq, quantity.Div(h.Sections[k].Length, h.widthAt(k))); err != nil {
			return quantity.Quantity{}, err
		}
	}
	return quantity.Add(sq, quantity.Div(pb.Position, h.widthAt(ib)))
}

// HallOrientation returns o = ±1 such that a Hall resistance measured as
// (V_plus − V_minus)/I, with the current I entering at contact source and leaving at
// drain, equals o·ρ_xy for B along +z (ρ_xy = E_y/j_x, [src:IHN2010]): with x along the
// current's path and y towards the top side, V_plus − V_minus = −E_y (y_plus − y_minus), so
// o = −1 when the plus probe is on the top side and the current flows from the source end,
// and each reversal flips it. plus and minus must face each other on one section (top and
// bottom); the current direction is known when the current contacts are the bar's Source
// and Drain, or two probes on the path. It also returns a description for messages.
func (h HallBar) HallOrientation(source, drain, plus, minus string) (int, string, error) {
	const fn = "hall_orientation"
	if err := h.Validate(); err != nil {
		return 0, "", err
	}
	pp, err := h.probe(plus)
	if err != nil {
		return 0, "", err
	}
	pm, err := h.probe(minus)
	if err != nil {
		return 0, "", err
	}
	if pp.Side == pm.Side || h.section(pp) != h.section(pm) {
		return 0, "", domain(fn, plus+", "+minus, "probes %s (%s) and %s (%s) do not face each other across the bar: not a Hall pair", plus, pp.Side, minus, pm.Side)
	}
	dir := 0
	switch {
	case source != "" && (source == h.Source || drain == h.Drain && h.Drain != ""):
		dir = 1
	case source != "" && (source == h.Drain || drain == h.Source && h.Source != ""):
		dir = -1
	default:
		ps, err1 := h.probe(source)
		pd, err2 := h.probe(drain)
		if err1 != nil || err2 != nil {
			return 0, "", domain(fn, source+", "+drain, "cannot tell which way the current %s → %s flows: the mask names source %q and drain %q", source, drain, h.Source, h.Drain)
		}
		xs, xd := h.pathCoord(ps), h.pathCoord(pd)
		switch {
		case xs < xd:
			dir = 1
		case xs > xd:
			dir = -1
		default:
			return 0, "", domain(fn, source+", "+drain, "current contacts %s and %s sit at the same place along the bar", source, drain)
		}
	}
	o := dir
	if pp.Side == "top" {
		o = -o
	}
	what := "from the source end"
	if dir < 0 {
		what = "from the drain end"
	}
	desc := fmt.Sprintf("current %s → %s %s, R_xy = V%s − V%s with %s on the %s side", source, drain, what, plus, minus, plus, pp.Side)
	return o, desc, nil
}

// pathCoord is a probe's distance from the source end along the centre lines, m.
func (h HallBar) pathCoord(p Probe) float64 {
	x := 0.0
	for k := 0; k < h.section(p); k++ {
		x += h.Sections[k].Length.Value()
	}
	return x + p.Position.Value()
}

// HallPairs returns the probes facing each other across the bar: a top and a bottom probe
// whose centres are closer than the mean of their arm widths (or coincide, where arm widths
// are unknown). Each pair is [top, bottom]; pairs are ordered by position. Each probe is
// paired with its nearest facing probe only. An invalid geometry gives no pairs.
func (h HallBar) HallPairs() [][2]string {
	if h.Validate() != nil {
		return nil
	}
	type cand struct {
		top, bottom Probe
		dist        float64
	}
	var cs []cand
	for _, t := range h.Probes {
		if t.Side != "top" {
			continue
		}
		for _, b := range h.Probes {
			if b.Side != "bottom" {
				continue
			}
			if h.section(t) != h.section(b) {
				continue
			}
			dist := math.Abs(t.Position.Value() - b.Position.Value())
			if dist <= facingTolerance(t, b, h.widthAt(h.section(t)).Value()) {
				cs = append(cs, cand{t, b, dist})
			}
		}
	}
	sort.SliceStable(cs, func(i, j int) bool { return cs[i].dist < cs[j].dist })
	used := map[string]bool{}
	var pairs []cand
	for _, c := range cs {
		if used[c.top.Name] || used[c.bottom.Name] {
			continue
		}
		used[c.top.Name], used[c.bottom.Name] = true, true
		pairs = append(pairs, c)
	}
	sort.SliceStable(pairs, func(i, j int) bool { return h.pathCoord(pairs[i].top) < h.pathCoord(pairs[j].top) })
	out := make([][2]string, len(pairs))
	for i, c := range pairs {
		out[i] = [2]string{c.top.Name, c.bottom.Name}
	}
	return out
}

// facingTolerance is the largest centre offset at which two arms still face each other.
func facingTolerance(a, b Probe, width float64) float64 {
	if armKnown(a) && armKnown(b) {
		return (a.ArmWidth.Value() + b.ArmWidth.Value()) / 2
	}
	return alignedFraction * width
}

// Warnings lists geometry problems a reviewer should see (common practice, for warnings
// only): neighbouring probes on one side closer than 3 W (Chwang, Smith & Crowell 1974;
// Perloff 1977), an arm wider than a fifth of the spacing to its neighbour, an arm wider
// than W/5, and Hall pairs whose arms are offset (R_xy then picks up R_xx; antisymmetrise
// over ±B). An invalid geometry gives a single warning that carries the error.
func (h HallBar) Warnings() []string {
	if err := h.Validate(); err != nil {
		return []string{"Hall-bar geometry cannot be checked: " + err.Error()}
	}
	var out []string
	for _, p := range h.Probes {
		W := h.widthAt(h.section(p)).Value()
		if armKnown(p) && p.ArmWidth.Value() > armOverWidth*W {
			out = append(out, fmt.Sprintf("probe %s: arm width %s is more than W/5 (W = %s); wide arms short the Hall voltage and blur the probe position",
				p.Name, um(p.ArmWidth.Value()), um(W)))
		}
	}
	nsec := max(len(h.Sections), 1)
	for sec := 0; sec < nsec; sec++ {
		W := h.widthAt(sec).Value()
		for _, side := range []string{"top", "bottom"} {
			var ps []Probe
			for _, p := range h.Probes {
				if p.Side == side && h.section(p) == sec {
					ps = append(ps, p)
				}
			}
			sort.SliceStable(ps, func(i, j int) bool { return ps[i].Position.Value() < ps[j].Position.Value() })
			for i := 1; i < len(ps); i++ {
				a, b := ps[i-1], ps[i]
				L := b.Position.Value() - a.Position.Value()
				if L == 0 {
					out = append(out, fmt.Sprintf("probes %s and %s (%s) are at the same position", a.Name, b.Name, side))
					continue
				}
				if L/W < minAspect {
					out = append(out, fmt.Sprintf("probes %s-%s (%s): spacing/width = %.3g, below the customary 3; the finite arm widths then weigh more on L/W and so on rho_xx = R_xx W/L",
						a.Name, b.Name, side, L/W))
				}
				for _, p := range []Probe{a, b} {
					if armKnown(p) && p.ArmWidth.Value() > armOverSpacing*L {
						out = append(out, fmt.Sprintf("probes %s-%s (%s): arm of %s is %s, more than spacing/5 (%s); L is uncertain by about the arm width",
							a.Name, b.Name, side, p.Name, um(p.ArmWidth.Value()), um(L/5)))
					}
				}
			}
		}
	}
	for _, pr := range h.HallPairs() {
		t, _ := h.probe(pr[0])
		b, _ := h.probe(pr[1])
		if d := math.Abs(t.Position.Value() - b.Position.Value()); d > alignedFraction*h.widthAt(h.section(t)).Value() {
			out = append(out, fmt.Sprintf("Hall pair %s/%s: centres offset by %s along the bar; R_xy picks up part of R_xx (antisymmetrise over ±B)",
				t.Name, b.Name, um(d)))
		}
	}
	for i := 1; i < len(h.Sections); i++ {
		a, b := h.Sections[i-1], h.Sections[i]
		wa, wb := a.Width.Value(), b.Width.Value()
		out = append(out, fmt.Sprintf("bend between sections %s and %s: squares across it count the corner region (%s × %s) as %.3g squares along the centre lines, but the current crowds to the inner corner (a square corner of equal widths is worth about 0.56 squares, from memory): prefer a longitudinal pair on one section",
			a.Name, b.Name, um(wa), um(wb), wb/(2*wa)+wa/(2*wb)))
	}
	return out
}

// um formats a length in metres as micrometres for warnings.
func um(m float64) string { return fmt.Sprintf("%.4g um", m*1e6) }
