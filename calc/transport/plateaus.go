package transport

import (
	"fmt"
	"math"
	"slices"
)

// PlateauOptions configures Plateaus. Zero fields take the defaults given.
type PlateauOptions struct {
	XCol, YCol string  // field and Hall columns; "B" and "Rxy"
	RxxCol     string  // longitudinal column checked on each plateau; "Rxx" (skipped if absent)
	MinWidth   float64 // shortest plateau, T; 0.1
	Window     float64 // half-width of the local slope fit, T; MinWidth/4
	Flatness   float64 // largest |dR_xy/dB|·|B|/|R_xy| on a plateau; 0.05 (the classical Hall line has 1)
	RxxTol     float64 // R_xx counts as "near 0" below RxxTol × R_xx at the smallest |B|; 0.02
	Density    float64 // sheet density, m^-2, for the filling-factor check; 0 skips it
	Fractions  bool    // also try ν = p/q with q = 3 or 5
}

// Plateau is one quantum Hall plateau found by Plateaus.
type Plateau struct {
	Sign        int      // sign of B on this plateau (+1 or −1)
	BMin, BMax  float64  // |B| range, T
	Points      int      // points on the plateau
	Rxy         Estimate // mean R_xy ± standard error of the mean, Ohm
	NuMeasured  float64  // R_K/|R_xy|
	P, Q        int      // the assigned filling factor ν = P/Q
	Deviation   float64  // (|R_xy| − R_K/ν)/(R_K/ν)
	RxxMean     float64  // mean R_xx over the plateau (NaN without an R_xx column)
	RxxMin      float64  // smallest R_xx over the plateau (NaN without one)
	RxxNearZero bool
	NuDensity   [2]float64 // n h/(e|B|) at BMax and BMin (zero without a density)
	Warnings    []Warning
}

// Nu returns the assigned filling factor P/Q.
func (p Plateau) Nu() float64 { return float64(p.P) / float64(p.Q) }

// PlateauResult is the outcome of Plateaus.
type PlateauResult struct {
	Plateaus   []Plateau // ordered by sign, then by increasing |B|
	XCol, YCol string
	RxxRef     float64 // R_xx at the smallest |B| (the "near 0" reference), Ohm
	DataHash   string
	Warnings   []Warning // all plateau warnings, prefixed with the field range
}

