package physics

import "math"

// KingstonStorageTime returns the storage time ts (s) of a long-base diode
// switched from forward current iF to reverse current iR (both A > 0) with
// minority lifetime tau (s): the time for which the reverse current stays
// at iR while the stored charge at the junction is removed.
//
// Formula: erf(sqrt(ts/tau)) = iF/(iF + iR). Source: R. H. Kingston,
// "Switching time in junction diodes and junction transistors", Proc. IRE
// 42, 829 (1954); Neamen 4th ed., section 8.3.4 (from memory). Valid for a
// long base (width >> diffusion length) in low injection.
func KingstonStorageTime(tau, iF, iR float64) float64 {
	x := math.Erfinv(iF / (iF + iR))
	return tau * x * x
}

// ChargeControlStorageTime returns the charge-control estimate of the
// storage time, ts = tauS ln(1 + iF/iR) (s), with tauS the stored-charge
// time constant Q/I (QuasiNeutral.ChargeControlTime): the time for the
// stored charge Q(t) = (iF + iR) tauS exp(-t/tauS) - iR tauS to vanish.
// Source: the charge-control model, e.g. Sze & Ng 2007, section 2.3.5
// (from memory). Used for short bases, where the stored charge sits
// within a transit time of the contact; it overestimates ts of a long base
// (Kingston's is then exact).
func ChargeControlStorageTime(tauS, iF, iR float64) float64 { return tauS * math.Log1p(iF/iR) }

// Switching is the storage-time estimate of a diode switched from forward
// to reverse current.
type Switching struct {
	StorageTime float64 // s
	// Lifetime is the time constant used, s: the charge-weighted
	// stored-charge time tau_eff = Q/I of both regions.
	Lifetime float64
	// Method is "kingston" (long base) or "charge-control" (short base).
	Method string
	// Side is "n" when holes stored in the n region are the larger
	// charge, "p" for electrons in the p region.
	Side string
}

// StorageTime estimates the storage time for switching from forward
// current iF to reverse current iR (both A > 0) by charge control, each
// region weighted by the charge it stores (StorageTimeAt). Ok is false when
// no forward voltage carries iF.
func (s *Static) StorageTime(iF, iR float64) (Switching, bool) {
	if !(iF > 0 && iR > 0) {
		return Switching{StorageTime: math.NaN(), Lifetime: math.NaN()}, false
	}
	_, vj, ok := s.ForwardVoltage(iF)
	if !ok {
		return Switching{StorageTime: math.NaN(), Lifetime: math.NaN()}, false
	}
	return s.StorageTimeAt(vj, iF, iR), true
}

// StorageTimeAt is StorageTime with the junction voltage vj (V) that
// carries iF already known (from ForwardVoltage).
//
// Charge control (Kingston 1954; Sze & Ng 2007, section 2.3.5, from
// memory): each region stores Q_i = tauS_i I_i, with I_i its diffusion
// current at vj and tauS_i its stored-charge time
// (QuasiNeutral.ChargeControlTime, with the high-injection diffusivity
// where that is on); the junction's time constant is the charge-weighted
// tau_eff = (Q_n + Q_p)/(I_n + I_p), so a thin region that carries much
// current but stores little charge no longer sets it. When the region
// storing the larger charge is long (width above 3 diffusion lengths),
// Kingston's long-base formula with tau_eff gives ts (exact when that
// region stores all the charge); otherwise ts = tau_eff ln(1 + iF/iR).
// Side names the region storing the larger charge.
func (s *Static) StorageTimeAt(vj, iF, iR float64) Switching {
	if !(iF > 0 && iR > 0) {
		return Switching{StorageTime: math.NaN(), Lifetime: math.NaN()}
	}
	st := s.junction(vj)
	hli := s.Effects.HighInjection
	rp := s.PEff.Effective(st.pen, hli)
	rn := s.NEff.Effective(st.pep, hli)
	qp := rp.ChargeControlTime() * st.dn
	qn := rn.ChargeControlTime() * st.dp
	r, side := rn, "n"
	if qp > qn {
		r, side = rp, "p"
	}
	tau := (qp + qn) / (st.dn + st.dp)
	if !(tau > 0) {
		return Switching{StorageTime: math.NaN(), Lifetime: math.NaN(), Side: side}
	}
	if math.IsInf(r.Width, 1) || r.Width > 3*r.DiffusionLength() {
		return Switching{KingstonStorageTime(tau, iF, iR), tau, "kingston", side}
	}
	return Switching{ChargeControlStorageTime(tau, iF, iR), tau, "charge-control", side}
}
