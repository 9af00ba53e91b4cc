package transport

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"

	"cleave/calc/constants"
)

// SI constants from the project's single CODATA 2018 table.
var (
	qe   = constants.Value("e")    // elementary charge, C
	hPl  = constants.Value("h")    // Planck constant, J s
	hbar = constants.Value("hbar") // reduced Planck constant, J s
	kB   = constants.Value("k_B")  // Boltzmann constant, J/K
	mE   = constants.Value("m_e")  // electron mass, kg
	rK   = constants.Value("R_K")  // von Klitzing constant h/e², Ohm
)

// ParallelChannel is a second conducting channel beside the 2D gas (for example a doping layer
// that did not freeze out), described by the Drude model.
type ParallelChannel struct {
	Density  float64 // sheet density, m^-2 (> 0)
	Mobility float64 // m^2/(V s) (> 0)
	Holes    bool    // carrier type; electrons when false
}

// SweepParams describes a synthetic magnetotransport sweep of a Hall bar.
// All quantities are SI. The zero value of an optional field switches the
// effect off.
type SweepParams struct {
	Density         float64 // n of the main 2D channel, m^-2 (> 0)
	Mobility        float64 // transport mobility μ, m^2/(V s) (> 0)
	MassRatio       float64 // m*/m_e (> 0)
	QuantumLifetime float64 // τ_q, s (> 0)
	Temperature     float64 // K (> 0)
	Holes           bool    // carrier type of the main channel; electrons when false
	SpinDeg         float64 // g_s for the oscillation period; 2 when 0
	ValleyDeg       float64 // g_v; 1 when 0
	Squares         float64 // L/W between the R_xx probes; 1 when 0

	BStart, BEnd float64 // field sweep, T; may have either sign
	Points       int     // points per sweep direction (≥ 2)
	UpDown       bool    // append the reverse sweep (fresh noise)

	Noise      float64          // standard deviation of Gaussian noise on R_xx and R_xy, Ohm
	Seed       uint64           // seed of the PCG generator
	Parallel   *ParallelChannel // optional parallel channel (two-carrier Drude)
	Plateaus   bool             // quantum Hall model at high field (see Sweep)
	Pickup     float64          // fraction of R_xx added to R_xy (probe misalignment)
	OutOfPhase float64          // if > 0, add lock-in Y columns Rxx_Y, Rxy_Y = OutOfPhase·|R| + noise

	// FieldOffset is the true field when the magnet reads zero (a remanent field, T): the
	// B column records B_true − FieldOffset.
	FieldOffset float64
	// Lag is how far the field reading trails the true field while sweeping (T): the B
	// column records B_true − Lag on a rising sweep and B_true + Lag on a falling one.
	Lag float64
	// Direction adds a text column "dir" with "up" or "down" for each row.
	Direction bool
}

func (p *SweepParams) defaults() SweepParams {
	q := *p
	if q.SpinDeg == 0 {
		q.SpinDeg = 2
	}
	if q.ValleyDeg == 0 {
		q.ValleyDeg = 1
	}
	if q.Squares == 0 {
		q.Squares = 1
	}
	return q
}

// SdHFrequency returns the Shubnikov–de Haas frequency f_B = h n/(g_s g_v e), in
// tesla, of a 2D channel of density n (m^-2): the oscillations are periodic in
// 1/B with period 1/f_B (Ando, Fowler, Stern, Rev. Mod. Phys.
// 54, 437 (1982)).
func SdHFrequency(n, gs, gv float64) float64 { return hPl * n / (gs * gv * qe) }

// DensityFromSdH inverts SdHFrequency: n = g_s g_v (e/h) f_B, in m^-2.
func DensityFromSdH(f, gs, gv float64) float64 { return gs * gv * qe * f / hPl }

