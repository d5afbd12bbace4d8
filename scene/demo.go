package scene

import _ "embed"

//go:embed demo.toml
var demoTOML []byte

// Demo returns the built-in demo scene: an invented, rapidly spinning
// black hole seen at 63°, rendered into ./kerrscope-demo.
func Demo() (Scene, error) { return Parse("demo.toml", demoTOML) }
