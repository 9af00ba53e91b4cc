package band

import (
	"fmt"
	"io"
	"strings"
)

// Summary renders the result in the trade's units as a small text table: total and channel
// density (cm^-2), each region that holds electrons (or is a channel or doping well), the
// warnings, and for each subband up to 10 meV above E_F its valley, energy relative to E_F
// (meV), occupation (cm^-2, "<1" below one electron per cm²), mean depth (nm), in-plane mass
// (m_e) and region.
func (r *Solution) Summary() string {
	var b strings.Builder
	fmt.Fprintf(&b, "T = %g K, grid %.3g nm, %d iterations\n", r.TemperatureK, r.GridM*1e9, r.Iterations)
	fmt.Fprintf(&b, "total electrons: %.4g cm^-2, channel: %.4g cm^-2\n", r.TotalN2D/1e4, r.ChannelN2D/1e4)
	for _, g := range r.Regions {
		if g.N2D < 1e4 && g.Kind != RegionChannel && g.Kind != RegionDopingWell {
			continue
		}
		fmt.Fprintf(&b, "%s: %.1f-%.1f nm, %s cm^-2\n", g.Name, g.StartM*1e9, g.EndM*1e9, density(g.N2D))
	}
	for _, w := range r.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", w)
	}
	fmt.Fprintf(&b, "%-4s %-6s %10s %12s %8s %8s  %s\n", "sub", "valley", "E-EF/meV", "n/cm^-2", "<z>/nm", "m*/me", "region")
	for i, s := range r.Subbands {
		if s.E > 0.010 {
			break
		}
		fmt.Fprintf(&b, "%-4d %-6s %10.3f %12s %8.2f %8.4f  %s\n", i, s.Valley, s.E*1e3, density(s.N2D), s.MeanZ*1e9, s.Mstar,
			r.Regions[s.Region].Kind)
	}
	return b.String()
}

// density prints a density in cm^-2, "<1" below one electron per cm² (too sensitive to
// rounding to print).
func density(m2 float64) string {
	if m2 < 1e4 {
		return "<1"
	}
	return fmt.Sprintf("%.3g", m2/1e4)
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
