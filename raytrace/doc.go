// Package raytrace traces photons through the Kerr spacetime in closed form.
//
// It knows about the black hole (spin a, mass M = 1) and about photons
// arriving at a distant observer; it knows nothing of disks, pixels or files.
//
// Units are geometric, G = c = M = 1: lengths and Mino times are in M.
// The spin a is signed, -1 < a < 1. Screen coordinates (α, β) follow
// Bardeen (1973): α to the right, β up along the projected spin axis.
//
// The closed-form path (Trace) follows Gralla & Lupsasca (2020, PRD 101,
// 044032) in the notation of the project's physics notes: the angular
// motion gives the Mino time of every equatorial crossing through Legendre
// elliptic integrals, and the radial motion gives r(τ) through Jacobi
// elliptic functions. An independent Dormand–Prince 5(4) integrator
// (Integrate) exists to check it.
package raytrace
