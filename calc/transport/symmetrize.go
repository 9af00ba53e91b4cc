package transport

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/interp"
)

// SymResult is the outcome of Symmetrize or Antisymmetrize: one column put on
// a common grid of |B| from the +B and −B branches of a data set.
type SymResult struct {
	B      []float64 // the common |B| grid, T, increasing
	Values []float64 // (R(+B) ± R(−B))/2 on the grid, Ohm
	Other  []float64 // the part that was removed, (R(+B) ∓ R(−B))/2, Ohm
	Kind   string    // "symmetric" or "antisymmetric"

	XCol, YCol   string
	Plus, Minus  int // distinct field values on each branch after averaging repeats
	BMin, BMax   float64
	DataHash     string
	RemovedRatio float64 // RMS(Other)/RMS(Values) over the grid
	// FieldOffset is the field offset δ (T; measured B = true B + δ) that best
	// explains Other as −δ dValues/d|B|, and OffsetMatch the fraction of
	// Other's variance it explains (0–1). See fieldOffset.
	FieldOffset, OffsetMatch float64
	Warnings                 []Warning
}

// WarnOddPart is raised by Symmetrize when R_xx differs between +B and −B
// by more than 5 % (RMS; common practice): a density gradient makes the two
// edges of a Hall bar differ and they swap under field reversal [src:PONOMARENKO2004].
const WarnOddPart = "odd-part"

// WarnNegative is raised when a symmetrised R_xx is negative somewhere
// (common practice): a wiring or offset problem.
const WarnNegative = "negative-rxx"

// Symmetrize returns R^sym(|B|) = [R(+B) + R(−B)]/2 of column ycol against
// xcol (reciprocity, [src:BUTTIKER1986]), the usual treatment of R_xx.
//
// Method: the points with B > 0 and those with B < 0 are taken as two
// branches (a point at B = 0 belongs to both); on each branch points with the
// same |B| (up and down sweeps, repeats) are averaged; both branches are
// interpolated linearly (gonum/interp) onto a common grid that spans the
// overlap of their |B| ranges, with as many points as the sparser branch has
// inside the overlap. Data without both signs of B is an error wrapping
// ErrNoField.
//
// Warnings: a negative symmetrised value; an antisymmetric part above 5 % of
// the symmetric one (RMS; common practice).
func Symmetrize(d *Dataset, xcol, ycol string) (*SymResult, error) {
	return symmetrize(d, xcol, ycol, +1)
}

// Antisymmetrize returns R^anti(|B|) = [R(+B) − R(−B)]/2 of column ycol
// against xcol ([src:BUTTIKER1986]), the usual treatment of R_xy: it removes the
// R_xx pick-up of misaligned Hall probes. The method is that of Symmetrize.
// It warns (WarnEvenPart) when the removed even part exceeds 1 % of the odd
// part (RMS; the bound on |R_xy(+B) + R_xy(−B)| is common practice).
func Antisymmetrize(d *Dataset, xcol, ycol string) (*SymResult, error) {
	return symmetrize(d, xcol, ycol, -1)
}

// branch is one field polarity: |B| strictly increasing, repeats averaged.
type branch struct{ b, y []float64 }

func makeBranch(B, R []float64, sign float64) branch {
	var pts []fieldPoint
	for i := range B {
		if math.IsNaN(B[i]) || math.IsNaN(R[i]) || math.IsInf(B[i], 0) || math.IsInf(R[i], 0) {
			continue
		}
		if B[i] == 0 || math.Signbit(B[i]) == (sign < 0) {
			pts = append(pts, fieldPoint{math.Abs(B[i]), R[i]})
		}
	}
	var br branch
	br.b, br.y = sortedMeans(pts)
	return br
}

func (br branch) countIn(lo, hi float64) int {
	n := 0
	for _, b := range br.b {
		if b >= lo && b <= hi {
			n++
		}
	}
	return n
}

