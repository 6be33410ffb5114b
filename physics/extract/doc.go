// Package extract turns measured diode characteristics into model
// parameters with uncertainties: single- and double-diode I-V fits, reverse
// leakage and shunt resistance, Mott-Schottky and junction-capacitance C-V
// fits, doping profiles, temperature series (Arrhenius plot of Is, VF(T)),
// SPICE-style model cards and a parallel batch runner with robust summaries.
//
// Rules that hold for every file in this package:
//
//   - Pure computation: no I/O, no global mutable state. Data come in as
//     slices of float64 in SI units (V, A, F, K, m^2, F/m, ohm); results are
//     returned in SI units (doping in m^-3, depth in m, energies in eV where
//     the name says so).
//   - Physical constants come from package physics (physics.Q, physics.KB,
//     physics.Eps0, physics.ThermalVoltage); none is typed here.
//   - Bad input is reported as an *InputError naming the field, the value,
//     the allowed range and why; no function panics on user data.
//   - Standard errors are the square roots of the diagonal of the
//     covariance s^2 (J^T W J)^-1 of weighted least squares (Bates & Watts,
//     Nonlinear Regression Analysis and Its Applications, Wiley 1988, ch. 2);
//     for log-parametrised quantities p = exp(theta) the delta method gives
//     se(p) = p se(theta).
package extract
