package physics

import (
	"fmt"
	"math"
)

// prepareEffects fills the bias-independent parts of the non-ideal
// effects: ionisation, band-gap narrowing, the regions as the diffusion
// model sees them, the depletion-region recombination parameters, the
// resistances and the breakdown. With every effect off the results equal
// the ideal model's.
func (s *Static) prepareEffects() error {
	d := s.Device
	m := d.Material
	t := d.Temperature
	e := d.Effects
	s.Effects = e
	da, _ := m.Dopant(d.AcceptorSpecies)
	dd, _ := m.Dopant(d.DonorSpecies)
	s.AcceptorLevel = m.DopantLevelFor(da, d.Na, e.IonisationModel)
	s.DonorLevel = m.DopantLevelFor(dd, d.Nd, e.IonisationModel)
	s.P0, s.N0 = s.P.Doping, s.N.Doping // majority densities with ni (MajorityDensity)
	s.NaIonised, s.NdIonised = d.Na, d.Nd
	s.VbiFullIonisation = s.Vbi
	if e.Ionisation {
		s.P0, s.NaIonised = IonisedDensity(d.Na, s.AcceptorLevel, m.Nv(t), s.Ni, t)
		s.N0, s.NdIonised = IonisedDensity(d.Nd, s.DonorLevel, m.Nc(t), s.Ni, t)
		s.Vbi = s.VbiFullIonisation + s.Vt*math.Log(s.P0*s.N0/(s.P.Doping*s.N.Doping))
		if !(s.Vbi > 0) {
			return fmt.Errorf("with incomplete ionisation at %g K the built-in potential is %.3g V: no junction forms", t, s.Vbi)
		}
		for _, c := range []struct {
			n  float64
			lv DopantLevel
			sp string
		}{{d.Na, s.AcceptorLevel, d.AcceptorSpecies}, {d.Nd, s.DonorLevel, d.DonorSpecies}} {
			if e.IonisationModel == IonisationSingleLevel && c.n > 0.1*c.lv.MottDensity {
				what := "the single dopant level overstates freeze-out near it"
				if c.n >= c.lv.MottDensity {
					what = "the dopants are taken as a band, fully ionised"
				}
				s.Flags = append(s.Flags, Flag{FlagMottTransition, []Class{ClassIonisation, ClassBuiltIn},
					fmt.Sprintf("%s at %.3g cm^-3 is near or above its Mott density %.3g cm^-3: %s", c.sp, c.n/perCm3, c.lv.MottDensity/perCm3, what)})
			}
		}
		fa, fd := s.NaIonised/d.Na, s.NdIonised/d.Nd
		if fa < 0.9 || fd < 0.9 {
			s.Flags = append(s.Flags, Flag{FlagIncompleteIon, []Class{ClassBuiltIn, ClassIonisation, ClassDiffusionCurrent, ClassSeriesResistance},
				fmt.Sprintf("incomplete ionisation: %.0f%% of the acceptors and %.0f%% of the donors are ionised at %g K (Fermi-Dirac occupation of the dopant levels, %s model)", 100*fa, 100*fd, t, e.IonisationModel)})
		}
	}
	s.NiEffP, s.NiEffN = s.Ni, s.Ni
	if e.BGN {
		var ok bool
		s.DEgP, ok = BandGapNarrowing(m, e.BGNModel, d.Na)
		s.DEgN, _ = BandGapNarrowing(m, e.BGNModel, d.Nd)
		s.BGNKnown = ok
		s.NiEffP = s.Ni * math.Exp(s.DEgP/(2*s.Vt))
		s.NiEffN = s.Ni * math.Exp(s.DEgN/(2*s.Vt))
		switch {
		case !ok && math.Max(d.Na, d.Nd) > 1e17*perCm3:
			s.Flags = append(s.Flags, Flag{FlagBGNModel, []Class{ClassDiffusionCurrent, ClassNarrowing, ClassSaturation},
				fmt.Sprintf("no band-gap narrowing parameters for %s: heavy doping is treated with ni_eff = ni", m.Name)})
		case ok && (t < bgnTMin || t > bgnTMax):
			s.Flags = append(s.Flags, Flag{FlagBGNModel, []Class{ClassDiffusionCurrent, ClassNarrowing, ClassSaturation},
				fmt.Sprintf("band-gap narrowing fitted near 300 K is applied unchanged at %g K (trusted %g-%g K)", t, bgnTMin, bgnTMax)})
		}
	}
	s.VbiNoBGN = s.Vbi
	if e.BGN {
		// Electrostatic built-in potential with band-gap narrowing, each
		// region's narrowing split evenly between its band edges:
		// Vbi = Vt ln(p0 n0/(ni,eff,p ni,eff,n)) = VbiNoBGN - (dEg,p + dEg,n)/2.
		// Only the majority band's shift enters the electrostatic
		// potential, half the narrowing under this split (the split is an
		// assumption; published splits differ). The graded junction takes
		// the narrowing at the doping of its zero-bias depletion edges.
		dp, dn := s.DEgP, s.DEgN
		if d.Profile == LinearGraded {
			dep0 := s.Junction.Solve(s.Vbi, 0)
			dp, _ = BandGapNarrowing(m, e.BGNModel, math.Abs(s.Junction.NetDoping(-dep0.Xp)))
			dn, _ = BandGapNarrowing(m, e.BGNModel, math.Abs(s.Junction.NetDoping(dep0.Xn)))
		}
		s.Vbi -= (dp + dn) / 2
		if !(s.Vbi > 0) {
			return fmt.Errorf("with band-gap narrowing at %g K the built-in potential is %.3g V: no junction forms", t, s.Vbi)
		}
	}
	// Majority-carrier tails: 2kT/q for the step junction; the gradient
	// voltage of Chawla & Gummel for the graded one (bounded so that the
	// depleted drop never exceeds Vbi - 2kT/q, the step junction's value,
	// which the graded junction approaches when its edges reach the
	// plateaus; this bound is junco's own interpolation).
	s.Tail, s.GradientVoltage = 2*s.Vt, math.NaN()
	if d.Profile == LinearGraded {
		s.GradientVoltage = GradientVoltage(d.Gradient, s.Junction.Eps, s.Ni, t) - (s.VbiNoBGN - s.Vbi)
		s.Tail = s.Vbi - math.Min(s.GradientVoltage, s.Vbi-2*s.Vt)
	}
	pq, nq := s.P, s.N
	pq.Doping, nq.Doping = s.P0, s.N0
	if e.BGN {
		// The majority density consistent with ni_eff (it differs from P0,
		// N0 only near intrinsic conditions, where it keeps n0 >= ni_eff).
		maj := func(ion, ni float64) float64 { return ion/2 + math.Sqrt(ion*ion/4+ni*ni) }
		pq.Doping, nq.Doping = maj(s.NaIonised, s.NiEffP), maj(s.NdIonised, s.NiEffN)
	}
	s.PEff = DiffusionSide{QuasiNeutral: pq, NiEff: s.NiEffP}
	s.NEff = DiffusionSide{QuasiNeutral: nq, NiEff: s.NiEffN}
	s.IsDiffN = pq.SaturationCurrentDensity(s.NiEffP) * d.Area
	s.IsDiffP = nq.SaturationCurrentDensity(s.NiEffN) * d.Area
	s.IsDiff = s.IsDiffN + s.IsDiffP

	// Depletion-region SRH lifetimes: the user's lifetimes, else the SRH
	// parts of the defaults (Auger and radiative need majority carriers).
	tn, tp := s.TauNParts.SRH, s.TauPParts.SRH
	if d.TauN > 0 {
		tn = d.TauN
	}
	if d.TauP > 0 {
		tp = d.TauP
	}
	n0 := math.Exp(2*math.Log(s.Ni) + s.VbiNoBGN/s.Vt - math.Log(s.P0))
	if math.IsInf(n0, 0) || math.IsNaN(n0) || n0 <= 0 {
		n0 = s.N0
	}
	s.SCR = SCRParams{Ni: s.Ni, P0: s.P0, N0: n0, TauN: tn, TauP: tp, Vt: s.Vt, Local: s.localLifetimes()}
	if e.SRH && (t < 200 || t > 400) {
		s.Flags = append(s.Flags, Flag{FlagLifetimeTemp, []Class{ClassSCRCurrent, ClassLifetime},
			fmt.Sprintf("lifetimes are taken as temperature independent; at %g K they are an extrapolation of room-temperature values (trusted 200-400 K)", t)})
	}

	// Resistances.
	s.Rsh = math.Inf(1)
	if d.ShuntResistance > 0 {
		s.Rsh = d.ShuntResistance
	}
	var assumedP, assumedN bool
	s.ResThicknessP, assumedP = layerLength(d.Wp, d.PThickness)
	s.ResThicknessN, assumedN = layerLength(d.Wn, d.NThickness)
	s.RP = RegionResistance(s.ResThicknessP, d.Area, s.P0, s.MuMajP)
	s.RN = RegionResistance(s.ResThicknessN, d.Area, s.N0, s.MuMajN)
	s.RContact = d.ContactResistance
	if e.SeriesResistance {
		s.Rs = s.RP + s.RN + s.RContact
	}
	if (e.SeriesResistance || e.Breakdown) && (assumedP || assumedN) {
		s.Flags = append(s.Flags, Flag{FlagAssumedThickness, []Class{ClassSeriesResistance, ClassPunchThrough, ClassForwardVoltage},
			fmt.Sprintf("a long region is taken as %.0f um thick for its resistance and punch-through (set the thickness to change it)", defaultLayerThickness*1e6)})
	}

	s.Breakdown = Breakdown{Voltage: math.NaN(), PeakField: math.NaN(), Width: math.NaN(), Xp: math.NaN(), Xn: math.NaN(),
		PunchThroughVoltage: math.NaN(), TunnellingLimit: 4 * s.Eg, SzeGibbons: math.NaN(),
		AvalancheVoltage: math.NaN(), TunnellingVoltage: math.NaN(), Effective: math.NaN()}
	if e.Breakdown {
		s.computeBreakdown()
	}
	return nil
}