// Plateaus finds quantum Hall plateaus in R_xy ([src:KDP1980]; von
// Klitzing, Dorda & Pepper 1980): stretches of at least MinWidth where the
// local slope dR_xy/dB (a least-squares line over ±Window around each point)
// is small compared with the classical Hall slope R_xy/B:
// |dR_xy/dB|·|B|/|R_xy| < Flatness. +B and −B are treated separately.
//
// Each plateau gets its mean R_xy ± the standard error of the mean, ν_meas =
// R_K/|R_xy| with R_K = h/e² (exact, CODATA 2018), the nearest integer ν (or
// simple fraction with Fractions), and the relative deviation from R_K/ν.
//
// Warnings (common practice): a deviation above 1e-3; R_xx over the plateau not
// near 0 (parallel conduction or heating); a ν outside the range of
// n h/(e|B|) over the plateau widened by 1/2 (when Density is given). Too few
// points is an error wrapping ErrTooFewPoints; finding no plateau is not an
// error (the result is empty).
func Plateaus(d *Dataset, opt PlateauOptions) (*PlateauResult, error) {
	if opt.XCol == "" {
		opt.XCol = "B"
	}
	if opt.YCol == "" {
		opt.YCol = "Rxy"
	}
	if opt.RxxCol == "" {
		opt.RxxCol = "Rxx"
	}
	if opt.MinWidth == 0 {
		opt.MinWidth = 0.1
	}
	if opt.Window == 0 {
		opt.Window = opt.MinWidth / 4
	}
	if opt.Flatness == 0 {
		opt.Flatness = 0.05
	}
	if opt.RxxTol == 0 {
		opt.RxxTol = 0.02
	}
	if !(opt.MinWidth > 0) || !(opt.Window > 0) || !(opt.Flatness > 0) || !(opt.RxxTol > 0) || !(opt.Density >= 0) {
		return nil, fmt.Errorf("%s: plateaus: MinWidth, Window, Flatness and RxxTol must be > 0 and Density ≥ 0: %w", d.Name, ErrBadArgument)
	}
	xc, err := column(d, opt.XCol, DimField)
	if err != nil {
		return nil, err
	}
	yc, err := column(d, opt.YCol, DimResistance)
	if err != nil {
		return nil, err
	}
	var rxx []float64
	if rc, err := column(d, opt.RxxCol, DimResistance); err == nil {
		rxx = rc.Values
	}
	res := &PlateauResult{XCol: xc.Name, YCol: yc.Name, DataHash: d.Hash, RxxRef: math.NaN()}
	type pt struct{ b, r, xx float64 }
	var sides [2][]pt
	bmin := math.Inf(1)
	used := 0
	for i, b := range xc.Values {
		r := yc.Values[i]
		if math.IsNaN(b) || math.IsNaN(r) {
			continue
		}
		xx := math.NaN()
		if rxx != nil {
			xx = rxx[i]
			if ab := math.Abs(b); ab < bmin && !math.IsNaN(xx) {
				bmin, res.RxxRef = ab, xx
			}
		}
		if b == 0 {
			continue
		}
		used++
		k := 0
		if b < 0 {
			k = 1
		}
		sides[k] = append(sides[k], pt{math.Abs(b), r, xx})
	}
	if used < 10 {
		return nil, fmt.Errorf("%s: plateaus in %s: %d points at B ≠ 0; need at least 10: %w", d.Name, yc.Name, used, ErrTooFewPoints)
	}
	for k, pts := range sides {
		sign := 1 - 2*k
		slices.SortStableFunc(pts, func(a, b pt) int {
			switch {
			case a.b < b.b:
				return -1
			case a.b > b.b:
				return 1
			}
			return 0
		})
		n := len(pts)
		flat := make([]bool, n)
		// Local slope by a sliding least-squares line (two pointers over sums).
		var sb, sr, sbb, sbr float64
		lo, hi := 0, 0
		for i := range pts {
			for hi < n && pts[hi].b <= pts[i].b+opt.Window {
				p := pts[hi]
				sb, sr, sbb, sbr = sb+p.b, sr+p.r, sbb+p.b*p.b, sbr+p.b*p.r
				hi++
			}
			for pts[lo].b < pts[i].b-opt.Window {
				p := pts[lo]
				sb, sr, sbb, sbr = sb-p.b, sr-p.r, sbb-p.b*p.b, sbr-p.b*p.r
				lo++
			}
			m := float64(hi - lo)
			den := m*sbb - sb*sb
			if hi-lo < 3 || !(den > 1e-12*m*sbb) || pts[i].r == 0 {
				continue
			}
			slope := (m*sbr - sb*sr) / den
			flat[i] = math.Abs(slope)*pts[i].b/math.Abs(pts[i].r) < opt.Flatness
		}
		for i := 0; i < n; {
			if !flat[i] {
				i++
				continue
			}
			j := i
			for j < n && flat[j] {
				j++
			}
			if pts[j-1].b-pts[i].b >= opt.MinWidth && j-i >= 3 {
				run := pts[i:j]
				rs := make([]float64, len(run))
				var xs []float64
				for q, p := range run {
					rs[q] = p.r
					if !math.IsNaN(p.xx) {
						xs = append(xs, p.xx)
					}
				}
				pl := makePlateau(sign, run[0].b, run[len(run)-1].b, rs, xs, res.RxxRef, opt)
				res.Plateaus = append(res.Plateaus, pl)
				for _, w := range pl.Warnings {
					w.Msg = fmt.Sprintf("plateau at %+.3g…%+.3g T: %s", float64(sign)*pl.BMin, float64(sign)*pl.BMax, w.Msg)
					res.Warnings = append(res.Warnings, w)
				}
			}
			i = j
		}
	}
	return res, nil
}

