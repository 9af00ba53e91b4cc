package band

import (
	"fmt"
	"io"
	"strings"
)

// Summary renders the result in the trade's units as a small text table: total and per-well
// density (cm^-2), and for each subband up to 10 meV above E_F its energy relative to E_F
// (meV), occupation (cm^-2, "<1" below one electron per cm²), mean depth (nm) and in-plane mass (m_e).
func (r *Solution) Summary() string {
	var b strings.Builder
	fmt.Fprintf(&b, "T = %g K, grid %.3g nm, %d iterations\n", r.TemperatureK, r.GridM*1e9, r.Iterations)
	fmt.Fprintf(&b, "total electrons: %.4g cm^-2\n", r.TotalN2D/1e4)
	for i, w := range r.Density2D {
		fmt.Fprintf(&b, "well %d: %.1f-%.1f nm, %.4g cm^-2\n", i+1, w.StartM*1e9, w.EndM*1e9, w.N2D/1e4)
	}
	fmt.Fprintf(&b, "%-4s %10s %12s %8s %8s\n", "sub", "E-EF/meV", "n/cm^-2", "<z>/nm", "m*/me")
	for i, s := range r.Subbands {
		if s.E > 0.010 {
			break
		}
		n := fmt.Sprintf("%.3g", s.N2D/1e4)
		if s.N2D < 1e4 {
			n = "<1" // below one electron per cm², and too sensitive to rounding to print
		}
		fmt.Fprintf(&b, "%-4d %10.3f %12s %8.2f %8.4f\n", i, s.E*1e3, n, s.MeanZ*1e9, s.Mstar)
	}
	return b.String()
}

// WriteProfile writes the band profile as CSV with a header: depth (nm), conduction-band
// edge relative to E_F (meV) and electron density (cm^-3), every step-th grid node
// (step < 1 means every node).
func (r *Solution) WriteProfile(w io.Writer, step int) error {
	if step < 1 {
		step = 1
	}
	if _, err := fmt.Fprintln(w, "z_nm,Ec_meV,n_cm3"); err != nil {
		return err
	}
	for j := 0; j < len(r.Z); j += step {
		if _, err := fmt.Fprintf(w, "%.3f,%.4f,%.4g\n", r.Z[j]*1e9, r.Ec[j]*1e3, r.N3D[j]/1e6); err != nil {
			return err
		}
	}
	return nil
}