// localLifetimes returns the SRH lifetimes of the depletion region at
// position x, tau(N(x)): the doping-dependent SRH part of the default
// lifetime (Material.MinorityLifetime) at the local total doping |N(x)|,
// or the user's lifetime where one is given (then the same everywhere,
// as the user gives one number per carrier). A step junction has one pair
// per side. The depletion region of a one-sided junction lies in the
// lightly doped side, so its generation takes that side's lifetimes, not
// the heavily doped side's.
func (s *Static) localLifetimes() func(x float64) (float64, float64) {
	d := s.Device
	m := d.Material
	at := func(n float64) (float64, float64) {
		tn, tp := m.MinorityLifetime(Electron, n).SRH, m.MinorityLifetime(Hole, n).SRH
		if d.TauN > 0 {
			tn = d.TauN
		}
		if d.TauP > 0 {
			tp = d.TauP
		}
		return tn, tp
	}
	if d.Profile == Abrupt {
		tnP, tpP := at(d.Na)
		tnN, tpN := at(d.Nd)
		return func(x float64) (float64, float64) {
			if x < 0 {
				return tnP, tpP
			}
			return tnN, tpN
		}
	}
	j := s.Junction
	return func(x float64) (float64, float64) { return at(math.Abs(j.NetDoping(x))) }
}

