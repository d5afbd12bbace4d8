package scene

import (
	"os"
	"path/filepath"
	"regexp"
	"testing"
)

// TestExampleScenes loads and resolves every scene file shipped in
// testdata/scenes, and checks that each one the README names is there.
func TestExampleScenes(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "scenes", "*.toml"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no example scenes: %v", err)
	}
	for _, f := range files {
		s, err := Load(f)
		if err != nil {
			t.Errorf("%s: %v", f, err)
			continue
		}
		if _, err := s.Resolve(); err != nil {
			t.Errorf("%s does not resolve: %v", f, err)
		}
	}
	readme, err := os.ReadFile(filepath.Join("..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	named := regexp.MustCompile(`--scene (\S+\.toml)`).FindAllSubmatch(readme, -1)
	if len(named) == 0 {
		t.Fatal("the README names no scene file")
	}
	for _, m := range named {
		name := string(m[1])
		if name == "file.toml" || name == "kerrscope-run.toml" {
			continue // placeholders: any scene, a run's own record
		}
		if _, err := os.Stat(filepath.Join("..", name)); err != nil {
			t.Errorf("the README uses %s, which is not shipped: %v", name, err)
		}
	}
}

// TestDefaultSceneFile checks that testdata/scenes/disk.toml, which lists
// every key at its default, gives the built-in scene.
func TestDefaultSceneFile(t *testing.T) {
	s, err := Load(filepath.Join("..", "testdata", "scenes", "disk.toml"))
	if err != nil {
		t.Fatal(err)
	}
	got, err := s.TOML()
	if err != nil {
		t.Fatal(err)
	}
	want, err := Default().TOML()
	if err != nil {
		t.Fatal(err)
	}
	if string(got) != string(want) {
		t.Errorf("disk.toml differs from the built-in scene:\n%s\nwant\n%s", got, want)
	}
}