// Resistivity returns the model ρ_xx and ρ_xy (Ohm) of the sweep at field B (T),
// without pick-up or noise.
//
// Main channel: ρ_0 = 1/(n e μ) and ρ_xy = B/(q n) with q = −e for electrons,
// +e for holes (B along +z, ρ_xy = E_y/j_x; [src:IHN2010]). The oscillating part
// is the low-field form
//
//	Δρ_xx/ρ_0 = 4 (X/sinh X) exp(−π/(ω_c τ_q)) cos(2π E_F/(ħω_c) − π),
//	X = 2π² k_B T/(ħω_c),  ω_c = e|B|/m*,  E_F/(ħω_c) = f_B/|B|,
//
// (Ando, J. Phys. Soc. Jpn. 37, 1233 (1974); Coleridge, Stoner & Fletcher, Phys.
// Rev. B 39, 1120 (1989), from memory; [src:CSF1989]). It holds while the
// amplitude is small; the generator does not clip it.
//
// With Plateaus set, the sweep is instead a smoothed-step model — a model of the
// look of the quantum Hall regime, not a microscopic theory: the filling factor
// ν = n h/(e|B|) seen by ρ_xy is blended towards the nearest multiple of
// g_s g_v with a weight w equal to the low-field relative amplitude
// 4 (X/sinh X) exp(−π/(ω_c τ_q)) clipped to 1 (the levels count as resolved
// once the low-field form would take ρ_xx to zero). ρ_xx blends the low-field
// form, as ρ_0 exp(Δ) (equal to it to first order, and positive), with the
// empirical resistivity rule ρ_xx ∝ B |dρ_xy/dB| (Chang & Tsui, Solid State
// Commun. 56, 153 (1985), from memory):
//
//	ρ_xx = ρ_0 [(1 − w) exp(Δ) + w |dρ_xy/dB| / |dρ_xy^cl/dB|],
//
// the rule's constant chosen so that ρ_xx = ρ_0 on the classical Hall line
// (no classical magnetoresistance), and dw/dB neglected. Where the levels are
// resolved (w = 1) ρ_xx is zero on the plateaus, up to the tails of the
// logistic steps (about 1e-4 ρ_0), and peaks between them. Spin splitting is
// not modelled: with SpinDeg 2 the plateaus are at even ν only; SpinDeg 1
// puts them at every integer.
//
// A ParallelChannel adds its Drude conductivity tensor to the main channel's,
// and the sum is inverted back to resistivities.
func (p *SweepParams) Resistivity(B float64) (rhoxx, rhoxy float64) {
	q := p.defaults()
	n := q.Density
	sign := -1.0
	if q.Holes {
		sign = 1
	}
	rho0 := 1 / (n * qe * q.Mobility)
	absB := math.Abs(B)
	rhoxx = rho0
	rhoxy = sign * B / (n * qe)
	if absB > 0 {
		wc := qe * absB / (q.MassRatio * mE)
		X := 2 * math.Pi * math.Pi * kB * q.Temperature / (hbar * wc)
		lk := 1.0
		if X > 1e-8 {
			lk = X / math.Sinh(X)
		}
		damp := lk * math.Exp(-math.Pi/(wc*q.QuantumLifetime))
		f := SdHFrequency(n, q.SpinDeg, q.ValleyDeg)
		osc := 4 * damp * math.Cos(2*math.Pi*f/absB-math.Pi)
		if q.Plateaus {
			g := q.SpinDeg * q.ValleyDeg
			nu := hPl * n / (qe * absB) / g
			w := math.Min(1, 4*damp)
			ne, dne := nuEffective(nu, w)
			rhoxy = sign * math.Copysign(rK/(g*ne), B)
			// |dρ_xy/dB| relative to the classical slope, ignoring the slow
			// variation of w: ρ_xy ∝ 1/ν_e and ν ∝ 1/B give
			// (dν_e/dν) ν²/ν_e².
			slope := dne * nu * nu / (ne * ne)
			rhoxx = rho0 * ((1-w)*math.Exp(osc) + w*slope)
		} else {
			rhoxx = rho0 * (1 + osc)
		}
	}
	if l := q.Parallel; l != nil {
		s2 := -1.0
		if l.Holes {
			s2 = 1
		}
		sxx1, sxy1 := invertTensor(rhoxx, rhoxy)
		sxx2, sxy2 := invertTensor(1/(l.Density*qe*l.Mobility), s2*B/(l.Density*qe))
		rhoxx, rhoxy = invertTensor(sxx1+sxx2, sxy1+sxy2)
	}
	return rhoxx, rhoxy
}

