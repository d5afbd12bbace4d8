// Package survey holds analyses that need photons but no pixels: what
// happens to the photon of one screen point (Probe) and how wide the
// lensing bands around the critical curve are (LensingBands, Lensing).
//
// It builds on package raytrace only; the caller supplies anything that
// depends on the disk, such as the redshift of its gas.
package survey
