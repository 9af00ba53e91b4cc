package transport

import (
	"bytes"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"testing/iotest"

	"gonum.org/v1/gonum/floats"
)

// TestSdHBinnedCoverage: long sweeps go through the binned path of SdHDensity
// (more than sdhRawMax points in the window). Synthetic data from the low-field
// SdH model [src:CSF1989] with known density: over 50 seeds the true
// density lies within ±2σ in at least 85 % of them, and the reported σ agrees
// with the actual scatter of the estimates (ratio 0.7–1.4), so binning neither
// hides nor inflates the uncertainty.
func TestSdHBinnedCoverage(t *testing.T) {
	t.Parallel()
	const seeds = 50
	in := 0
	var sumSq, sumSig2 float64
	for s := uint64(0); s < seeds; s++ {
		p := gaas()
		p.Noise, p.Seed, p.Points = 3, 5000+s, 20001 // 14000 points in 0.3–1 T
		d, err := Sweep(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := SdHDensity(d, 0.3, 1, 2)
		if err != nil {
			t.Fatal(err)
		}
		if s == 0 && !strings.Contains(r.Method, "bins of 1/B") {
			t.Fatalf("the binned path was not taken: %s", r.Method)
		}
		dev := r.Density.Value - p.Density
		if math.Abs(dev) <= 2*r.Density.Uncertainty {
			in++
		}
		sumSq += dev * dev
		sumSig2 += r.Density.Uncertainty * r.Density.Uncertainty
	}
	frac := float64(in) / seeds
	ratio := math.Sqrt(sumSig2 / sumSq) // RMS reported σ / RMS actual error
	t.Logf("binned SdH density: within ±2σ in %d/%d seeds (%.0f %%); RMS σ / RMS error = %.2f", in, seeds, 100*frac, ratio)
	if frac < 0.85 {
		t.Errorf("coverage %.2f < 0.85", frac)
	}
	if ratio < 0.7 || ratio > 1.4 {
		t.Errorf("reported σ is %.2f× the actual scatter; want 0.7–1.4", ratio)
	}
}

// TestSdHBinnedRecovery: noise-free and noisy long sweeps recover the density
// through the binned path, including a high SdH frequency for which the first
// 4096 bins give fewer than 16 bins per period, so the bins must be refined.
// The SdH frequency of n = 3e12 cm^-2 with g_s = 2 is h n/(2e) = 62.04 T
// (closed form, CODATA 2018 h and e; 10× [src:W15]).
func TestSdHBinnedRecovery(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name       string
		mod        func(*SweepParams)
		bmin, bmax float64
		tol        float64
		bins       string // expected in Method
	}{
		{"W15 ×10 noise-free, 10^5 points", func(p *SweepParams) { p.Noise, p.Points = 0, 100_001 }, 0.3, 1, 1e-3, "in 4096 bins"},
		{"noisy ±B up-down, 10^5 points", func(p *SweepParams) { p.Noise, p.BStart, p.UpDown, p.Points = 2, -1, true, 50_001 }, 0.3, 1, 0.01, "in 4096 bins"},
		{"3e12 cm^-2, 62 T, 560 periods", func(p *SweepParams) {
			p.Density, p.QuantumLifetime, p.Temperature, p.Noise, p.Points = 3e16, 1e-11, 0.05, 0.5, 200_001
		}, 0.1, 1, 2e-3, "in 16384 bins"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := gaas()
			tc.mod(&p)
			d, err := Sweep(p)
			if err != nil {
				t.Fatal(err)
			}
			r, err := SdHDensity(d, tc.bmin, tc.bmax, 2)
			if err != nil {
				t.Fatal(err)
			}
			if rel := math.Abs(r.Density.Value-p.Density) / p.Density; rel > tc.tol {
				t.Errorf("n = %v m^-2, want %g (rel %.2g > %.2g); FFT %.5g T; warnings %v", r.Density, p.Density, rel, tc.tol, r.FFTFrequency, r.Warnings)
			}
			if !strings.Contains(r.Method, tc.bins) {
				t.Errorf("method %q does not contain %q", r.Method, tc.bins)
			}
		})
	}
}

