package main

import (
	"context"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// helpDefault matches a scene flag's help line: its key and its default.
var helpDefault = regexp.MustCompile(`^\s+--(\S+)\s.*\[([a-z_.]+)\](?: \(default (.*)\))?$`)

// helpDefaults runs cmd --help and returns the printed default of each
// scene key ("" when none is printed) and the number of "(default" notes
// on each line.
func helpDefaults(t *testing.T, cmd string) (map[string]string, string) {
	t.Helper()
	code, out, errs := runCLI(cmd, "--help")
	if code != 0 || errs != "" {
		t.Fatalf("%s --help: exit %d, stderr %q", cmd, code, errs)
	}
	got := map[string]string{}
	for _, line := range strings.Split(out, "\n") {
		if n := strings.Count(line, "(default"); n > 1 {
			t.Errorf("%s --help states %d defaults on one line: %q", cmd, n, line)
		}
		if m := helpDefault.FindStringSubmatch(line); m != nil {
			got[m[2]] = m[3]
		}
	}
	return got, out
}

// TestHelpShowsTheDefaultsUsed renders --help of each rendering command,
// runs the command on a tiny screen, and compares every printed default
// with the effective scene the run records in its manifest.
func TestHelpShowsTheDefaultsUsed(t *testing.T) {
	demo, err := scene.Demo()
	if err != nil {
		t.Fatal(err)
	}
	overridden := map[string]bool{"screen.width": true, "screen.height": true, "output.formats": true, "output.directory": true}
	for _, c := range []struct {
		cmd  string
		base scene.Scene
	}{{"render", scene.Default()}, {"locate", locateBase()}, {"demo", demo}} {
		printed, _ := helpDefaults(t, c.cmd)
		dir := t.TempDir()
		if code, _, errs := runCLI(c.cmd, "--width", "8", "--height", "8", "--formats", "csv", "--out", dir, "--quiet"); code != 0 {
			t.Fatalf("%s: exit %d: %s", c.cmd, code, errs)
		}
		used, err := scene.Load(filepath.Join(dir, "kerrscope-run.toml"))
		if err != nil {
			t.Fatal(err)
		}
		usedText, baseText := used.Values(), c.base.Values()
		// An automatic value is the one the renderer chooses for the
		// run's scene (pixels.FrameWindow).
		run := c.base
		run.Screen.Width, run.Screen.Height = 8, 8
		res, err := run.Resolve()
		if err != nil {
			t.Fatal(err)
		}
		framed, err := pixels.FrameWindow(context.Background(), res)
		if err != nil {
			t.Fatal(err)
		}
		autoText := framed.Scene.Values()
		for key, def := range printed {
			want := usedText[key]
			if overridden[key] {
				want = baseText[key]
			}
			if def == "automatic" {
				if !c.base.Automatic(key) {
					t.Errorf("%s --help: %s is automatic, the scene has %q", c.cmd, key, baseText[key])
				}
				if autoText[key] != want {
					t.Errorf("%s --help: %s automatic would be %q, the command uses %q", c.cmd, key, autoText[key], want)
				}
				continue
			}
			if def != "" && def != want {
				t.Errorf("%s --help: %s default %q, the command uses %q", c.cmd, key, def, want)
			}
		}
	}
}

func TestHelpDefaultsPerCommand(t *testing.T) {
	// The demo's values, from scene/demo.toml.
	demo, _ := helpDefaults(t, "demo")
	for key, want := range map[string]string{"black_hole.spin": "0.94", "observer.inclination_deg": "63", "output.directory": "kerrscope-demo", "refine.depth": "3"} {
		if demo[key] != want {
			t.Errorf("demo --help: %s default %q, want %q", key, demo[key], want)
		}
	}
	// The demo refuses --scene, so its help does not offer it.
	if _, out := helpDefaults(t, "demo"); strings.Contains(out, "--scene") {
		t.Errorf("demo --help lists --scene, which the demo refuses")
	}
	if code, _, errs := runCLI("demo", "--scene", "x.toml"); code != 2 || !strings.Contains(errs, "built-in scene") {
		t.Errorf("demo --scene: exit %d, stderr %q; want a usage error naming the built-in scene", code, errs)
	}
	locate, _ := helpDefaults(t, "locate")
	if locate["refine.depth"] != "3" {
		t.Errorf("locate --help: refine depth default %q, want 3", locate["refine.depth"])
	}
	// The commands that start from the built-in scene print its values.
	base := scene.Default().Values()
	for _, cmd := range []string{"sweep", "spot", "probe"} {
		printed, _ := helpDefaults(t, cmd)
		for key, def := range printed {
			if def == "automatic" && scene.Default().Automatic(key) {
				continue
			}
			if def != "" && def != base[key] {
				t.Errorf("%s --help: %s default %q, the built-in scene has %q", cmd, key, def, base[key])
			}
		}
	}
	// Only locate reads the band keys.
	for _, cmd := range []string{"render", "demo", "sweep", "spot", "probe"} {
		printed, out := helpDefaults(t, cmd)
		for key := range printed {
			if strings.HasPrefix(key, "band.") {
				t.Errorf("%s --help lists the locate-only key %s", cmd, key)
			}
		}
		if strings.Contains(out, "--band-") {
			t.Errorf("%s --help lists a --band flag", cmd)
		}
	}
}