// layerLength returns the length of a region used for its resistance: the
// quasi-neutral width when finite, else the given thickness, else the
// default (assumed = true).
func layerLength(w, thick float64) (float64, bool) {
	switch {
	case !math.IsInf(w, 1):
		return w, false
	case thick > 0:
		return thick, false
	}
	return defaultLayerThickness, true
}

// computeBreakdown runs the avalanche breakdown search of the junction
// (Breakdown) with layer thicknesses from the junction to the contacts:
// quasi-neutral width plus the zero-bias depletion depth for finite
// regions, else the given or assumed thickness.
func (s *Static) computeBreakdown() {
	d := s.Device
	m := d.Material
	t := d.Temperature
	b := &s.Breakdown
	im, ok := ImpactModelFor(m)
	if !ok {
		s.Flags = append(s.Flags, Flag{FlagBreakdownNotFound, []Class{ClassBreakdown}, "no impact-ionisation model for " + m.Name})
		return
	}
	b.Model = im.Source
	dep0 := s.Junction.Solve(s.Vbi, 0)
	thick := func(w, given, x0 float64) (float64, bool) {
		switch {
		case !math.IsInf(w, 1):
			return w + x0, false
		case given > 0:
			return given, false
		}
		return defaultLayerThickness, true
	}
	b.ThicknessP, b.AssumedP = thick(d.Wp, d.PThickness, dep0.Xp)
	b.ThicknessN, b.AssumedN = thick(d.Wn, d.NThickness, dep0.Xn)
	a := &avalanche{j: s.Junction, c: im.at(t), thickP: b.ThicknessP, thickN: b.ThicknessN, vbi: s.Vbi}
	nb := d.Na * d.Nd / (d.Na + d.Nd)
	sg := SzeGibbonsBreakdown(d.Profile, s.Eg, nb, d.Gradient)
	if SzeGibbonsFitted(m.Key) {
		b.SzeGibbons = sg
	}
	// First guess of the peak field from the Sze-Gibbons voltage (only a
	// starting point of the search, so it serves outside its materials).
	guess := math.Sqrt(2 * Q * nb * sg / s.Junction.Eps)
	if d.Profile == LinearGraded {
		guess = 1.5 * sg / math.Cbrt(12*s.Junction.Eps*sg/(Q*d.Gradient))
	}
	if !(guess > 0) || math.IsInf(guess, 0) {
		guess = 3e7
	}
	e0, it, conv := a.searchBreakdown(guess)
	b.Iterations, b.Converged = it, conv
	if !conv || math.IsNaN(e0) {
		s.Flags = append(s.Flags, Flag{FlagBreakdownNotFound, []Class{ClassBreakdown}, "the breakdown search did not converge"})
		return
	}
	vr, w, up, un := a.reverse(e0)
	b.Voltage, b.PeakField, b.Width, b.Xp, b.Xn = vr, e0, w, up, un
	b.AvalancheVoltage, b.Effective = vr, vr
	s.aval = a
	if et := TunnellingField(s.Eg); et < e0 {
		if vt, _, _, _ := a.reverse(et); vt > 0 {
			b.TunnellingVoltage = vt
			b.Effective = math.Min(vr, vt)
			s.Flags = append(s.Flags, Flag{FlagTunnelling, []Class{ClassBreakdown},
				fmt.Sprintf("the peak field reaches the tunnelling field %.3g V/cm at %.3g V reverse, before avalanche at %.3g V: Zener breakdown comes first", et/100, vt, vr)})
		} else {
			b.TunnellingVoltage, b.Effective = 0, 0
		}
	}
	// Punch-through: a natural depletion edge beyond its layer at breakdown.
	k := Q / s.Junction.Eps
	vpt := math.Inf(1)
	if s.Junction.sideEdge(e0/k, d.Na) > b.ThicknessP {
		v, _, _, _ := a.reverse(k * s.Junction.sideCharge(b.ThicknessP, d.Na))
		vpt = math.Min(vpt, v)
	}
	if s.Junction.sideEdge(e0/k, d.Nd) > b.ThicknessN {
		v, _, _, _ := a.reverse(k * s.Junction.sideCharge(b.ThicknessN, d.Nd))
		vpt = math.Min(vpt, v)
	}
	if !math.IsInf(vpt, 1) {
		b.PunchThrough = true
		b.PunchThroughVoltage = math.Max(vpt, 0)
		msg := fmt.Sprintf("punch-through: the depletion region reaches a contact at %.4g V reverse, before avalanche; breakdown of the punched-through layer at %.4g V", b.PunchThroughVoltage, vr)
		if (b.AssumedP && up >= b.ThicknessP) || (b.AssumedN && un >= b.ThicknessN) {
			msg += fmt.Sprintf(" (with the assumed %.0f um layer)", defaultLayerThickness*1e6)
		}
		s.Flags = append(s.Flags, Flag{FlagPunchThrough, []Class{ClassBreakdown, ClassPunchThrough}, msg})
	}
	switch {
	case vr < 4*s.Eg:
		b.Tunnelling = true
		s.Flags = append(s.Flags, Flag{FlagTunnelling, []Class{ClassBreakdown},
			fmt.Sprintf("avalanche estimate %.3g V is below 4 Eg/q = %.3g V: Zener tunnelling dominates and sets a lower breakdown voltage (Sze & Ng 2007)", vr, 4*s.Eg)})
	case vr < 6*s.Eg:
		b.Mixed = true
		s.Flags = append(s.Flags, Flag{FlagTunnelling, []Class{ClassBreakdown},
			fmt.Sprintf("breakdown %.3g V lies between 4 and 6 Eg/q: tunnelling and avalanche both contribute and the avalanche estimate is an upper bound (Sze & Ng 2007)", vr)})
	}
	if im.TempLawCheck == "" && math.Abs(t-300) > 10 {
		s.Flags = append(s.Flags, Flag{FlagBreakdownTemperature, []Class{ClassBreakdown, ClassMultiplication},
			fmt.Sprintf("breakdown at %g K: the temperature law of the %s impact-ionisation coefficients is not checked against measured breakdown voltages (for Si it gives about +0.2 %%/K, perhaps twice the measured coefficient)", t, m.Name)})
	}
	if t < im.TMin || t > im.TMax {
		s.Flags = append(s.Flags, Flag{FlagImpactRange, []Class{ClassBreakdown, ClassMultiplication},
			fmt.Sprintf("impact-ionisation coefficients extrapolated to %g K (trusted %g-%g K)", t, im.TMin, im.TMax)})
	}
	if e0 < im.EMin || e0 > im.EMax {
		s.Flags = append(s.Flags, Flag{FlagImpactRange, []Class{ClassBreakdown, ClassMultiplication},
			fmt.Sprintf("peak field at breakdown %.3g V/cm lies outside the %.3g-%.3g V/cm of the impact-ionisation data", e0/100, im.EMin/100, im.EMax/100)})
	}
}

