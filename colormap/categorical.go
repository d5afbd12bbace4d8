package colormap

import "image/color"

// orderStops are the categorical colours in CIE L*C*h° (go-colorful units:
// L*/100, C*/100, degrees). Lightness alternates between neighbours so that
// consecutive image orders also differ in grey-scale print.
var orderStops = []stop{
	{l: 0.80, c: 0.72, h: 82},  // saffron
	{l: 0.42, c: 0.42, h: 200}, // deep teal
	{l: 0.58, c: 0.78, h: 38},  // vermilion
	{l: 0.35, c: 0.62, h: 305}, // aubergine violet
	{l: 0.72, c: 0.62, h: 135}, // fern green
	{l: 0.60, c: 0.40, h: 250}, // cornflower
	{l: 0.75, c: 0.38, h: 352}, // rose
	{l: 0.38, c: 0.35, h: 70},  // umber
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
