package spot

import (
	"context"
	"testing"

	"kerrscope/render/pixels"
	"kerrscope/scene"
)

// TestMovieWindowHoldsWhatShines frames automatic windows for a spot
// movie: with the disk shining, the window is the disk's
// (pixels.FrameWindow); with the spot alone, it holds the annulus where
// the spot can shine, and no pixel that can shine lies on its border.
func TestMovieWindowHoldsWhatShines(t *testing.T) {
	auto := func(s *scene.Scene) { s.Screen.FieldOfView = scene.AutoField }
	r, sp := movieScene(t, 0.9, 70, auto)
	alone, err := FrameWindow(context.Background(), r, sp)
	if err != nil {
		t.Fatal(err)
	}
	tb := trace(t, alone, sp)
	w, h := tb.W, tb.H
	border := 0
	for k, lit := range tb.Lit {
		i, j := k%w, k/w
		if lit && (i == 0 || j == 0 || i == w-1 || j == h-1) {
			border++
		}
	}
	if border > 0 {
		t.Errorf("spot alone: %d pixels that can shine on the border of the %v M window", border, alone.Screen.FieldOfView)
	}
	withDisk := r
	withDisk.Spot.Alone = false
	sp2, err := scene.ResolveSpot(withDisk)
	if err != nil {
		t.Fatal(err)
	}
	disk, err := FrameWindow(context.Background(), withDisk, sp2)
	if err != nil {
		t.Fatal(err)
	}
	want, err := pixels.FrameWindow(context.Background(), withDisk)
	if err != nil {
		t.Fatal(err)
	}
	if disk.Screen != want.Screen {
		t.Errorf("spot on the disk: window %+v, the disk's %+v", disk.Screen, want.Screen)
	}
	// The annulus out to 11.2 M is much smaller than the 30 M disk.
	if !(alone.Screen.FieldOfView < 0.6*disk.Screen.FieldOfView) {
		t.Errorf("spot alone: field %v M, the whole disk's %v M", alone.Screen.FieldOfView, disk.Screen.FieldOfView)
	}
}
