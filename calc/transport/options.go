package transport

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"cleave/calc/quantity"
)

// Option adjusts an analysis. Options that do not apply to an analysis are ignored.
type Option func(*options)

type options struct {
	field    string  // field column
	ycol     string  // response column (SdHDensity)
	sigma    string  // column of standard uncertainties of y (weighted fits)
	gv       float64 // valley degeneracy
	bgDeg    int     // background polynomial degree (SdH)
	pad      int     // zero-padding factor (SdH)
	points   int     // points near zero (ZeroField)
	maxGrid  int     // largest 1/B grid (SdH)
	maxYFrac float64 // out-of-phase tolerance

	ext extOptions // options of the plateau, LK, Dingle and gate analyses (sanity.go)

	orient      float64 // R_xy as measured = orient · ρ_xy (±1); 0 means +1, the default convention
	orientBasis string  // what orient rests on, for messages
	carrier     string  // the carrier type recorded for the sample ("electrons", "holes"), or ""
	carrierFrom string  // where it is recorded, for messages
}

// WithOrientation says how the Hall column relates to ρ_xy = E_y/j_x (B along +z, current
// along +x): R_xy as measured = o·ρ_xy with o = +1 or −1, from the wiring and the magnet's
// polarity. basis says what o rests on ("current 1 → 5, R_xy = V3 − V7, …") for messages.
// Without it HallDensity takes o = +1: a negative slope means electrons.
func WithOrientation(o int, basis string) Option {
	return func(opt *options) {
		opt.orient, opt.orientBasis = 1, basis
		if o < 0 {
			opt.orient = -1
		}
	}
}

// WithCarrier gives the carrier type recorded for the sample ("electrons" or "holes", from
// the wafer's record named by from): HallDensity reports it as the carriers and warns
// (WarnCarrierSign) when the slope's sign, read with the orientation, says the other type.
func WithCarrier(carrier, from string) Option {
	return func(o *options) { o.carrier, o.carrierFrom = carrier, from }
}

func newOptions(opts []Option) options {
	o := options{field: "B", ycol: "Rxx", gv: 1, bgDeg: 3, pad: 8, points: 20, maxGrid: 1 << 15, maxYFrac: 0.1}
	for _, f := range opts {
		f(&o)
	}
	return o
}

// WithField names the magnetic-field column (default "B").
func WithField(name string) Option { return func(o *options) { o.field = name } }

// WithColumns names the field and response columns (SdHDensity; defaults "B", "Rxx").
func WithColumns(field, y string) Option {
	return func(o *options) { o.field, o.ycol = field, y }
}

// WithSigma names a column that holds the standard uncertainty of each y value;
// the fit is then weighted by 1/σ² (HallDensity, ZeroField).
func WithSigma(col string) Option { return func(o *options) { o.sigma = col } }

// WithValleyDegeneracy sets g_v for SdHDensity (default 1; 2 for Si(100), 2 for graphene
// together with g_s = 2).
func WithValleyDegeneracy(gv float64) Option { return func(o *options) { o.gv = gv } }

// WithBackground sets the degree (0–3) of the smooth background polynomial in B
// that SdHDensity subtracts (default 3).
func WithBackground(deg int) Option { return func(o *options) { o.bgDeg = deg } }

// WithPadding sets the zero-padding factor of the SdH Fourier transform (default 8, minimum 8).
func WithPadding(factor int) Option { return func(o *options) { o.pad = factor } }

// WithPoints sets how many points nearest B = 0 ZeroField uses (default 20).
func WithPoints(k int) Option { return func(o *options) { o.points = k } }

// Warning codes. A Warning's Code is stable and meant for programs (the review
// report); its Msg is for people.
const (
	WarnCurvature    = "curvature"         // R_xy(B) not linear in the fit range: parallel conduction?
	WarnEvenPart     = "even-part"         // R_xy has a part even in B: R_xx pick-up, antisymmetrize
	WarnOffset       = "zero-field-offset" // R_xy(0) far from 0: probe misalignment
	WarnOutOfPhase   = "out-of-phase"      // large lock-in Y component
	WarnFewPoints    = "few-points"        // a fit with few points or few oscillations
	WarnExtrapolated = "extrapolated"      // value at B = 0 extrapolated from one side
	WarnDisagree     = "densities-disagree"
	WarnWeakPeak     = "weak-peak"    // SdH peak barely above the spectrum floor
	WarnGap          = "data-gap"     // SdH window has a hole in the data wider than half a period
	WarnHarmonic     = "harmonic"     // SdH spectrum has a strong peak at twice or half f_B: spin splitting?
	WarnCarrierSign  = "carrier-sign" // the Hall slope's sign says the other carrier type than the sample's record
)

