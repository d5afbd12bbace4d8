package colormap

import "image/color"

// orderStops are the categorical colours in CIE L*C*h° (go-colorful units:
// L*/100, C*/100, degrees). They were chosen on two axes a deuteranope
// still sees, lightness and blue–yellow: lightness alternates between
// neighbours so that consecutive image orders also differ in grey-scale
// print, and the first orders (the ones every scene shows) sit far apart
// in hue and lightness at once.
var orderStops = []stop{
	{l: 0.66, c: 0.34, h: 228}, // glacier cyan
	{l: 0.46, c: 0.62, h: 340}, // magenta
	{l: 0.88, c: 0.42, h: 98},  // straw
	{l: 0.30, c: 0.50, h: 290}, // indigo
	{l: 0.76, c: 0.30, h: 160}, // mint
	{l: 0.35, c: 0.30, h: 60},  // umber
	{l: 0.58, c: 0.52, h: 28},  // coral
	{l: 0.40, c: 0.28, h: 200}, // petrol
}

// orderColors holds orderStops converted to sRGB.
var orderColors = func() []color.RGBA {
	out := make([]color.RGBA, len(orderStops))
	for i, s := range orderStops {
		out[i] = toRGBA(inGamut(s.l, s.c, s.h))
	}
	return out
}()

// OrderCount is the number of distinct colours Order cycles through.
const OrderCount = 8

// Order returns the categorical colour for image order n (0 for the direct
// image, 1 for the first higher-order image, and so on). Orders
// from OrderCount on reuse the colours cyclically; a negative n gives
// NoHit.
func Order(n int) color.RGBA {
	if n < 0 {
		return NoHit
	}
	return orderColors[n%len(orderColors)]
}
