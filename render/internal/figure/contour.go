package figure

import "math"

// point is a position in the pixel coordinates of a field: x to the
// right, y down, the centre of pixel (i, j) at (i + ½, j + ½).
type point struct{ x, y float64 }

// segment is one piece of a contour inside a grid cell. ea and eb
// identify the cell edges its ends lie on, so that pieces of neighbouring
// cells can be joined.
type segment struct {
	a, b   point
	ea, eb int
}

// contourSegments runs marching squares on the row-major w×h field at
// level. Each cell joins four neighbouring pixel centres; a cell with a NaN
// corner is skipped. Crossings are placed by linear interpolation along
// the cell edges, and a saddle cell is resolved by the mean of its four
// corners. A corner equal to the level counts as above it.
func contourSegments(field []float32, w, h int, level float64) []segment {
	var segs []segment
	hEdge := func(i, j int) int { return 2 * (j*w + i) } // (i, j)–(i+1, j)
	vEdge := func(i, j int) int { return 2*(j*w+i) + 1 } // (i, j)–(i, j+1)
	for j := 0; j+1 < h; j++ {
		top, bot := field[j*w:(j+1)*w], field[(j+1)*w:(j+2)*w]
		for i := 0; i+1 < w; i++ {
			// Corners clockwise from the top left.
			v := [4]float64{float64(top[i]), float64(top[i+1]), float64(bot[i+1]), float64(bot[i])}
			if math.IsNaN(v[0]) || math.IsNaN(v[1]) || math.IsNaN(v[2]) || math.IsNaN(v[3]) {
				continue
			}
			var above [4]bool
			n := 0
			for k := range v {
				above[k] = v[k] >= level
				if above[k] {
					n++
				}
			}
			if n == 0 || n == 4 {
				continue // the level does not pass through this cell
			}
			c := [4]point{
				{float64(i) + 0.5, float64(j) + 0.5},
				{float64(i) + 1.5, float64(j) + 0.5},
				{float64(i) + 1.5, float64(j) + 1.5},
				{float64(i) + 0.5, float64(j) + 1.5},
			}
			// Edge k runs from corner k to corner k+1: top, right,
			// bottom, left.
			ids := [4]int{hEdge(i, j), vEdge(i+1, j), hEdge(i, j+1), vEdge(i, j)}
			cross := func(k int) point {
				a, b := v[k], v[(k+1)%4]
				t := (level - a) / (b - a)
				if math.IsNaN(t) || math.IsInf(t, 0) {
					t = 0.5
				}
				t = math.Max(0, math.Min(1, t))
				pa, pb := c[k], c[(k+1)%4]
				return point{pa.x + t*(pb.x-pa.x), pa.y + t*(pb.y-pa.y)}
			}
			join := func(k, l int) {
				segs = append(segs, segment{a: cross(k), b: cross(l), ea: ids[k], eb: ids[l]})
			}
			var crossed [4]int
			nc := 0
			for k := range 4 {
				if above[k] != above[(k+1)%4] {
					crossed[nc] = k
					nc++
				}
			}
			switch nc {
			case 2:
				join(crossed[0], crossed[1])
			case 4:
				centre := (v[0]+v[1]+v[2]+v[3])/4 >= level
				// Isolate the corners on the other side from the centre:
				// corner k lies between edges k−1 and k.
				for k := range 4 {
					if above[k] != centre {
						join((k+3)%4, k)
					}
				}
			}
		}
	}
	return segs
}

// contourPath is a chain of contour segments.
type contourPath struct {
	pts    []point
	closed bool
}

// chainSegments joins segments that share a cell edge into paths, in a
// fixed order: paths start at the earliest unused segment.
func chainSegments(segs []segment) []contourPath {
	byEdge := make(map[int][]int, 2*len(segs))
	for k, s := range segs {
		byEdge[s.ea] = append(byEdge[s.ea], k)
		byEdge[s.eb] = append(byEdge[s.eb], k)
	}
	used := make([]bool, len(segs))
	// next returns the unused segment at edge e and its far end.
	next := func(e int) (int, point, int, bool) {
		for _, k := range byEdge[e] {
			if used[k] {
				continue
			}
			used[k] = true
			s := segs[k]
			if s.ea == e {
				return k, s.b, s.eb, true
			}
			return k, s.a, s.ea, true
		}
		return 0, point{}, 0, false
	}
	var paths []contourPath
	for k, s := range segs {
		if used[k] {
			continue
		}
		used[k] = true
		fwd := []point{s.a, s.b}
		end := s.eb
		closed := false
		for {
			_, p, e, ok := next(end)
			if !ok {
				break
			}
			fwd = append(fwd, p)
			end = e
			if end == s.ea {
				closed = true
				fwd = fwd[:len(fwd)-1]
				break
			}
		}
		var back []point
		if !closed {
			start := s.ea
			for {
				_, p, e, ok := next(start)
				if !ok {
					break
				}
				back = append(back, p)
				start = e
			}
		}
		pts := make([]point, 0, len(back)+len(fwd))
		for i := len(back) - 1; i >= 0; i-- {
			pts = append(pts, back[i])
		}
		pts = append(pts, fwd...)
		paths = append(paths, contourPath{pts: pts, closed: closed})
	}
	return paths
}
