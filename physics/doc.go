// Package physics is junco's computational core: material parameters, carrier
// transport, recombination, junction electrostatics and diode currents.
//
// Rules that hold for every file in this package:
//
//   - SI units everywhere (m, m^-3, m^2/(V s), s, V, A, F, K). Conversions to
//     trade units (cm^-3, um, A/cm^2, pF) happen in package model only.
//   - Physical constants come from gonum.org/v1/gonum/unit/constant (CODATA
//     2018 values as published by NIST); none is typed by hand.
//   - No I/O and no UI. Functions are pure; errors a caller can meet are
//     returned as values, panics are reserved for programmer mistakes and are
//     prefixed "physics:".
//   - Every exported function's doc comment states its formula, units,
//     validity range and published source.
package physics
