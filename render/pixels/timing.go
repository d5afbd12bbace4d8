package pixels

import (
	"math"

	"kerrscope/raytrace"
)

// SubimageDelay returns, for every pixel where image order n (≥ 1) is
// seen, how much longer its light took than the light of the order-(n−1)
// image of the same disk point: T[n] minus T[n−1] at the disk point
// (r, φ mod 2π) of the pixel, NaN elsewhere (or everywhere without
// timing). The order-(n−1) photon of that disk point is found on the
// screen by Newton's method on (α, β), started from the order-(n−1) pixel
// whose disk point is nearest (binned in ln r and φ); where it does not
// converge the pixel gets NaN.
// At a = 0, for disk points near the photon sphere, the delay tends to
// half an orbit of it, π√27 M (Johnson et al. 2020, Sci. Adv. 6,
// eaaz1310).
func (f *Frame) SubimageDelay(n int) []float32 {
	out := make([]float32, f.W*f.H)
	nan := float32(math.NaN())
	for k := range out {
		out[k] = nan
	}
	if f.T == nil || n < 1 || n >= f.Orders {
		return out
	}
	lut := newDiskFit(f, n-1)
	if lut == nil {
		return out
	}
	tp := raytrace.TimedPath{Path: raytrace.Path{Crossings: make([]raytrace.Crossing, 0, n)}, Times: make([]raytrace.Timing, 0, n)}
	for k := range out {
		r, phi, t := float64(f.R[n][k]), float64(f.Phi[n][k]), float64(f.T[n][k])
		if math.IsNaN(r) || math.IsNaN(t) || math.IsInf(t, 0) {
			continue
		}
		q, ok := lut.nearest(math.Log(r), wrapAngle(phi))
		if !ok {
			continue
		}
		if t0, ok := pairImage(f.Model.Obs, n-1, r, phi, PixelAlpha(f.Res, q%f.W), PixelBeta(f.Res, q/f.W), &tp); ok {
			out[k] = float32(t - t0)
		}
	}
	return out
}

// pairImage returns the delay of the order-o photon that crosses the
// plane at (r, φ mod 2π), found by Newton's method on the screen point
// from (α, β), with a finite-difference Jacobian of (ln r, φ).
func pairImage(obs raytrace.Observer, o int, r, phi, alpha, beta float64, tp *raytrace.TimedPath) (float64, bool) {
	eval := func(a, b float64) (f1, f2, t float64, ok bool) {
		obs.TraceTimed(a, b, o+1, tp)
		if len(tp.Crossings) <= o {
			return 0, 0, 0, false
		}
		return math.Log(tp.Crossings[o].R / r), math.Remainder(tp.Times[o].DeltaPhi-phi, 2*math.Pi), tp.Times[o].Delay, true
	}
	const h = 1e-7 // finite-difference step in M
	for it := 0; it < pairNewtonSteps; it++ {
		f1, f2, t, ok := eval(alpha, beta)
		if !ok {
			return 0, false
		}
		if math.Abs(f1) < pairTol && math.Abs(f2) < pairTol {
			return t, true
		}
		a1, a2, _, ok1 := eval(alpha+h, beta)
		b1, b2, _, ok2 := eval(alpha, beta+h)
		if !ok1 || !ok2 {
			return 0, false
		}
		j11, j21 := (a1-f1)/h, (a2-f2)/h
		j12, j22 := (b1-f1)/h, (b2-f2)/h
		det := j11*j22 - j12*j21
		if det == 0 || math.IsNaN(det) {
			return 0, false
		}
		alpha -= (f1*j22 - f2*j12) / det
		beta -= (j11*f2 - j21*f1) / det
	}
	return 0, false
}

// Newton's method of pairImage: at most pairNewtonSteps steps, until ln r
// and φ match to pairTol (about 1e-10 of the delay then).
const (
	pairNewtonSteps = 20
	pairTol         = 1e-10
)

// wrapAngle reduces φ to [0, 2π).
func wrapAngle(phi float64) float64 {
	v := math.Mod(phi, 2*math.Pi)
	if v < 0 {
		v += 2 * math.Pi
	}
	return v
}

// diskFit bins one image order's pixels by their disk point, x = ln r and
// y = φ mod 2π, keeping in each bin the pixel nearest its centre: a
// starting point for pairImage.
type diskFit struct {
	x0, dx float64 // ln r of the first bin edge, bin width
	nx, ny int
	dy     float64
	pix    []int     // pixel index per bin, −1 if empty
	dist   []float64 // its distance to the bin centre
}

func newDiskFit(f *Frame, o int) *diskFit {
	lo, hi, count := math.Inf(1), math.Inf(-1), 0
	for k := 0; k < f.W*f.H; k++ {
		if r := float64(f.R[o][k]); r > 0 {
			lo, hi = math.Min(lo, math.Log(r)), math.Max(hi, math.Log(r))
			count++
		}
	}
	if count < 8 {
		return nil
	}
	// About 2 pixels per bin, four times as many bins in φ as in ln r.
	nx := max(1, int(math.Sqrt(float64(count)/8)))
	ny := 4 * nx
	d := &diskFit{x0: lo, dx: (hi - lo) / float64(nx) * (1 + 1e-9), nx: nx, ny: ny, dy: 2 * math.Pi / float64(ny),
		pix: make([]int, nx*ny), dist: make([]float64, nx*ny)}
	if !(d.dx > 0) {
		d.dx = 1
	}
	for i := range d.pix {
		d.pix[i], d.dist[i] = -1, math.Inf(1)
	}
	for k := 0; k < f.W*f.H; k++ {
		r := float64(f.R[o][k])
		if !(r > 0) {
			continue
		}
		x, y := math.Log(r), wrapAngle(float64(f.Phi[o][k]))
		b := d.index(x, y)
		cx := d.x0 + (float64(b%d.nx)+0.5)*d.dx
		cy := (float64(b/d.nx) + 0.5) * d.dy
		if dd := math.Hypot((x-cx)/d.dx, (y-cy)/d.dy); dd < d.dist[b] {
			d.pix[b], d.dist[b] = k, dd
		}
	}
	return d
}

func (d *diskFit) index(x, y float64) int {
	i := min(d.nx-1, max(0, int((x-d.x0)/d.dx)))
	j := min(d.ny-1, max(0, int(y/d.dy)))
	return j*d.nx + i
}

// nearest returns the pixel kept in the bin of (x, y), or in the nearest
// non-empty bin of the same ln r column within a few bins in φ.
func (d *diskFit) nearest(x, y float64) (int, bool) {
	if x < d.x0-d.dx || x > d.x0+d.dx*float64(d.nx+1) {
		return 0, false
	}
	b := d.index(x, y)
	i, j := b%d.nx, b/d.nx
	for dj := 0; dj <= 3; dj++ {
		for _, s := range []int{j + dj, j - dj} {
			jj := ((s % d.ny) + d.ny) % d.ny
			for _, ii := range []int{i, i - 1, i + 1} {
				if ii < 0 || ii >= d.nx {
					continue
				}
				if k := d.pix[jj*d.nx+ii]; k >= 0 {
					return k, true
				}
			}
		}
	}
	return 0, false
}