// invertTensor inverts the isotropic 2D tensor [[a, b], [−b, a]]: the inverse is
// [[a, −b], [b, a]]/(a² + b²). It maps (ρ_xx, ρ_xy) to (σ_xx, σ_xy) and back.
func invertTensor(a, b float64) (float64, float64) {
	d := a*a + b*b
	return a / d, -b / d
}

// staircase is a smoothed staircase: flat at the integers, with a logistic
// step of width 0.04 centred on each half-integer. It returns the value and
// the derivative.
func staircase(x float64) (float64, float64) {
	k := math.Floor(x)
	l := 1 / (1 + math.Exp(-(x-k-0.5)/0.04))
	return k + l, l * (1 - l) / 0.04
}

// nuEffective is the filling factor (in units of g_s g_v) that the plateau
// model's ρ_xy sees, and its derivative with respect to ν: ν blended with
// weight w towards the staircase, and never below ν once ν < 1/2 (beyond the
// last plateau the Hall line is classical again). Above 1/2 the staircase is
// at least 1 − 4e-6 (its logistic tail just below ν = 1), so no floor is
// needed there, and none is applied: a floor at ν would switch the ν = 1
// plateau centre back to the classical slope.
func nuEffective(nu, w float64) (float64, float64) {
	s, ds := staircase(nu)
	v, dv := nu+w*(s-nu), 1-w+w*ds
	if nu < 0.5 && v < nu {
		return nu, 1
	}
	return v, dv
}