// jstate is the junction branch (diffusion, depletion region, shunt) at
// one junction voltage.
type jstate struct {
	dn, dp, gdn, gdp float64 // electron and hole diffusion currents (A), unmultiplied, and dI/dVj (S)
	pen, pep         float64 // excess minority densities at the p and n edges, m^-3
	scr, gscr        float64 // depletion-region SRH current (A) and its derivative
	mn, mp, mg, mb   float64 // avalanche multiplication factors (Multiplication)
	capped           bool    // a factor reached MaxMultiplication
	sh               float64 // shunt current, A
	ph               float64 // photocurrent, A (taken from the total)
	i, g             float64 // total current and derivative
	beyond           bool    // at or beyond breakdown
}

// junction evaluates the junction branch at junction voltage vj.
func (s *Static) junction(vj float64) jstate {
	e := s.Effects
	a := s.Device.Area
	vt := s.Vt
	st := jstate{mn: 1, mp: 1, mg: 1, mb: 1}
	hli := e.HighInjection
	side := func(r DiffusionSide) (float64, float64, float64) {
		j, pe := r.CurrentDensity(vj, vt, hli)
		var g float64
		if hli {
			const h = 1e-6
			jp, _ := r.CurrentDensity(vj+h, vt, hli)
			jm, _ := r.CurrentDensity(vj-h, vt, hli)
			g = (jp - jm) / (2 * h)
		} else {
			g = (j + Q*r.Diffusivity*r.NiEff*r.NiEff/(r.Doping*r.DiffusionLength())*GeometryFactor(r.Width, r.DiffusionLength(), r.Recombination, r.Diffusivity)) / vt
		}
		return j * a, g * a, pe
	}
	st.dn, st.gdn, st.pen = side(s.PEff)
	st.dp, st.gdp, st.pep = side(s.NEff)
	var dep Depletion
	if e.SRH {
		// The SNS integral is written with ni and the carrier densities of
		// the plain depletion approximation, which its own tails complete:
		// it takes VbiNoBGN and no tail correction.
		vg := math.Min(vj, s.VbiNoBGN-2*vt)
		dep = s.Junction.Solve(s.VbiNoBGN, vg)
		j, dj := SCRCurrentDensity(dep, vj, s.SCR)
		st.scr, st.gscr = j*a, dj*a
	}
	var dm [4]float64
	if e.Breakdown && s.aval != nil && vj < 0 {
		vr := -vj
		guess := dep.PeakField
		if !(guess > 0) {
			guess = s.Junction.Solve(s.Vbi, vj).PeakField
		}
		m, ok := s.multiplicationFrom(vr, guess)
		if !ok {
			st.beyond = true
			st.i, st.g = math.Inf(-1), math.Inf(1)
			return st
		}
		st.mn, st.mp, st.mg, st.mb, st.capped = m.Mn, m.Mp, m.Mgen, m.Mbeam, m.Capped
		if m.Mn > 1.2 || m.Mp > 1.2 {
			// Derivative of the multiplication, by a forward difference
			// towards zero bias (it matters only near breakdown; a capped
			// factor has none).
			h := 1e-3 * (s.Breakdown.Voltage - vr)
			if m1, ok2 := s.multiplicationFrom(vr-h, m.PeakField); ok2 {
				dm = [4]float64{(m.Mn - m1.Mn) / h, (m.Mp - m1.Mp) / h, (m.Mgen - m1.Mgen) / h, (m.Mbeam - m1.Mbeam) / h}
			}
		}
	}
	if !math.IsInf(s.Rsh, 1) {
		st.sh = vj / s.Rsh
	}
	// The photocurrent is multiplied like the dark current of the same
	// carriers (multipliedPhoto); with all factors 1 it is IL exactly.
	st.ph = s.IL
	if st.mn != 1 || st.mp != 1 || st.mg != 1 || st.mb != 1 {
		st.ph = s.multipliedPhoto(Multiplication{Mn: st.mn, Mp: st.mp, Mgen: st.mg, Mbeam: st.mb})
	}
	st.i = st.mn*st.dn + st.mp*st.dp + st.mg*st.scr + st.sh - st.ph
	// dM/dVj = -dM/dVr; the photocurrent enters with a minus sign.
	st.g = st.mn*st.gdn + st.mp*st.gdp + st.mg*st.gscr - (dm[0]*st.dn + dm[1]*st.dp + dm[2]*st.scr) +
		(dm[0]*s.Photo.P + dm[1]*s.Photo.N + dm[2]*s.photoDepUniform + dm[3]*s.photoDepBeam)
	if !math.IsInf(s.Rsh, 1) {
		st.g += 1 / s.Rsh
	}
	return st
}