func symmetrize(d *Dataset, xcol, ycol string, sign float64) (*SymResult, error) {
	kind, what := "symmetric", "symmetrize"
	if sign < 0 {
		kind, what = "antisymmetric", "antisymmetrize"
	}
	xc, err := column(d, xcol, DimField)
	if err != nil {
		return nil, err
	}
	yc, err := column(d, ycol, DimResistance)
	if err != nil {
		return nil, err
	}
	plus := makeBranch(xc.Values, yc.Values, +1)
	minus := makeBranch(xc.Values, yc.Values, -1)
	if countNonZero(plus.b) == 0 || countNonZero(minus.b) == 0 {
		return nil, fmt.Errorf("%s: %s %s: the data need both B > 0 and B < 0 (got %d and %d field values): %w",
			d.Name, what, yc.Name, countNonZero(plus.b), countNonZero(minus.b), ErrNoField)
	}
	lo := math.Max(plus.b[0], minus.b[0])
	hi := math.Min(plus.b[len(plus.b)-1], minus.b[len(minus.b)-1])
	m := min(plus.countIn(lo, hi), minus.countIn(lo, hi))
	if len(plus.b) < 2 || len(minus.b) < 2 || !(hi > lo) || m < 2 {
		return nil, fmt.Errorf("%s: %s %s: the +B and −B branches overlap in fewer than 2 points (|B| %g–%g T): %w",
			d.Name, what, yc.Name, lo, hi, ErrTooFewPoints)
	}
	var fp, fm interp.PiecewiseLinear
	if err := fp.Fit(plus.b, plus.y); err != nil {
		return nil, fmt.Errorf("%s: %s: %v: %w", d.Name, what, err, ErrBadArgument)
	}
	if err := fm.Fit(minus.b, minus.y); err != nil {
		return nil, fmt.Errorf("%s: %s: %v: %w", d.Name, what, err, ErrBadArgument)
	}
	res := &SymResult{Kind: kind, XCol: xc.Name, YCol: yc.Name, Plus: len(plus.b), Minus: len(minus.b),
		BMin: lo, BMax: hi, DataHash: d.Hash,
		B: make([]float64, m), Values: make([]float64, m), Other: make([]float64, m)}
	var sv, so float64
	neg := 0
	for i := range res.B {
		b := lo + (hi-lo)*float64(i)/float64(m-1)
		p, q := fp.Predict(b), fm.Predict(b)
		res.B[i] = b
		res.Values[i] = (p + sign*q) / 2
		res.Other[i] = (p - sign*q) / 2
		sv += res.Values[i] * res.Values[i]
		so += res.Other[i] * res.Other[i]
		if sign > 0 && res.Values[i] < 0 {
			neg++
		}
	}
	if sv > 0 {
		res.RemovedRatio = math.Sqrt(so / sv)
	} else if so > 0 {
		res.RemovedRatio = math.Inf(1)
	}
	res.FieldOffset, res.OffsetMatch = fieldOffset(res.B, res.Values, res.Other)
	hint := "density gradient? record which contact pair was used"
	if sign < 0 {
		hint = "R_xx pick-up from misaligned probes"
	}
	if res.OffsetMatch > 0.5 {
		off := fmt.Sprintf("the +B and −B traces line up if the field column is shifted by %.3g mT (%.0f %% of the removed part explained); check the magnet's remanent field or the field zero before symmetrising", -1e3*res.FieldOffset, 100*res.OffsetMatch)
		if sign > 0 {
			hint = "it matches a field offset: " + off
		} else {
			// Near a linear Hall line a constant pick-up and a field offset
			// look alike; R_xx's structure tells them apart only in R_xx.
			hint += ", or a field offset: " + off
		}
	}
	if sign > 0 {
		if neg > 0 {
			res.Warnings = append(res.Warnings, Warning{WarnNegative, fmt.Sprintf(
				"symmetrised %s is negative at %d of %d grid points: check the wiring and offsets", yc.Name, neg, m)})
		}
		if res.RemovedRatio > 0.05 {
			res.Warnings = append(res.Warnings, Warning{WarnOddPart, fmt.Sprintf(
				"%s differs between +B and −B: the odd part is %.1f %% of the even part (RMS; tolerance 5 %%, common practice): %s",
				yc.Name, 100*res.RemovedRatio, hint)})
		}
	} else if res.RemovedRatio > 0.01 {
		res.Warnings = append(res.Warnings, Warning{WarnEvenPart, fmt.Sprintf(
			"%s has an even part of %.1f %% of the odd part (RMS; bound 1 %%, common practice): %s",
			yc.Name, 100*res.RemovedRatio, hint)})
	}
	return res, nil
}

func countNonZero(b []float64) int {
	n := 0
	for _, v := range b {
		if v != 0 {
			n++
		}
	}
	return n
}

// fieldOffset estimates a field offset δ from a (anti)symmetrisation. If the
// field column reads B + δ, a trace R(B) that is even (odd) in the true field
// gives, to first order in δ, R(+b) = R(b) − δR'(b) and R(−b) = ±[R(b) + δR'(b)],
// so the removed part is −δ R'(b) for both kinds. δ is the least-squares
// coefficient of the removed part on −dValues/db (central differences), and
// match the squared correlation of the two.
func fieldOffset(b, v, other []float64) (delta, match float64) {
	var so, sd, sod float64
	for i := 1; i+1 < len(b); i++ {
		dv := (v[i+1] - v[i-1]) / (b[i+1] - b[i-1])
		so += other[i] * other[i]
		sd += dv * dv
		sod += other[i] * dv
	}
	if !(so > 0) || !(sd > 0) {
		return 0, 0
	}
	return -sod / sd, sod * sod / (so * sd)
}

// fieldPoint is one reading: a field and the value read there.
type fieldPoint struct{ b, y float64 }

// sortedMeans sorts readings by field and averages the values read at the same field.
func sortedMeans(pts []fieldPoint) (bs, ys []float64) {
	slices.SortFunc(pts, func(a, b fieldPoint) int { return cmp.Compare(a.b, b.b) })
	for i := 0; i < len(pts); {
		j, sum := i, 0.0
		for j < len(pts) && pts[j].b == pts[i].b {
			sum += pts[j].y
			j++
		}
		bs = append(bs, pts[i].b)
		ys = append(ys, sum/float64(j-i))
		i = j
	}
	return bs, ys
}
