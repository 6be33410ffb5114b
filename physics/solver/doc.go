// Package solver is junco's numerical one-dimensional drift-diffusion
// solver for pn junctions and diodes: it solves Poisson's equation and the
// electron and hole continuity equations on a non-uniform mesh and shows
// where the depletion approximation and the analytic diode formulas of
// package physics stop being trustworthy (near flat band, in high
// injection, at the depletion edges, for implanted and diffused profiles).
//
// # Equations
//
// Steady state, SI units, V_t = kT/q:
//
//	-d/dx(eps dpsi/dx) = q (p - n + Nd+ - Na-)
//	 dJn/dx = q (R - G),   dJp/dx = -q (R - G)
//	 Jn = q mu_n n E + q Dn dn/dx,   Jp = q mu_p p E - q Dp dp/dx,   D = mu kT/q
//
// with Boltzmann statistics n = n_ie exp((psi - phi_n)/V_t), p = n_ie
// exp((phi_p - psi)/V_t), recombination R = SRH + Auger + radiative, the
// doping-dependent low-field mobility of the material
// (physics.Material.Mobility; no field dependence) and SRH lifetimes of
// the Scharfetter form (physics.SRHLifetime) or user values.
//
// # Light
//
// Device.Light adds the optical generation G(x), m^-3 s^-1, to both
// continuity equations: a uniform rate, and monochromatic light entering
// the anode's (p) contact, or the cathode's with FromN, at G = alpha Phi
// exp(-alpha depth) (Beer-Lambert, one pair per absorbed photon). G is
// integrated exactly over each box, so that the box counts the photons
// absorbed in it on any mesh, and the automatic mesh keeps cells below
// 0.1 (1/alpha + depth) near the illuminated contact. The equilibrium
// stays dark; the biased solves switch the light on at zero bias first,
// by continuation in the light level when one step does not converge.
// Path follows a bias path under light (Voc and maximum-power searches).
// Checked against the closed forms of Sze & Ng 2007 (ch. 13) and Hovel
// 1975 (light_test.go).
//
// # Variables and scaling
//
// The unknowns are psi, phi_n and phi_p in units of V_t (the quasi-Fermi
// formulation). Densities are never unknowns: they are formed as exp(ln
// n_ie + psi - phi_n), so a minority density of 1e-30 m^-3 in 4H-SiC (ni ~
// 1e-2 m^-3 at 300 K) is as well represented as 1e26 m^-3 in an emitter,
// and positivity holds by construction. phi_n is measured from the
// cathode potential and phi_p from the anode potential, so that each is
// near zero where its carrier is the majority: a majority current then
// rests on quasi-Fermi differences that are resolved to full precision.
// Newton rows are equilibrated (each divided by its largest Jacobian
// entry), which removes the 60 decades between the rows of the two
// carriers; where a carrier has underflowed (density below 1e-280 m^-3,
// e.g. minority carriers deep in a reverse-biased wide-gap depletion
// region) its quasi-Fermi potential is held for the step.
//
// # Discretisation
//
// Box (finite-volume) method on the mesh; Poisson with the three-point
// flux stencil, currents by the Scharfetter-Gummel exponential fitting
// (D. L. Scharfetter, H. K. Gummel, IEEE Trans. Electron Devices ED-16, 64
// (1969)) evaluated in quasi-Fermi form, Jn = -q (Dn/h) B(dpsi) n_{i+1}
// expm1(phi_n,i+1 - phi_n,i), so that drift and diffusion never cancel
// numerically, and in density form where the quasi-Fermi difference is
// large. The Bernoulli function B(x) = x/(e^x - 1) is evaluated as
// x/expm1(x) (see Bernoulli). Doping is box-averaged per node.
//
// # Solution
//
// Equilibrium: damped Newton on the nonlinear Poisson equation from the
// local-neutrality guess. Bias: continuation from equilibrium; every step
// starts from an extrapolated guess, a few decoupled Gummel sweeps
// (H. K. Gummel, IEEE Trans. Electron Devices ED-11, 455 (1964)), then the
// coupled Newton iteration on the 3N unknowns with a banded LU of
// bandwidth 5 (partial pivoting, O(N) per step). Damping limits the rise
// of any carrier density per iteration (see riseLimit), never the
// potential itself, so large reverse-bias steps stay cheap. A step that
// fails (no convergence within Options.MaxIterations, or an update still
// above 1e-2 kT/q after 12 iterations) is halved; below
// Options.MinBiasStep a *ConvergenceError reports the bias, the last
// converged bias, iterations, update and residual. Once the target bias
// is reached (not after the intermediate steps, which only start the
// next), when Jn + Jp varies along the device by more than ten
// times max(1e-11, 20 N eps) relative (N nodes, eps the double-precision
// epsilon: the rounding floor of the discrete current grows with N), up
// to six decoupled continuity steps with psi frozen polish the
// quasi-Fermi potentials, stopping at that target or when a step no
// longer halves the spread (Result.CurrentSpread reports it).
//
// # Contacts
//
// Ohmic: charge neutrality and thermal equilibrium at both ends; the p-type
// end is the anode and carries the bias (forward positive), the n-type
// end is the cathode at 0 V. Energies in Result are referred to the
// cathode's equilibrium Fermi level (0 eV).
//
// # Plug-in points for incomplete ionisation and band-gap narrowing
//
// Device.Occupation gives the dopant levels of a node (n1 = (Nc/gD)
// exp(-(Ec - Ed)/kT), p1 alike, and the bound fraction); the ionised
// densities then follow the local carriers, Nd+ = Nd [1 - bD n/(n + n1)],
// Na- = Na [1 - bA p/(p + p1)], with their derivatives with respect to psi
// and the quasi-Fermi potentials in the Poisson rows of the Jacobian:
// dopants in a depletion region are fully ionised, those of a neutral
// region frozen out (DopantOccupation builds the hook from the
// material's dopant levels). C-V is low-frequency by default (the
// occupation follows dQ/dV); Options.CVMode = CVHighFrequency freezes it
// for the second solution of dQ/dV and CVPoint.Mode says which.
// Device.Ionisation is the older fixed map from chemical to ionised
// densities (evaluated once per node); Device.IntrinsicDensity gives the
// effective n_ie(x). The narrowing enters the Scharfetter-Gummel fluxes
// as the band potentials psi + ln(n_ie/ni) (electrons) and psi -
// ln(n_ie/ni) (holes), split equally between the bands, and shifts Ec
// and Ev in the results.
//
// # Validity
//
// Non-degenerate Boltzmann statistics and complete ionisation unless the
// hooks are used (degenerate doping is flagged, not refused); low-field
// mobility (no velocity saturation, no impact ionisation: breakdown is
// outside the model); one material (no heterojunctions); ohmic contacts
// only (no Schottky barrier, no finite surface recombination velocity);
// temperatures over which the material's parameters are defined (results
// outside the trusted range are flagged).
package solver