// Solve returns the currents at terminal bias v (V): the junction voltage
// Vj solving V = Vj + I(Vj) Rs (solveJunction: a Lambert-W start and
// bisection-safeguarded Newton iteration, which converges for every bias
// and every Rs >= 0), and the current components at Vj. Unlike At it
// skips the electrostatics and the small-signal quantities, for sweeps.
// Beyond the avalanche breakdown with Rs = 0 the current is -Inf and
// flagged; with Rs > 0 the junction clamps just below breakdown and the
// resistance sets the current.
func (s *Static) Solve(v float64) Point { return s.SolveFrom(v, math.NaN()) }

// SolveFrom is Solve with a first estimate of the junction voltage (for
// example extrapolated from the previous points of a sweep); NaN selects
// the default start (the Lambert-W solution of the diffusion current).
func (s *Static) SolveFrom(v, guess float64) Point {
	p := Point{V: v, Mn: 1, Mp: 1, Mgen: 1, Mbeam: 1, PhotoGain: 1, Ideality: math.NaN(), Conductance: math.NaN(),
		DiffusionCap: math.NaN(), TotalCap: math.NaN()}
	e := math.Expm1(v / s.Vt)
	p.IdealN, p.IdealP = s.IsN*e, s.IsP*e
	p.IdealCurrent = s.Is * e
	if !s.Effects.Any() && math.IsInf(s.Rsh, 1) {
		p.Vj = v
		p.Photo = s.IL
		p.Current = p.IdealCurrent - s.IL
		p.DiffusionN, p.DiffusionP, p.Diffusion = p.IdealN, p.IdealP, p.IdealCurrent
		p.Converged = true
		p.Power = math.Abs(v * p.Current)
		p.InjectionP = s.Ni * s.Ni / (s.P0 * s.P0) * e
		p.InjectionN = s.Ni * s.Ni / (s.N0 * s.N0) * e
		return p
	}
	rs := s.Rs
	vj := v
	p.Converged = true
	var st jstate
	have := false
	if rs > 0 {
		vmin := math.Inf(-1)
		if s.aval != nil && s.Effects.Breakdown {
			vmin = -s.Breakdown.Voltage
		}
		if math.IsNaN(guess) {
			guess = v
			if v > 0 && s.IsDiff > 0 && s.IL == 0 {
				guess = lambertGuess(s.IsDiff, rs, s.Vt, v)
			}
		}
		var it int
		var last jstate
		lastX := math.NaN()
		vj, it, p.Converged = solveJunction(v, rs, vmin, s.IL, guess, func(x float64) (float64, float64) {
			last, lastX = s.junction(x), x
			return last.i, last.g
		})
		p.Iterations = it
		switch dx := vj - lastX; {
		case dx == 0:
			st, have = last, true
		case math.Abs(dx) <= linearStep:
			// The last Newton step was tiny: correct the evaluated state
			// linearly (relative error about (dx/Vt)^2 plus the derivative error times dx/Vt, below 1e-6) instead of
			// evaluating again.
			st, have = last, true
			gsh := 0.0
			if !math.IsInf(s.Rsh, 1) {
				gsh = 1 / s.Rsh
			}
			if den := st.i - st.sh + st.ph; den != 0 && !math.IsInf(den, 0) {
				k := 1 + (st.g-gsh)*dx/den
				st.dn *= k
				st.dp *= k
				st.scr *= k
			}
			st.sh += gsh * dx
			st.i += st.g * dx
		}
	}
	if !have {
		st = s.junction(vj)
	}
	p.Vj = vj
	if st.beyond {
		p.Current = math.Inf(-1)
		if rs > 0 {
			p.Current = (v - vj) / rs
		}
		p.Flags = append(p.Flags, Flag{FlagBeyondBreakdown, []Class{ClassCurrent, ClassPower, ClassLightAtBias, ClassMultiplication},
			fmt.Sprintf("reverse bias at or beyond the avalanche breakdown (%.4g V): the current is set by the external circuit", s.Breakdown.Voltage)})
		p.Diffusion, p.DiffusionN, p.DiffusionP = math.NaN(), math.NaN(), math.NaN()
		p.Recombination, p.Generation, p.Shunt = math.NaN(), math.NaN(), math.NaN()
		p.Mn, p.Mp, p.Mgen, p.Mbeam = math.Inf(1), math.Inf(1), math.Inf(1), math.Inf(1)
		p.PhotoGain = math.NaN()
	} else {
		p.Mn, p.Mp, p.Mgen, p.Mbeam = st.mn, st.mp, st.mg, st.mb
		p.MultiplicationCapped = st.capped
		p.DiffusionN, p.DiffusionP = st.mn*st.dn, st.mp*st.dp
		p.Diffusion = p.DiffusionN + p.DiffusionP
		scr := st.mg * st.scr
		if scr >= 0 {
			p.Recombination = scr
		} else {
			p.Generation = scr
		}
		p.Shunt = st.sh
		p.Photo = st.ph
		p.Current = st.i
		// Near breakdown or at high current the terminal form (V - Vj)/Rs
		// is the accurate one (the junction current is then extremely
		// sensitive to Vj); rescale the components to it.
		if rs > 0 && math.Abs(v-vj) > 1e-6*math.Max(1, math.Abs(v)) {
			it := (v - vj) / rs
			if st.ph != s.IL {
				// A multiplied photocurrent is as sensitive to Vj as the
				// dark current it is multiplied with: rescale both.
				if den := st.i - st.sh; den != 0 && !math.IsInf(den, 0) {
					k := (it - st.sh) / den
					p.DiffusionN *= k
					p.DiffusionP *= k
					p.Diffusion *= k
					p.Recombination *= k
					p.Generation *= k
					p.Photo *= k
				}
			} else if den := st.i - st.sh + st.ph; den != 0 && !math.IsInf(den, 0) {
				k := (it - st.sh + st.ph) / den
				p.DiffusionN *= k
				p.DiffusionP *= k
				p.Diffusion *= k
				p.Recombination *= k
				p.Generation *= k
			}
			p.Current = it
		}
		if s.IL > 0 {
			p.PhotoGain = p.Photo / s.IL
		}
	}
	p.SeriesDrop = p.Current * rs
	p.Power = math.Abs(v * p.Current)
	p.InjectionP = st.pen / s.P0
	p.InjectionN = st.pep / s.N0
	if !p.Converged {
		p.Flags = append(p.Flags, Flag{FlagNotConverged, []Class{ClassCurrent, ClassJunctionVoltage},
			fmt.Sprintf("the series-resistance solution did not converge at %.4g V", v)})
	}
	if inj := math.Max(p.InjectionP, p.InjectionN); inj > 0.1 {
		what := "modelled: the current rolls over towards ideality 2"
		if !s.Effects.HighInjection {
			what = "not modelled (high injection is off): the current is overestimated"
		}
		p.Flags = append(p.Flags, Flag{FlagHighInjection, []Class{ClassCurrent, ClassDiffusionCurrent, ClassIdeality},
			fmt.Sprintf("high injection: the injected minority density is %.2g times the doping at a depletion edge, %s", inj, what)})
	}
	if !st.beyond && s.aval != nil && s.Effects.Breakdown && v <= -s.Breakdown.Voltage {
		p.Flags = append(p.Flags, Flag{FlagBeyondBreakdown, []Class{ClassCurrent, ClassPower, ClassLightAtBias, ClassMultiplication},
			fmt.Sprintf("reverse bias beyond the avalanche breakdown (%.4g V): the junction clamps there and the series resistance and external circuit set the current", s.Breakdown.Voltage)})
	} else if !st.beyond {
		p.Flags = append(p.Flags, s.multiplicationFlags(p)...)
	}
	if rs > 0 && math.Abs(p.SeriesDrop) > 0.1*math.Abs(v) && v > 0 {
		p.Flags = append(p.Flags, Flag{FlagSeriesDominates, []Class{ClassCurrent, ClassIdeality, ClassJunctionVoltage},
			fmt.Sprintf("the series resistance drops %.3g V of the %.3g V bias", p.SeriesDrop, v)})
	}
	return p
}