// TestSelectPairs: selectPairs drops NaN pairs, points outside lo ≤ |x| ≤ hi
// and, with sigma, points whose sigma is not in (0, ∞); the wanted slices are
// worked out by hand from the table.
func TestSelectPairs(t *testing.T) {
	t.Parallel()
	nan := math.NaN()
	x := []float64{-2, -1, nan, 0, 0.5, 1, 1.5, 2, 3}
	y := []float64{1, 2, 3, nan, 5, 6, 7, 8, 9}
	s := []float64{1, 0, 1, 1, 1, math.Inf(1), 1, 1, 1}
	tests := []struct {
		name       string
		sig        []float64
		wx, wy, ws []float64
	}{
		{"no sigma", nil, []float64{-2, -1, 0.5, 1, 1.5, 2}, []float64{1, 2, 5, 6, 7, 8}, nil},
		{"sigma", s, []float64{-2, 0.5, 1.5, 2}, []float64{1, 5, 7, 8}, []float64{1, 1, 1, 1}},
	}
	for _, tc := range tests {
		bx, by, bs := selectPairs(x, y, tc.sig, 0.5, 2)
		if !floats.Same(bx, tc.wx) || !floats.Same(by, tc.wy) || !floats.Same(bs, tc.ws) || (tc.sig == nil) != (bs == nil) {
			t.Errorf("%s: selectPairs = %v %v %v, want %v %v %v", tc.name, bx, by, bs, tc.wx, tc.wy, tc.ws)
		}
	}
	if ax, ay, as := selectPairs(x, y, s, 5, 6); ax != nil || ay != nil || as != nil {
		t.Errorf("empty selection = %v %v %v, want nil slices", ax, ay, as)
	}
}

// TestScanFloatMatchesStrconv: whenever the fast path of the row parser accepts
// a field, its value is bit-identical to strconv.ParseFloat of the trimmed
// field (the reference), and it accepts the plain forms a data file holds.
func TestScanFloatMatchesStrconv(t *testing.T) {
	t.Parallel()
	fixed := []string{"0", "-0", "+0.0", "1", "-1", "1.", ".5", "-.5e-3", "0.1", "0.3", "123.456",
		"9007199254740992", "9007199254740993", "1e22", "1e23", "1e-22", "1e-23", "2.5E+3",
		"  7.25 ", "0.000001", "4.9e-324", "1.7976931348623157e308", "00000000000000000000001.5",
		"1234567890123456789", "12345678901234567890", "3.14159265358979323846"}
	rng := rand.New(rand.NewPCG(3, 4))
	var in []string
	in = append(in, fixed...)
	for range 20000 {
		var v float64
		switch rng.IntN(3) {
		case 0:
			v = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(30)-15))
		case 1:
			v = float64(rng.Int64N(1<<40)) / math.Pow(10, float64(rng.IntN(12)))
		default:
			v = math.Float64frombits(rng.Uint64())
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		fm := []byte{'f', 'e', 'g'}[rng.IntN(3)]
		in = append(in, strconv.FormatFloat(v, fm, rng.IntN(18)-1, 64))
	}
	accepted := 0
	for _, s := range in {
		for _, delim := range []byte{',', '\t', ' '} {
			f := s
			if delim == ' ' {
				f = strings.TrimSpace(s)
			}
			line := []byte(f + string(delim) + "9")
			v, end, ok := scanFloat(line, 0, delim)
			if !ok {
				continue
			}
			accepted++
			want, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil {
				t.Fatalf("scanFloat accepted %q (delim %q) but strconv rejects it: %v", f, delim, err)
			}
			if math.Float64bits(v) != math.Float64bits(want) {
				t.Errorf("scanFloat(%q) = %v (%#x), strconv %v (%#x)", f, v, math.Float64bits(v), want, math.Float64bits(want))
			}
			if end != len(f) {
				t.Errorf("scanFloat(%q): end %d, want %d (at the delimiter)", f, end, len(f))
			}
		}
	}
	// Random bit patterns and 'e'/'g' forms with up to 17 digits often fall
	// outside the exact range; the plain forms of a data file do not.
	if accepted < 3*len(in)/2 {
		t.Errorf("fast path accepted only %d of %d fields", accepted, 3*len(in))
	}
	for _, s := range []string{"", " ", ".", "-", "1e", "1e+", "1,5", "0x1p3", "inf", "NaN", "1_000", "1.5x", "--1", "1..2"} {
		if _, _, ok := scanFloat([]byte(s), 0, ';'); ok {
			t.Errorf("scanFloat accepted %q", s)
		}
	}
}

