package figure

import (
	"bytes"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"image"
	"image/color"
	"image/png"
	"math/rand/v2"
	"testing"
)

// noisy returns a w×h image of random opaque colours with flat patches,
// so that the compressor meets both matches and literals.
func noisy(w, h int, seed uint64) *image.RGBA {
	rng := rand.New(rand.NewPCG(seed, 7))
	m := image.NewRGBA(image.Rect(0, 0, w, h))
	for k := 0; k < w*h; k++ {
		c := color.RGBA{uint8(rng.IntN(256)), uint8(rng.IntN(256)), uint8(rng.IntN(256)), 255}
		if k%w < w/3 {
			c = color.RGBA{0x77, 0x77, 0x77, 0xff}
		}
		m.SetRGBA(k%w, k/w, c)
	}
	return m
}

// The PNG written for an opaque RGBA image decodes, with Go's image/png
// (an implementation of the PNG Specification independent of ours), to
// exactly the same pixels; the file is signature, IHDR (8-bit
// truecolour), IDAT chunks and IEND, each chunk with the CRC-32 of its
// type and data (PNG Specification, 2nd ed., sec. 5.2, 5.3, 11.2).
func TestEncodePNGRoundTrip(t *testing.T) {
	for _, size := range [][2]int{{1, 1}, {3, 2}, {700, 300}, {37, 900}} {
		m := noisy(size[0], size[1], uint64(size[0]))
		var buf bytes.Buffer
		if err := EncodePNG(&buf, m); err != nil {
			t.Fatal(err)
		}
		got, err := png.Decode(bytes.NewReader(buf.Bytes()))
		if err != nil {
			t.Fatalf("%v: decode: %v", size, err)
		}
		if got.Bounds() != m.Bounds() {
			t.Fatalf("%v: bounds %v", size, got.Bounds())
		}
		for y := 0; y < size[1]; y++ {
			for x := 0; x < size[0]; x++ {
				r, g, b, a := got.At(x, y).RGBA()
				want := m.RGBAAt(x, y)
				if uint8(r>>8) != want.R || uint8(g>>8) != want.G || uint8(b>>8) != want.B || a != 0xffff {
					t.Fatalf("%v: pixel (%d, %d) = %v, want %v", size, x, y, got.At(x, y), want)
				}
			}
		}
		data := buf.Bytes()
		if string(data[:8]) != pngSignature {
			t.Fatalf("%v: signature %q", size, data[:8])
		}
		var types []string
		for p := data[8:]; len(p) > 0; {
			n := int(binary.BigEndian.Uint32(p))
			typ, body := string(p[4:8]), p[8:8+n]
			if crc := binary.BigEndian.Uint32(p[8+n:]); crc != crc32.ChecksumIEEE(p[4:8+n]) {
				t.Errorf("%v: %s chunk CRC %#08x", size, typ, crc)
			}
			if typ == "IHDR" && (body[8] != 8 || body[9] != 2 || body[12] != 0) {
				t.Errorf("%v: IHDR bit depth %d, colour type %d, interlace %d; want 8, 2, 0", size, body[8], body[9], body[12])
			}
			if len(types) == 0 || types[len(types)-1] != typ {
				types = append(types, typ)
			}
			p = p[12+n:]
		}
		if want := []string{"IHDR", "IDAT", "IEND"}; len(types) != 3 || types[0] != want[0] || types[1] != want[1] || types[2] != want[2] {
			t.Errorf("%v: chunks %v, want %v", size, types, want)
		}
	}
}

// A translucent image and a palette image go through image/png, an opaque
// sub-image (bounds away from the origin) through pngRGB; all decode to
// their pixels.
func TestEncodePNGOtherImages(t *testing.T) {
	m := noisy(20, 10, 3)
	m.SetRGBA(4, 5, color.RGBA{10, 20, 30, 40})
	sub := noisy(30, 30, 4).SubImage(image.Rect(5, 7, 25, 19)).(*image.RGBA)
	pal := image.NewPaletted(image.Rect(0, 0, 9, 4), color.Palette{color.Black, color.White, colorRed})
	for k := range pal.Pix {
		pal.Pix[k] = uint8(k % 3)
	}
	for _, im := range []image.Image{m, sub, pal} {
		var buf bytes.Buffer
		if err := EncodePNG(&buf, im); err != nil {
			t.Fatal(err)
		}
		got, err := png.Decode(&buf)
		if err != nil {
			t.Fatal(err)
		}
		b := im.Bounds()
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				if w, g := color.NRGBAModel.Convert(im.At(x, y)), got.At(x-b.Min.X, y-b.Min.Y); w != color.NRGBAModel.Convert(g) {
					t.Fatalf("%T: pixel (%d, %d) = %v, want %v", im, x, y, g, w)
				}
			}
		}
	}
}

var colorRed = color.RGBA{0xff, 0, 0, 0xff}

// A failing writer's error comes back.
func TestEncodePNGWriteError(t *testing.T) {
	errFull := errors.New("disk full")
	for _, n := range []int{0, 20, 5000} {
		if err := EncodePNG(&limitWriter{n: n, err: errFull}, noisy(300, 300, 9)); !errors.Is(err, errFull) {
			t.Errorf("failing after %d bytes: error %v", n, err)
		}
	}
}

type limitWriter struct {
	n   int
	err error
}

func (l *limitWriter) Write(p []byte) (int, error) {
	if len(p) > l.n {
		k := l.n
		l.n = 0
		return k, l.err
	}
	l.n -= len(p)
	return len(p), nil
}

// opaque reads four pixels at a time: one translucent pixel anywhere,
// in the words or in a row's tail, on images of every width up to 9 and
// with a sub-image's offset rows, must be found.
func TestOpaqueFindsEveryTranslucentPixel(t *testing.T) {
	for w := 1; w <= 9; w++ {
		for h := 1; h <= 3; h++ {
			full := image.NewRGBA(image.Rect(0, 0, w+2, h+1))
			for k := range full.Pix {
				full.Pix[k] = 0xff
			}
			m := full.SubImage(image.Rect(1, 1, w+1, h+1)).(*image.RGBA)
			if !opaque(m) {
				t.Fatalf("%d×%d: an opaque image reported translucent", w, h)
			}
			for y := 1; y <= h; y++ {
				for x := 1; x <= w; x++ {
					k := full.PixOffset(x, y) + 3
					full.Pix[k] = 0xfe
					if opaque(m) {
						t.Fatalf("%d×%d: alpha 254 at (%d, %d) not found", w, h, x, y)
					}
					full.Pix[k] = 0xff
				}
			}
			// Outside the sub-image a translucent pixel does not count.
			full.Pix[3] = 0
			if !opaque(m) {
				t.Fatalf("%d×%d: a pixel outside the sub-image counted", w, h)
			}
			full.Pix[3] = 0xff
		}
	}
}