// Warning is a sanity check that failed; the result is still returned.
type Warning struct {
	Code string
	Msg  string
}

func (w Warning) String() string { return w.Code + ": " + w.Msg }

// column fetches a column and checks its dimension when the header gave a unit.
// Columns without a unit and with an unknown name are taken to be in SI units
// of the expected dimension.
func column(d *Dataset, name string, wantDim quantity.Dim) (*Column, error) {
	c, err := d.Col(name)
	if err != nil {
		return nil, err
	}
	at := func(format string, a ...any) error {
		return &ParseError{File: d.Name, Line: max(d.HeaderLine, 1), Col: max(c.HeaderCol, 1), Msg: fmt.Sprintf(format, a...), Err: ErrUnitDim}
	}
	if c.IsText() {
		return nil, at("column %q holds text (%s), not %s", c.Name, textSample(c.Text), dimName(wantDim))
	}
	if c.Dim != wantDim && (c.Unit != "" || c.Dim != (quantity.Dim{})) {
		what := fmt.Sprintf("column %q is %s", c.Name, dimName(c.Dim))
		if c.Unit != "" {
			what = fmt.Sprintf("column %q is in %s, %s", c.Name, c.Unit, dimKind(c.Dim))
		}
		hint := ""
		if c.Dim == DimVoltage && wantDim == DimResistance {
			hint = " (volts are not ohms: a layout's `derive:` turns it into R = V/I)"
		}
		return nil, at("%s; expected %s%s", what, dimName(wantDim), hint)
	}
	return c, nil
}

// outOfPhase checks a lock-in Y column that belongs to ycol, if one exists:
// ycol+"_Y", ycol+"Y", ycol with a trailing "_X"/"X" replaced by "_Y"/"Y", or a lone "Y".
// It warns when the RMS of Y exceeds frac times the RMS of X over the same
// points (common practice: a large out-of-phase signal means capacitive
// coupling or resistive contacts).
func outOfPhase(d *Dataset, xc, yc *Column, lo, hi, frac float64) *Warning {
	cands := []string{yc.Name + "_Y", yc.Name + "Y"}
	if yc.Role != "" {
		cands = append(cands, yc.Role+"_Y")
	}
	if n := yc.Name; len(n) > 2 && strings.EqualFold(n[len(n)-2:], "_X") {
		cands = append(cands, n[:len(n)-1]+"Y")
	}
	var ycol *Column
	for _, n := range cands {
		if c, err := d.Col(n); err == nil && c != yc {
			ycol = c
			break
		}
	}
	if ycol == nil {
		if c, err := d.Col("Y"); err == nil && c != yc {
			ycol = c
		}
	}
	if ycol == nil {
		return nil
	}
	var sx, sy float64
	var n int
	for i := range xc.Values {
		b := math.Abs(xc.Values[i])
		if b < lo || b > hi || math.IsNaN(yc.Values[i]) || math.IsNaN(ycol.Values[i]) {
			continue
		}
		sx += yc.Values[i] * yc.Values[i]
		sy += ycol.Values[i] * ycol.Values[i]
		n++
	}
	if n == 0 || sy <= frac*frac*sx {
		return nil
	}
	return &Warning{WarnOutOfPhase, fmt.Sprintf("out-of-phase column %q has RMS %.3g of the in-phase %q (tolerance %.2g; common practice): capacitive coupling or resistive contacts?",
		ycol.Name, math.Sqrt(sy/sx), yc.Name, frac)}
}

// textSample shows the first distinct labels of a text column.
func textSample(t []string) string {
	var seen, out []string
	for _, s := range t {
		if s != "" && !slices.Contains(seen, s) {
			seen = append(seen, s)
			out = append(out, strconv.Quote(s))
			if len(out) == 3 {
				break
			}
		}
	}
	if len(out) == 0 {
		return "empty labels"
	}
	return strings.Join(out, ", ")
}
