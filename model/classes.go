package model

import "junco/physics"

// QuantityClasses returns the classes of the result with JSON key key: the
// kinds of result a validity flag may concern (physics.Class). Inputs and
// exact values have an empty list (they take only the flags that concern
// every result); a key that is not listed gives nil, and a test checks
// that every key Evaluate produces is listed. One table, read by the
// result's flag attachment.
func QuantityClasses(key string) []physics.Class {
	const (
		intrinsic  = physics.ClassIntrinsic
		builtIn    = physics.ClassBuiltIn
		ionisation = physics.ClassIonisation
		narrowing  = physics.ClassNarrowing
		depletion  = physics.ClassDepletion
		capacity   = physics.ClassCapacitance
		transport  = physics.ClassTransport
		lifetime   = physics.ClassLifetime
		saturation = physics.ClassSaturation
		diffusion  = physics.ClassDiffusionCurrent
		scr        = physics.ClassSCRCurrent
		current    = physics.ClassCurrent
		ideality   = physics.ClassIdeality
		junctionV  = physics.ClassJunctionVoltage
		series     = physics.ClassSeriesResistance
		forwardV   = physics.ClassForwardVoltage
		power      = physics.ClassPower
		switching  = physics.ClassSwitching
		breakdown  = physics.ClassBreakdown
		multiplier = physics.ClassMultiplication
		punch      = physics.ClassPunchThrough
		light      = physics.ClassLight
		lightAtV   = physics.ClassLightAtBias
	)
	c := func(cs ...physics.Class) []physics.Class { return cs }
	switch key {
	case "thermal_voltage_V", "band_gap_eV",
		"forward_voltage_reference_current_A", "switching_reverse_current_A",
		"contact_resistance_ohm", "shunt_resistance_ohm":
		return []physics.Class{} // inputs or exact: only flags on every result
	case "intrinsic_density_per_m3":
		return c(intrinsic)
	case "acceptor_ionised_density_per_m3", "donor_ionised_density_per_m3",
		"acceptor_ionised_fraction", "donor_ionised_fraction",
		"hole_density_p_side_per_m3", "electron_density_n_side_per_m3":
		return c(ionisation)
	case "band_gap_narrowing_p_eV", "band_gap_narrowing_n_eV":
		return c(narrowing)
	case "effective_intrinsic_density_p_per_m3", "effective_intrinsic_density_n_per_m3":
		return c(narrowing, intrinsic)
	case "built_in_potential_V", "built_in_potential_full_ionisation_V", "built_in_potential_electrostatic_V":
		return c(builtIn)
	case "gradient_voltage_V":
		return c(builtIn, depletion)
	case "majority_tail_potential_V":
		return c(depletion)
	case "junction_voltage_V":
		return c(junctionV)
	case "depletion_width_m", "depletion_width_n_m", "depletion_width_p_m", "depletion_width_textbook_m", "peak_field_V_per_m":
		return c(depletion)
	case "junction_capacitance_F", "junction_capacitance_per_area_F_per_m2", "junction_capacitance_textbook_F":
		return c(depletion, capacity)
	case "diffusion_capacitance_F":
		return c(capacity, diffusion)
	case "total_capacitance_F":
		return c(capacity, depletion, diffusion)
	case "electron_mobility_m2_per_Vs", "hole_mobility_m2_per_Vs", "electron_diffusivity_m2_per_s", "hole_diffusivity_m2_per_s":
		return c(transport)
	case "electron_lifetime_s", "hole_lifetime_s":
		return c(lifetime)
	case "electron_diffusion_length_m", "hole_diffusion_length_m":
		return c(transport, lifetime)
	case "saturation_current_density_A_per_m2", "saturation_current_A", "electron_saturation_current_A",
		"hole_saturation_current_A", "diffusion_saturation_current_A", "ideal_current_A":
		return c(saturation)
	case "diffusion_current_A", "electron_diffusion_current_A", "hole_diffusion_current_A":
		return c(diffusion, current)
	case "recombination_current_A", "generation_current_A":
		return c(scr, current)
	case "shunt_current_A", "conductance_S", "small_signal_resistance_ohm", "current_A":
		return c(current)
	case "avalanche_multiplication":
		return c(multiplier)
	case "ideality_factor":
		return c(ideality, current)
	case "dissipated_power_W":
		return c(power, current)
	case "series_resistance_ohm", "p_region_resistance_ohm", "n_region_resistance_ohm":
		return c(series)
	case "series_voltage_drop_V":
		return c(series, junctionV)
	case "forward_voltage_V", "forward_voltage_temperature_coefficient_V_per_K":
		return c(forwardV)
	case "storage_time_s", "storage_time_constant_s":
		return c(switching)
	case "breakdown_voltage_V", "avalanche_breakdown_voltage_V", "tunnelling_breakdown_voltage_V",
		"breakdown_peak_field_V_per_m", "breakdown_depletion_width_m", "tunnelling_limit_V", "breakdown_sze_gibbons_V":
		return c(breakdown)
	case "punch_through_voltage_V":
		return c(punch)
	case "photocurrent_at_bias_A", "photocurrent_gain":
		return c(light, lightAtV, multiplier)
	case "photocurrent_A", "photocurrent_p_region_A", "photocurrent_depletion_A", "photocurrent_n_region_A",
		"short_circuit_current_A", "open_circuit_voltage_V", "max_power_W", "max_power_voltage_V",
		"max_power_current_A", "fill_factor", "efficiency":
		return c(light)
	}
	return nil
}
