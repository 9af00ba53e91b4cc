// Package quantity gives cleave physical quantities: a value in coherent SI
// units, its dimension ([Dim], exponents of m, kg, s, A, K, mol, cd) and its
// standard uncertainty with exact correlations. It also parses and formats
// units and quantities the way the trade writes them.
//
// It leaves out on purpose: logarithmic units (dB), Fahrenheit, and any
// notion of which quantity a value is beyond its dimension, with one
// exception: a temperature remembers whether it was written as an absolute
// temperature in °C or is a difference ([TempKind]), so that the Celsius
// scale's one affine unit converts exactly (T/K = t/°C + 273.15) and
// ambiguous arithmetic (20 °C + 30 °C) is refused.
//
// # Uncertainty
//
// Every uncertain input made by [Uncertain] (or parsed with "±") gets a
// unique id. A [Quantity] carries the first derivatives of its value with
// respect to each input it depends on, and its standard uncertainty is
// sqrt(sum_i (dq/dx_i sigma_i)^2): first-order propagation in the manner of
// the GUM (JCGM 100:2008, section 5.1 (from memory)). Because derivatives
// are tracked per input, x - x is exactly 0 ± 0, x*x has twice the relative
// uncertainty of x, x/x is 1 ± 0, and (x+y) - x has the uncertainty of y.
// [Derived] is the hook through which physics functions and fits attach
// their partial derivatives; [Covariance] and [Correlation] read them back.
// Second-order terms are neglected, so a result that is strongly nonlinear
// within one sigma of its inputs is only approximate.
//
// # Units
//
// [ParseUnit] accepts products (space, "*", "·"), one quotient "/" (group
// a compound denominator in parentheses: "cm^2/(V s)"), integer powers
// ("cm^-2") and parenthesised rational powers ("(m^2)^(1/2)") as long as
// the resulting exponents are integers. Symbols: the SI base and derived
// units with special names (m g s A K mol cd Hz N Pa J W C V F Ohm S Wb T H
// rad sr; "ohm", "Ω" are aliases of Ohm), all SI prefixes y..Y with u, µ and
// μ for micro, and eV, G (gauss), Å / Angstrom, m_e (CODATA 2018 electron
// mass), min, h (hour), deg / °, bar, Torr (with prefixes: mTorr), sq (the
// "per square" of Ohm/sq, the number 1), % and 1, and the units of growth
// and fabrication: °C / degC / ℃ (an absolute temperature when written
// alone, a difference inside a compound unit such as °C/min), inch / in, L
// (with prefixes: mL, uL), Oe (the oersted, a magnetic field strength H in
// A/m, not a flux density), ppm, ppb, rpm, sccm and slm (gas flows as
// amounts per time at 0 °C and 101325 Pa), and ML(material), one monolayer
// of (001) growth, half the cubic lattice constant of the named zincblende
// material (ML(GaAs) = 0.28266 nm; ML(Al0.3Ga0.7As)/s is a growth rate). A
// symbol is matched whole first, then as prefix + unit: "mT" is millitesla,
// "Pa" the pascal, "A" the ampere (the ångström is "Å" or "Angstrom"), "mL"
// the millilitre and "ML" the monolayer.
//
// # Display units
//
// [Customary] picks the trade's unit for a dimension: density cm^-2, volume
// density cm^-3, mobility cm^2/(V s), energy meV (eV from 10 eV, J from
// 1e-9 J), length nm below 1 um, um below 1 mm, mm below 10 m, m above;
// field mT below 10 mT, else T; resistance Ohm; time ps below 1 ns then ns,
// us, ms, s; temperature mK below 0.1 K, else K; frequency Hz, kHz, MHz, GHz,
// THz by size; mass m_e; voltage mV below 1 V, else V; current nA, uA, mA, A by size;
// capacitance pF, nF, uF; capacitance per area nF/cm^2; velocity nm/s below
// 1 mm/s (growth and etch rates), else m/s; wavevector m^-1; Hall slope
// Ohm/T; magnetic moment meV/T; meV/K; density of states cm^-2 meV^-1;
// conductance S; area um^2, mm^2, m^2; field sweep rate T/min; temperature
// ramp K/min; intensity
// mW/cm^2; dose mJ/cm^2 (e-beam dose uC/cm^2); specific contact resistivity
// Ohm cm^2; volume uL, mL, L; gas flow sccm; field strength A/m; an absolute
// temperature written in °C stays in °C. A value written in rpm, Torr, Oe,
// inch, ppm or sccm carries [Unit.Keep] so that a program can show it as
// written until something is computed from it.
//
// Two choices need care. Frequency and angular frequency share the
// dimension s^-1; values of that dimension are shown in Hz (a cyclic
// frequency), so a function that returns an angular frequency (the cyclotron
// frequency omega_c) asks for rad/s as its display unit. Mobility
// m^2/(V s) and inverse field T^-1 are the same dimension (mu B is a pure
// number); such values are shown in cm^2/(V s), so an SdH period must be
// asked for in T^-1.
//
// Dimensions without a customary unit are written in SI base units,
// kg first ([Dim.String]: "kg m^2 s^-2").
//
// # Number format
//
// [Format] and [FormatIn] write:
//
//   - an exact value to 5 significant figures: "20.000 um", "0.067000 m_e";
//     in scientific notation with a bare exponent when the rounded value is
//     at least 1e5 or below 1e-3: "3.0000e11 cm^-2"; zero as "0";
//   - an uncertain value with its uncertainty to 2 significant figures and
//     the value rounded to the same decimal place, separated by " ± ":
//     "12.50 ± 0.20 um", or with a common power of ten when the larger of
//     the two is at least 1e5 or below 1e-3: "(3.072 ± 0.041)e11 cm^-2";
//   - a value whose relative uncertainty is below 1e-8 (one derived only from
//     CODATA's measured constants, such as mu_B B) like an exact one, since
//     its uncertainty would need a dozen digits; the uncertainty is kept;
//   - non-finite values as Inf, -Inf, NaN.
//
// [ParseQuantity] reads all of these back (and "+/-" for "±"), so a
// formatted value re-parses to the same dimension and to its value within
// the printed precision.
package quantity