// smallSignal fills the conductance, ideality and capacitances of p.
func (s *Static) smallSignal(p *Point) {
	vj := p.Vj
	h := 1e-5
	if s.aval != nil && s.Effects.Breakdown && vj < 0 {
		h = math.Min(h, 1e-3*(s.Breakdown.Voltage+vj))
	}
	a, b := s.junction(vj+h), s.junction(vj-h)
	g := (a.i - b.i) / (2 * h)
	if !(h > 0) || math.IsInf(a.i, 0) || math.IsInf(b.i, 0) {
		g = math.NaN()
	}
	p.Conductance = g / (1 + s.Rs*g)
	if s.Rs > 0 && math.IsInf(g, 1) {
		p.Conductance = 1 / s.Rs
	}
	if p.Current > 0 && p.V > 0 {
		p.Ideality = p.Current / (s.Vt * p.Conductance)
	}
	st := s.junction(vj)
	cd := 0.0
	for _, c := range []struct {
		r  DiffusionSide
		pe float64
		g  float64
	}{{s.PEff, st.pen, st.gdn}, {s.NEff, st.pep, st.gdp}} {
		d, l := c.r.effective(c.pe, s.Effects.HighInjection)
		cd += DiffusionCapacitanceFactor(c.r.Width, l, c.r.Recombination, d) * c.r.Lifetime * c.g
	}
	p.DiffusionCap = cd
	cj := p.Cap
	if vc := s.Vbi - s.Tail - 2*s.Vt; !(cj > 0) || vj > vc {
		cj = s.DepletionAt(math.Min(vj, vc)).CapPerArea * s.Device.Area
	}
	p.TotalCap = cj + cd
}