// FuzzScanFloat: for any field, an accepted value equals strconv.ParseFloat's.
func FuzzScanFloat(f *testing.F) {
	for _, s := range []string{"1.5", "-0", " 2e-3 ", "1e22", "9007199254740993", ".5", "1.", "1,5"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, delim := range []byte{',', '\t', ' ', ';'} {
			line := []byte(s)
			v, end, ok := scanFloat(line, 0, delim)
			if !ok {
				continue
			}
			if end > len(line) || (end < len(line) && line[end] != delim && !(delim == ' ' && line[end] == '\t')) {
				t.Fatalf("scanFloat(%q, %q): end %d is not at a delimiter", s, delim, end)
			}
			field := strings.Trim(s[:end], " \t")
			want, err := strconv.ParseFloat(field, 64)
			if err != nil {
				t.Fatalf("scanFloat accepted %q (delim %q) but strconv rejects %q: %v", s, delim, field, err)
			}
			if math.Float64bits(v) != math.Float64bits(want) {
				t.Fatalf("scanFloat(%q) = %v, strconv %v", s, v, want)
			}
		}
	})
}

// TestReadSizeHint: the columns come out the same whether Read can learn the
// input size (strings.Reader, a regular file) or not (a one-byte reader), and
// for a number of rows around the sampling point of the size estimate.
func TestReadSizeHint(t *testing.T) {
	t.Parallel()
	for _, rows := range []int{0, 1, sizeSample - 1, sizeSample, sizeSample + 1, 3000} {
		var b strings.Builder
		b.WriteString("# run: hint\nB (mT)\tRxx (kOhm)\tnote\n")
		rng := rand.New(rand.NewPCG(uint64(rows), 1))
		for i := range rows {
			// Rows of varying length, so the estimate is not exact.
			b.WriteString(strconv.FormatFloat(float64(i)*0.25, 'f', -1, 64) + "\t")
			b.WriteString(strconv.FormatFloat(rng.NormFloat64()*math.Pow(10, float64(rng.IntN(8))), 'g', -1, 64) + "\t")
			if i%7 != 0 {
				b.WriteString(" 1.5e-3 ")
			}
			b.WriteString("\n")
		}
		in := b.String()
		path := filepath.Join(t.TempDir(), "hint.tsv")
		if err := os.WriteFile(path, []byte(in), 0o644); err != nil {
			t.Fatal(err)
		}
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		want, err := Read("x", iotest.OneByteReader(strings.NewReader(in)))
		if err != nil {
			t.Fatal(err)
		}
		for name, r := range map[string]io.Reader{"strings.Reader": strings.NewReader(in), "bytes.Buffer": bytes.NewBufferString(in), "file": f} {
			got, err := Read("x", r)
			if err != nil {
				t.Fatalf("%d rows, %s: %v", rows, name, err)
			}
			if got.Hash != want.Hash || got.Len() != rows || want.Len() != rows {
				t.Errorf("%d rows, %s: %d rows, hash %s; want %d, %s", rows, name, got.Len(), got.Hash, want.Len(), want.Hash)
			}
			for c := range want.Columns {
				if !floats.Same(got.Columns[c].Values, want.Columns[c].Values) {
					t.Errorf("%d rows, %s: column %s differs", rows, name, want.Columns[c].Name)
				}
				if v := got.Columns[c].Values; cap(v) != len(v) {
					t.Errorf("%d rows, %s: column %s has cap %d > len %d", rows, name, want.Columns[c].Name, cap(v), len(v))
				}
			}
		}
		f.Close()
		if rows == 3000 {
			if v := want.Columns[0].Values[2999]; v != 2999*0.25e-3 {
				t.Errorf("B[2999] = %v T, want %v (mT scaled to T)", v, 2999*0.25e-3)
			}
			if !math.IsNaN(want.Columns[2].Values[0]) || want.Columns[2].Values[1] != 1.5e-3 {
				t.Errorf("note column starts %v, want NaN, 0.0015", want.Columns[2].Values[:2])
			}
		}
	}
}