// Sweep generates a synthetic sweep with columns B (T), Rxx (Ohm), Rxy (Ohm),
// T (K), and Rxx_Y, Rxy_Y when OutOfPhase > 0. R_xx = ρ_xx·Squares, R_xy = ρ_xy
// (a Hall bar's ρ_xy needs no geometry factor, [src:IHN2010]). It is
// deterministic for a given Seed. The data set's Meta records every parameter
// and its Hash is the hash of its WriteCSV output, so that Read(WriteCSV(d))
// has the same Hash.
func Sweep(p SweepParams) (*Dataset, error) {
	q := p.defaults()
	switch {
	case !(q.Density > 0), !(q.Mobility > 0), !(q.MassRatio > 0), !(q.QuantumLifetime > 0), !(q.Temperature > 0):
		return nil, fmt.Errorf("sweep: density, mobility, mass ratio, quantum lifetime and temperature must be > 0: %w", ErrBadArgument)
	case q.Points < 2:
		return nil, fmt.Errorf("sweep: %d points; need at least 2: %w", q.Points, ErrBadArgument)
	case q.BStart == q.BEnd:
		return nil, fmt.Errorf("sweep: empty field range: %w", ErrBadArgument)
	case q.Parallel != nil && !(q.Parallel.Density > 0 && q.Parallel.Mobility > 0):
		return nil, fmt.Errorf("sweep: parallel layer needs density and mobility > 0: %w", ErrBadArgument)
	case q.Noise < 0 || math.IsNaN(q.Noise):
		return nil, fmt.Errorf("sweep: negative noise: %w", ErrBadArgument)
	}
	rng := rand.New(rand.NewPCG(q.Seed, 0x9e3779b97f4a7c15))
	total := q.Points
	if q.UpDown {
		total *= 2
	}
	B := make([]float64, 0, total)
	for i := 0; i < q.Points; i++ {
		B = append(B, (q.BStart*float64(q.Points-1-i)+q.BEnd*float64(i))/float64(q.Points-1))
	}
	if q.UpDown {
		for i := q.Points - 1; i >= 0; i-- {
			B = append(B, B[i])
		}
	}
	rxx := make([]float64, total)
	rxy := make([]float64, total)
	tt := make([]float64, total)
	var yxx, yxy []float64
	if q.OutOfPhase > 0 {
		yxx = make([]float64, total)
		yxy = make([]float64, total)
	}
	var dir []string
	if q.Direction {
		dir = make([]string, total)
	}
	rising := q.BEnd > q.BStart
	for i, b := range B {
		up := rising == (i < q.Points)
		if dir != nil {
			dir[i] = "down"
			if up {
				dir[i] = "up"
			}
		}
		bt := b + q.FieldOffset
		if up {
			bt += q.Lag
		} else {
			bt -= q.Lag
		}
		px, py := q.Resistivity(bt)
		rx := px * q.Squares
		ry := py + q.Pickup*rx
		rxx[i] = rx + q.Noise*rng.NormFloat64()
		rxy[i] = ry + q.Noise*rng.NormFloat64()
		tt[i] = q.Temperature
		if yxx != nil {
			yxx[i] = q.OutOfPhase*math.Abs(rx) + q.Noise*rng.NormFloat64()
			yxy[i] = q.OutOfPhase*math.Abs(ry) + q.Noise*rng.NormFloat64()
		}
	}
	d := &Dataset{Name: "synthetic", Meta: q.meta()}
	d.Columns = []Column{
		{Name: "B", Unit: "T", Dim: DimField, Values: B, Role: RoleField},
		{Name: "Rxx", Unit: "Ohm", Dim: DimResistance, Values: rxx, Role: RoleRxx},
		{Name: "Rxy", Unit: "Ohm", Dim: DimResistance, Values: rxy, Role: RoleRxy},
		{Name: "T", Unit: "K", Dim: DimTemperature, Values: tt, Role: RoleTemperature},
	}
	if yxx != nil {
		d.Columns = append(d.Columns,
			Column{Name: "Rxx_Y", Unit: "Ohm", Dim: DimResistance, Values: yxx, Role: RoleRxxY},
			Column{Name: "Rxy_Y", Unit: "Ohm", Dim: DimResistance, Values: yxy, Role: RoleRxyY})
	}
	if dir != nil {
		nan := make([]float64, total)
		for i := range nan {
			nan[i] = math.NaN()
		}
		d.Columns = append(d.Columns, Column{Name: "dir", Role: RoleDirection, Values: nan, Text: dir})
	}
	h := sha256.New()
	if err := WriteCSV(h, d); err != nil {
		return nil, err
	}
	d.Hash = "sha256:" + hex.EncodeToString(h.Sum(nil))
	return d, nil
}

func (q *SweepParams) meta() []KV {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	carrier := "electrons"
	if q.Holes {
		carrier = "holes"
	}
	m := []KV{
		{"generator", "cleave synthetic sweep (low-field SdH form, Drude Hall)"},
		{"density", g(q.Density) + " m^-2"},
		{"mobility", g(q.Mobility) + " m^2/(V s)"},
		{"carriers", carrier},
		{"mass ratio", g(q.MassRatio)},
		{"quantum lifetime", g(q.QuantumLifetime) + " s"},
		{"temperature", g(q.Temperature) + " K"},
		{"degeneracy", g(q.SpinDeg) + " spin x " + g(q.ValleyDeg) + " valley"},
		{"squares", g(q.Squares)},
		{"noise", g(q.Noise) + " Ohm"},
		{"seed", strconv.FormatUint(q.Seed, 10)},
	}
	if l := q.Parallel; l != nil {
		m = append(m, KV{"parallel layer", g(l.Density) + " m^-2, " + g(l.Mobility) + " m^2/(V s)"})
	}
	if q.Plateaus {
		m = append(m, KV{"plateaus", "smoothed-step model"})
	}
	if q.Pickup != 0 {
		m = append(m, KV{"pickup", g(q.Pickup)})
	}
	if q.FieldOffset != 0 {
		m = append(m, KV{"field offset", g(q.FieldOffset) + " T"})
	}
	if q.Lag != 0 {
		m = append(m, KV{"field lag", g(q.Lag) + " T"})
	}
	return m
}