// ForwardVoltage returns the terminal voltage (V) at which the forward
// current is i (A > 0), with every enabled effect: the junction voltage
// from I_j(Vj) = i (Newton iteration on ln I_j, safeguarded by bisection
// on the monotone junction current) plus i Rs. ok is false when no such
// voltage below 100 V exists.
func (s *Static) ForwardVoltage(i float64) (v, vj float64, ok bool) {
	return s.ForwardVoltageFrom(i, math.NaN())
}

// ForwardVoltageFrom is ForwardVoltage starting from the junction-voltage
// estimate guess (NaN: the diffusion-current estimate).
func (s *Static) ForwardVoltageFrom(i, guess float64) (v, vj float64, ok bool) {
	if !(i > 0) {
		return math.NaN(), math.NaN(), false
	}
	lo, hi := 0.0, math.Inf(1)
	x := guess
	if !(x > 0) {
		x = math.Max(1e-3, s.Vt*math.Log1p(i/math.Max(s.IsDiff, 1e-300)))
	}
	li := math.Log(i)
	for it := 0; it < 200; it++ {
		st := s.junction(x)
		if st.i > i {
			hi = x
		} else {
			lo = x
		}
		nx := math.NaN()
		if st.i > 0 && st.g > 0 {
			nx = x - (math.Log(st.i)-li)*st.i/st.g
		}
		if !(nx > lo && nx < hi) {
			if math.IsInf(hi, 1) {
				nx = x + 0.25
			} else {
				nx = 0.5 * (lo + hi)
			}
		}
		if math.Abs(nx-x) <= 1e-10 || hi-lo <= 1e-10 {
			return nx + i*s.Rs, nx, true
		}
		if nx > 100 {
			return math.NaN(), math.NaN(), false
		}
		x = nx
	}
	return math.NaN(), math.NaN(), false
}
