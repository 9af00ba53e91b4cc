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
	Position quantity.Quantity // centre of the arm along the bar, from contact 1 or the bar's start
	ArmWidth quantity.Quantity // width of the arm where it meets the channel; the zero Quantity means unknown
	Side     string            // "top" or "bottom"
}

// HallBar is the drawn (or as-built) geometry of a Hall bar: channel width and probes.
type HallBar struct {
	Width  quantity.Quantity
	Probes []Probe
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

// Validate checks the dimensions and values of the geometry: a positive width, positions
// and arm widths that are lengths, non-negative arm widths, unique names and sides "top"
// or "bottom". It returns every problem joined.
func (h HallBar) Validate() error {
	var errs []error
	if err := positive("hall_bar", "width", h.Width, kLength); err != nil {
		errs = append(errs, err)
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
	}
	return errors.Join(errs...)
}

// armKnown reports whether the arm width was given (the zero Quantity means unknown).
func armKnown(p Probe) bool {
	return p.ArmWidth.Dim() != quantity.Dimensionless || p.ArmWidth.Value() != 0 || p.ArmWidth.HasUncertainty()
}

// Squares returns the number of squares between probes a and b, |x_a - x_b|/W, the
// centre-to-centre spacing over the channel width: a pure number with propagated
// uncertainty. Sheet resistivity is then R_xx/squares ([SheetResistance]).
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
	d, err := quantity.Sub(pa.Position, pb.Position)
	if err != nil {
		return quantity.Quantity{}, err
	}
	if d.Value() == 0 {
		return quantity.Quantity{}, domain("squares", a+", "+b, "the probes sit at the same position along the bar (a Hall pair, not a longitudinal pair)")
	}
	return quantity.Div(abs(d), h.Width), nil
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
			dist := math.Abs(t.Position.Value() - b.Position.Value())
			if dist <= facingTolerance(t, b, h.Width.Value()) {
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
	sort.SliceStable(pairs, func(i, j int) bool { return pairs[i].top.Position.Value() < pairs[j].top.Position.Value() })
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
	W := h.Width.Value()
	for _, p := range h.Probes {
		if armKnown(p) && p.ArmWidth.Value() > armOverWidth*W {
			out = append(out, fmt.Sprintf("probe %s: arm width %s is more than W/5 (W = %s); wide arms short the Hall voltage and blur the probe position",
				p.Name, um(p.ArmWidth.Value()), um(W)))
		}
	}
	for _, side := range []string{"top", "bottom"} {
		var ps []Probe
		for _, p := range h.Probes {
			if p.Side == side {
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
	for _, pr := range h.HallPairs() {
		t, _ := h.probe(pr[0])
		b, _ := h.probe(pr[1])
		if d := math.Abs(t.Position.Value() - b.Position.Value()); d > alignedFraction*W {
			out = append(out, fmt.Sprintf("Hall pair %s/%s: centres offset by %s along the bar; R_xy picks up part of R_xx (antisymmetrise over ±B)",
				t.Name, b.Name, um(d)))
		}
	}
	return out
}

// um formats a length in metres as micrometres for warnings.
func um(m float64) string { return fmt.Sprintf("%.4g um", m*1e6) }