func makePlateau(sign int, b0, b1 float64, rs, xs []float64, ref float64, opt PlateauOptions) Plateau {
	pl := Plateau{Sign: sign, BMin: b0, BMax: b1, Points: len(rs), RxxMean: math.NaN(), RxxMin: math.NaN()}
	var s, s2 float64
	for _, r := range rs {
		s += r
	}
	mean := s / float64(len(rs))
	for _, r := range rs {
		s2 += (r - mean) * (r - mean)
	}
	pl.Rxy = Estimate{mean, math.Sqrt(s2 / float64(len(rs)-1) / float64(len(rs)))}
	pl.NuMeasured = rK / math.Abs(mean)
	pl.P, pl.Q = nearestFilling(pl.NuMeasured, opt.Fractions)
	nu := pl.Nu()
	pl.Deviation = math.Abs(mean)*nu/rK - 1
	if math.Abs(pl.Deviation) > 1e-3 {
		pl.Warnings = append(pl.Warnings, Warning{WarnPlateauDev, fmt.Sprintf(
			"|R_xy| = %.6g ± %.2g Ohm deviates by %.2g from R_K/ν = %.6g Ohm (ν = %s; bound 1e-3, common practice)",
			math.Abs(mean), pl.Rxy.Uncertainty, pl.Deviation, rK/nu, pl.nuString())})
	}
	if len(xs) > 0 {
		var sx float64
		pl.RxxMin = math.Inf(1)
		for _, x := range xs {
			sx += x
			pl.RxxMin = math.Min(pl.RxxMin, x)
		}
		pl.RxxMean = sx / float64(len(xs))
		if ref > 0 {
			pl.RxxNearZero = pl.RxxMin < opt.RxxTol*ref
			if !pl.RxxNearZero {
				pl.Warnings = append(pl.Warnings, Warning{WarnRxxNotZero, fmt.Sprintf(
					"R_xx on the ν = %s plateau stays ≥ %.3g Ohm (%.1f %% of R_xx at low field; tolerance %.2g): parallel conduction or heating?",
					pl.nuString(), pl.RxxMin, 100*pl.RxxMin/ref, opt.RxxTol)})
			}
		}
	}
	if n := opt.Density; n > 0 {
		pl.NuDensity = [2]float64{hPl * n / (qe * b1), hPl * n / (qe * b0)}
		if nu < pl.NuDensity[0]-0.5 || nu > pl.NuDensity[1]+0.5 {
			pl.Warnings = append(pl.Warnings, Warning{WarnFilling, fmt.Sprintf(
				"ν = %s but the density gives n h/(e|B|) = %.3g–%.3g over the plateau: wrong density, parallel conduction, or a misread plateau",
				pl.nuString(), pl.NuDensity[0], pl.NuDensity[1])})
		}
	}
	return pl
}

func (p Plateau) nuString() string {
	if p.Q == 1 {
		return fmt.Sprint(p.P)
	}
	return fmt.Sprintf("%d/%d", p.P, p.Q)
}

// nearestFilling returns the integer ν ≥ 1 (or, with fractions, the ν = p/q
// with q ∈ {3, 5}) whose R_K/ν is nearest to R_K/nu in relative terms; an
// integer wins a tie.
func nearestFilling(nu float64, fractions bool) (int, int) {
	bestP, bestQ := max(1, int(math.Round(nu))), 1
	dev := func(p, q int) float64 { return math.Abs(float64(p)/float64(q)/nu - 1) }
	if !fractions {
		return bestP, bestQ
	}
	for _, q := range []int{3, 5} {
		c := int(math.Round(nu * float64(q)))
		for p := c - 1; p <= c+1; p++ {
			if p < 1 || p%q == 0 || gcd(p, q) != 1 {
				continue
			}
			if dev(p, q) < dev(bestP, bestQ) {
				bestP, bestQ = p, q
			}
		}
	}
	return bestP, bestQ
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}
