package physics

import (
	"fmt"
	"math"
)

// Temperature dependence of the effects, for reference (each flagged
// outside its range when the effect is on):
//
//   - ionisation: kT and Nc, Nv (T^1.5) enter the Fermi-Dirac occupation;
//     valid at any temperature for non-degenerate doping;
//   - band-gap narrowing: the 300 K narrowing is used unchanged (trusted
//     200-500 K), through exp(dEg/kT) it still scales with T;
//   - depletion-region recombination: ni(T) and Vbi(T); the lifetimes are
//     the room-temperature values (trusted 200-400 K);
//   - series resistance: the majority mobility's lattice law (the mobility
//     model's range);
//   - impact ionisation: the optical-phonon law of ImpactModel (trusted over
//     the model's TMin-TMax).
//
// The materials themselves are trusted over Material.TMin-TMax (77-600 K
// for Si and GaAs).

// ForwardVoltageTemperature returns the forward voltage (V) at forward
// current i (A) at the device's temperature and its temperature
// coefficient dVF/dT (V/K), by a central difference over +-dt (K) of two
// further evaluations of the device with every enabled effect (the
// avalanche search is skipped there: it does not change the forward
// current). Typical silicon values are near -2 mV/K at moderate current
// (common practice).
func (d Device) ForwardVoltageTemperature(i, dt float64) (vf, dvdt float64, err error) {
	s, err := d.Prepare()
	if err != nil {
		return math.NaN(), math.NaN(), err
	}
	return s.forwardVoltageTemperature(i, dt)
}

func (s *Static) forwardVoltageTemperature(i, dt float64) (vf, dvdt float64, err error) {
	vf, vj, ok := s.ForwardVoltage(i)
	if !ok {
		return math.NaN(), math.NaN(), fmt.Errorf("no forward voltage below 100 V carries %g A", i)
	}
	return vf, s.temperatureCoefficient(i, dt, vj), nil
}

// temperatureCoefficient returns dVF/dT (V/K) at current i by a central
// difference over +-dt, NaN when a neighbour fails.
func (s *Static) temperatureCoefficient(i, dt, vj0 float64) float64 {
	at := func(t float64) (float64, error) {
		d := s.Device
		d.Temperature = t
		d.Effects.Breakdown = false
		st, err := d.Prepare()
		if err != nil {
			return math.NaN(), err
		}
		// Start from the junction voltage at the central temperature
		// shifted by a typical -2 mV/K.
		v, _, ok := st.ForwardVoltageFrom(i, vj0-2e-3*(t-s.Device.Temperature))
		if !ok {
			return math.NaN(), fmt.Errorf("no forward voltage at %g K", t)
		}
		return v, nil
	}
	vp, err := at(s.Device.Temperature + dt)
	if err != nil {
		return math.NaN()
	}
	vm, err := at(s.Device.Temperature - dt)
	if err != nil {
		return math.NaN()
	}
	return (vp - vm) / (2 * dt)
}

// ForwardTemperatureResult collects VF, its junction voltage and dVF/dT at
// one forward current.
type ForwardTemperatureResult struct {
	VF, Vj, DVFDT float64
	OK            bool
}

// ForwardAndCoefficient returns VF and Vj at forward current i and dVF/dT
// over +-dt (K) in one call (the junction voltage serves StorageTimeAt).
func (s *Static) ForwardAndCoefficient(i, dt float64) ForwardTemperatureResult {
	vf, vj, ok := s.ForwardVoltage(i)
	if !ok {
		return ForwardTemperatureResult{math.NaN(), math.NaN(), math.NaN(), false}
	}
	return ForwardTemperatureResult{vf, vj, s.temperatureCoefficient(i, dt, vj), true}
}

// ForwardVoltageTemperature returns VF at current i and dVF/dT for the
// prepared device (see Device.ForwardVoltageTemperature).
func (s *Static) ForwardVoltageTemperature(i, dt float64) (vf, dvdt float64, err error) {
	return s.forwardVoltageTemperature(i, dt)
}
