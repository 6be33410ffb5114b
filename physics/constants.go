package physics

import (
	"math"

	"gonum.org/v1/gonum/unit/constant"
)

// Physical constants used by the package, taken from gonum's CODATA 2018 set.
const (
	// Q is the elementary charge q in C (exact; CODATA 2018 via gonum).
	Q = float64(constant.ElementaryCharge)
	// KB is the Boltzmann constant k in J/K (exact; CODATA 2018 via gonum).
	KB = float64(constant.Boltzmann)
	// Eps0 is the vacuum permittivity epsilon_0 in F/m (gonum's
	// ElectricConstant, 8.854187817620389e-12; 5e-10 relative from the
	// CODATA 2018 value, negligible here).
	Eps0 = float64(constant.ElectricConstant)
)

// ThermalVoltage returns kT/q in volts at temperature t in kelvin.
//
// Formula: Vt = k T / q. Units: T in K, result in V. Valid for any T > 0.
// Source: definition (Sze & Ng, Physics of Semiconductor Devices, 3rd ed.,
// 2007, ch. 1). At 300 K it is 0.0258520 V.
func ThermalVoltage(t float64) float64 { return KB * t / Q }

// ThermalEnergyEV returns kT expressed in electron-volts at t kelvin.
//
// Formula: kT/q in eV (numerically equal to ThermalVoltage). Units: K -> eV.
func ThermalEnergyEV(t float64) float64 { return ThermalVoltage(t) }

// Finite reports whether x is neither NaN nor infinite: the one check
// every package uses for a value that must be a real number.
func Finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
