package figure

import (
	"image"
	"image/png"
	"io"
)

// EncodePNG writes img to w as PNG at a fixed compression level, so that
// the same image always gives the same bytes.
func EncodePNG(w io.Writer, img image.Image) error {
	enc := png.Encoder{CompressionLevel: png.DefaultCompression}
	return enc.Encode(w, img)
}
