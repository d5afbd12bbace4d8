// Package scene describes what is rendered: the black hole, the observer,
// the screen window, the thin disk and its emission, the spectrum and the
// outputs. It loads TOML scene files, applies defaults and command-line
// overrides, validates everything at the edge, and holds the disk's gas
// physics (redshift of Keplerian and plunging gas, emissivity and limb
// laws). Kerr geometry comes from package raytrace.
package scene
