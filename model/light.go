package model

import (
	"fmt"
	"math"
	"strings"

	"junco/physics"
)

// problems checks the light's fields the way Spec.Validate checks the
// others: zero means "none", anything else must lie in range, and
// monochromatic light needs its wavelength and absorption coefficient.
func (l Light) problems() []FieldError {
	var errs []FieldError
	rng := func(field string, k Kind, v, lo, hi float64, why string) {
		if v == 0 {
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) || v < lo || v > hi {
			errs = append(errs, FieldError{Field: field, Value: Format(k, v, 3, true),
				Allowed: "0 or " + Format(k, lo, 3, true) + " to " + Format(k, hi, 3, true), Why: why})
		}
	}
	rng(FieldGeneration, GenerationRate, l.Generation, 1, maxGeneration, "0 means none; far above 1e24 cm^-3 s^-1 no low-injection model applies")
	rng(FieldWavelength, Length, l.Wavelength, minWavelength, maxWavelength, "from the far ultraviolet to the mid infrared")
	rng(FieldLightPower, PowerDensity, l.PowerDensity, 1e-9, maxPowerDensity, "0 means no monochromatic light; 10 kW/cm^2 is far beyond low injection")
	rng(FieldAbsorption, Absorption, l.Absorption, 1e-6, maxAbsorption, "the absorption coefficient of the light in the semiconductor")
	rng(FieldIrradiance, PowerDensity, l.Irradiance, 1e-9, maxPowerDensity, "0 takes the monochromatic light's power density")
	switch l.Side {
	case "", "p", "n":
	default:
		errs = append(errs, FieldError{Field: FieldIlluminatedSide, Value: fmt.Sprintf("%q", l.Side), Allowed: "p, n", Why: "the surface the light enters"})
	}
	if l.PowerDensity > 0 {
		if l.Wavelength == 0 {
			errs = append(errs, FieldError{Field: FieldWavelength, Value: "none", Allowed: Format(Length, minWavelength, 3, true) + " to " + Format(Length, maxWavelength, 3, true),
				Why: "monochromatic light (a light power) needs its wavelength"})
		}
		if l.Absorption == 0 {
			errs = append(errs, FieldError{Field: FieldAbsorption, Value: "none", Allowed: "above 0", Why: "monochromatic light needs its absorption coefficient in the semiconductor (no table ships with junco)"})
		}
	}
	return errs
}

// Physics converts the light into the physics description: the photon flux
// of the monochromatic light from its power density and wavelength.
func (l Light) Physics() physics.Light {
	pl := physics.Light{Generation: l.Generation, FromN: l.Side == "n"}
	if l.PowerDensity > 0 && l.Wavelength > 0 && l.Absorption > 0 {
		pl.PhotonFlux = physics.PhotonFluxOf(l.PowerDensity, l.Wavelength)
		pl.Absorption = l.Absorption
	}
	return pl
}

// litQuantities are the results of a lit junction (none in the dark): the
// photocurrent collected at short circuit by region, the photocurrent at
// the bias p with its avalanche gain (physics.Point.Photo, PhotoGain:
// multiplied in reverse bias near breakdown, IL at zero and forward bias),
// and the figures of merit of the lit I-V curve
// (physics.Static.LitFigures, all read at zero and forward bias, so never
// multiplied); the efficiency needs an irradiance.
func litQuantities(s Spec, st *physics.Static, p physics.Point) []Quantity {
	if !(st.IL > 0) {
		return nil
	}
	nan := math.NaN()
	f, err := st.LitFigures()
	if err != nil {
		f = physics.LitFigures{Isc: nan, Voc: nan, Pmax: nan, Vmp: nan, Imp: nan, FF: nan}
	}
	eff := nan
	if err == nil {
		eff = efficiencyOf(s, f.Pmax)
	}
	return append([]Quantity{
		{"photocurrent_A", GroupLight, "photocurrent", "IL", Current, st.IL, nil},
		{"photocurrent_p_region_A", GroupLight, "  collected from the p region", "IL,p", Current, st.Photo.P, nil},
		{"photocurrent_depletion_A", GroupLight, "  from the depletion region", "IL,dep", Current, st.Photo.Depletion, nil},
		{"photocurrent_n_region_A", GroupLight, "  collected from the n region", "IL,n", Current, st.Photo.N, nil},
		{"photocurrent_at_bias_A", GroupLight, "photocurrent at bias (avalanche-multiplied)", "IL(V)", Current, p.Photo, nil},
		{"photocurrent_gain", GroupLight, "  avalanche gain IL(V)/IL", "M_ph", Dimensionless, p.PhotoGain, nil},
	}, litFigureQuantities(f, eff)...)
}

// litFigureQuantities are the figures of merit of a lit I-V curve as
// results (the analytic and the numeric results share them).
func litFigureQuantities(f physics.LitFigures, eff float64) []Quantity {
	return []Quantity{
		{"short_circuit_current_A", GroupLight, "short-circuit current", "Isc", Current, f.Isc, nil},
		{"open_circuit_voltage_V", GroupLight, "open-circuit voltage", "Voc", Voltage, f.Voc, nil},
		{"max_power_W", GroupLight, "maximum power delivered", "Pmax", Power, f.Pmax, nil},
		{"max_power_voltage_V", GroupLight, "  at voltage", "Vmp", Voltage, f.Vmp, nil},
		{"max_power_current_A", GroupLight, "  at current", "Imp", Current, f.Imp, nil},
		{"fill_factor", GroupLight, "fill factor", "FF", Dimensionless, f.FF, nil},
		{"efficiency", GroupLight, "power conversion efficiency", "eta", Dimensionless, eff, nil},
	}
}

// efficiencyOf returns the power conversion efficiency Pmax / (irradiance
// area) of the Spec's light (NaN without an irradiance).
func efficiencyOf(s Spec, pmax float64) float64 {
	if irr := s.Light.IrradianceOrDefault(); irr > 0 {
		return pmax / (irr * s.Area)
	}
	return math.NaN()
}

// ParseLightPair reads monochromatic light written WAVELENGTH:POWER_DENSITY,
// e.g. "650nm:100mW/cm2", into SI (m, W/m^2); a bare wavelength is in um
// and a bare power density in mW/cm^2 (the kinds' trade units).
func ParseLightPair(text string) (wavelength, power float64, err error) {
	parts := strings.Split(text, ":")
	if len(parts) != 2 {
		return 0, 0, fmt.Errorf("%q: want WAVELENGTH:POWER_DENSITY, e.g. 650nm:100mW/cm2", text)
	}
	if wavelength, err = ParseValue(Length, parts[0]); err != nil {
		return 0, 0, err
	}
	if power, err = ParseValue(PowerDensity, parts[1]); err != nil {
		return 0, 0, err
	}
	return wavelength, power, nil
}

// PowerCurve is the power a junction delivers against bias, -V I(V) in W
// (positive where a lit junction works as a generator), from the lit I-V
// (IVCurve's total current). In the dark it is -V I, never positive.
func PowerCurve(s Spec, r Range) (Curve, error) {
	iv, err := IVCurve(s, r)
	if err != nil {
		return Curve{}, err
	}
	tot := iv.Series[0].Y
	p := make([]float64, len(tot))
	for i, v := range iv.Xs {
		p[i] = -v * tot[i]
	}
	return Curve{ID: "power", Title: "Power delivered against bias (lit junction: generator where positive)",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "power delivered -V I", Kind: Power},
		Xs: iv.Xs, Series: []Series{{"delivered", p}}, Flags: iv.Flags}, nil
}
