// Package fits writes 2-D float32 images as FITS files.
//
// The writer is hand-written because no Go FITS module is available to the
// project. It follows the IAU FITS Standard 4.0 (FITS Working Group 2018;
// version 3.0 is Pence et al. 2010, A&A 524, A42), in particular:
//
//   - sec. 3.1 and 3.3: a file is a sequence of HDUs, each made of whole
//     2880-byte blocks; headers are padded with ASCII spaces after END and
//     data with zero bytes;
//   - sec. 4.1: headers are 80-character keyword records of printable ASCII,
//     keyword names of 1–8 characters from A–Z, 0–9, '-' and '_';
//   - sec. 4.2: fixed-format values — logical T/F in column 30, integers and
//     reals right-justified in columns 11–30, strings quoted from column 11
//     with embedded quotes doubled;
//   - sec. 4.4.1: mandatory keywords and their order in the primary header
//     and in conforming extensions;
//   - sec. 5.3: BITPIX = -32 data are big-endian IEEE-754 single precision,
//     with NaN marking undefined pixels;
//   - sec. 7.1: IMAGE extensions (PCOUNT = 0, GCOUNT = 1);
//   - sec. 8: linear world coordinates via CTYPEi, CUNITi, CRPIXj, CRVALi and
//     CDELTi, with the linear transformation matrix PCi_j (Greisen &
//     Calabretta 2002, A&A 395, 1061), RADESYS for celestial axes
//     (Calabretta & Greisen 2002, A&A 395, 1077) and alternate axis
//     descriptions, every keyword suffixed with a letter A–Z, named by
//     WCSNAMEa (sec. 8.2.1).
//
// Encode writes a primary HDU without data (NAXIS = 0, EXTEND = T) followed by
// one IMAGE extension per image. It validates all input before writing a
// single byte and returns an error rather than producing a non-conforming
// file. Output is deterministic: the same input always gives the same bytes
// (no DATE or other time-dependent keyword is written).
package fits

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
)

// blockSize is the FITS logical record length in bytes (Standard 4.0, sec. 3.1).
const blockSize = 2880

// bufferSize is the size of the output buffer: a whole number of blocks.
const bufferSize = 32 * blockSize

// zeroBlock supplies the zero bytes that pad the last data block. It is
// never written to.
var zeroBlock [blockSize]byte

// Card is one header keyword record. Value is bool, int, int64, float64 or
// string. For the commentary keywords COMMENT and HISTORY, Value is the text
// (a string of at most 72 characters) and Comment must be empty.
type Card struct {
	Key     string
	Value   any
	Comment string
}

// Axis is a linear WCS axis: world = RefValue + Delta*(pixel - RefPixel),
// with 1-based pixel coordinates whose integer values are pixel centres
// (Standard 4.0, sec. 8). It is written as CTYPEi, CUNITi, CRPIXi, CRVALi and
// CDELTi.
//
// Readers that implement the WCS papers give some CTYPE and CUNIT values a
// meaning of their own: a CTYPE whose first four characters are a spectral
// code of Greisen et al. (2006, A&A 446, 747), such as "BETA" (v/c), "FREQ" or
// "VELO", makes the axis spectral and fixes its unit; a Type like "ALPHA"
// or "XSCREEN" is a plain linear axis. CUNIT strings follow sec. 4.3, so "M"
// reads as metres.
type Axis struct {
	Type     string  // CTYPEi, e.g. "ALPHA"
	Unit     string  // CUNITi; "" = omit
	RefPixel float64 // CRPIXi
	RefValue float64 // CRVALi
	Delta    float64 // CDELTi; must be non-zero
}

// Image is one 2-D float32 image, stored as an IMAGE extension.
type Image struct {
	Name          string    // EXTNAME; "" = omit. Non-empty names must be unique in a file.
	Unit          string    // BUNIT; "" = omit
	Width, Height int       // NAXIS1 and NAXIS2, both ≥ 1
	Data          []float32 // len Width*Height, row-major: Data[(j-1)*Width+(i-1)] is FITS pixel (i, j); Data[0] is pixel (1, 1), bottom-left when displayed
	// Rows, if not nil, gives the pixels instead of Data (which must then
	// be nil), one row at a time while Encode writes them: Rows(j, row)
	// fills row (Width values) with FITS row j+1, the values Data[j*Width:
	// (j+1)*Width] would hold; j = 0 is the bottom row. It is called once
	// per row, in increasing j, so an image never needs a copy of its own
	// in memory.
	Rows func(j int, row []float32)
	Axes [2]Axis // WCS of axis 1 (x) and axis 2 (y); both Type "" = no WCS
	// WCS holds further world coordinate descriptions, written after
	// Axes: at most one primary (Key 0), only when Axes is unset, and
	// alternates with distinct keys.
	WCS   []WCS
	Cards []Card // extra cards, written after the structural and WCS ones
}

// WCS is one world coordinate description of an image (Standard 4.0,
// sec. 8): intermediate world coordinates x_i = Delta_i Σ_j PC_ij
// (p_j − RefPixel_j), then world = RefValue + x for linear axes, or the
// projection its CTYPEs name (e.g. "RA---TAN", "DEC--TAN": Calabretta &
// Greisen 2002). Every keyword of an alternate description ends in its Key
// (sec. 8.2.1: CTYPE1A, PC1_2A, ...).
type WCS struct {
	Key  byte    // 0: the primary description; 'A'–'Z': an alternate one
	Name string  // WCSNAMEa; "" = omit
	Axes [2]Axis // both must have a Type
	// PC is the matrix PCi_j, PC[i-1][j-1]; nil = the unit matrix (not
	// written). It must be invertible.
	PC *[2][2]float64
	// RefSystem is RADESYSa, the celestial reference frame (e.g. "ICRS");
	// "" = omit.
	RefSystem string
}

// Encode writes a complete FITS file to w: a primary HDU (NAXIS = 0,
// EXTEND = T, followed by the primary cards) and then one IMAGE extension
// (BITPIX = -32) per image, in order. All input is checked before anything is
// written; on a validation error w receives nothing. Errors from w are
// returned as they are met.
func Encode(w io.Writer, primary []Card, images []Image) error {
	if w == nil {
		return errors.New("fits: nil writer")
	}
	headers := make([][]byte, 0, 1+len(images))
	h, err := primaryHeader(primary)
	if err != nil {
		return fmt.Errorf("fits: primary header: %w", err)
	}
	headers = append(headers, h)

	names := make(map[string]int, len(images))
	for i := range images {
		im := &images[i]
		h, err := imageHeader(im)
		if err != nil {
			return fmt.Errorf("fits: image %d (%q): %w", i, im.Name, err)
		}
		if im.Name != "" {
			// Trailing spaces are not significant in FITS strings
			// (sec. 4.2.1) and EXTNAME is commonly matched without
			// regard to case, so compare names that way.
			key := strings.ToUpper(strings.TrimRight(im.Name, " "))
			if j, dup := names[key]; dup {
				return fmt.Errorf("fits: image %d: EXTNAME %q already used by image %d", i, im.Name, j)
			}
			names[key] = i
		}
		headers = append(headers, h)
	}

	bw := bufio.NewWriterSize(w, bufferSize)
	if _, err := bw.Write(headers[0]); err != nil {
		return fmt.Errorf("fits: writing primary header: %w", err)
	}
	var row []float32 // one row of a Rows image, reused
	for i := range images {
		im := &images[i]
		if _, err := bw.Write(headers[i+1]); err != nil {
			return fmt.Errorf("fits: writing header of image %d: %w", i, err)
		}
		var err error
		if im.Rows == nil {
			err = writeData(bw, im.Data)
			if err == nil {
				err = padData(bw, len(im.Data))
			}
		} else {
			if cap(row) < im.Width {
				row = make([]float32, im.Width)
			}
			row = row[:im.Width]
			for j := 0; j < im.Height && err == nil; j++ {
				im.Rows(j, row)
				err = writeData(bw, row)
			}
			if err == nil {
				err = padData(bw, im.Width*im.Height)
			}
		}
		if err != nil {
			return fmt.Errorf("fits: writing data of image %d: %w", i, err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("fits: %w", err)
	}
	return nil
}

// primaryHeader builds the primary header: mandatory keywords in the order of
// Standard 4.0, sec. 4.4.1.1 (SIMPLE, BITPIX, NAXIS), then EXTEND
// (sec. 4.4.2.1), then the caller's cards and END.
func primaryHeader(cards []Card) ([]byte, error) {
	h := newHeader(len(cards) + 5)
	h.add("SIMPLE", true, "conforms to FITS Standard 4.0")
	h.add("BITPIX", 8, "no primary data")
	h.add("NAXIS", 0, "no primary data")
	h.add("EXTEND", true, "IMAGE extensions follow")
	if err := h.addUser(cards); err != nil {
		return nil, err
	}
	return h.finish()
}

// imageHeader checks an image and builds its IMAGE extension header:
// mandatory keywords in the order of Standard 4.0, sec. 7.1.1, then EXTNAME,
// BUNIT, the WCS keywords, the caller's cards and END.
func imageHeader(im *Image) ([]byte, error) {
	if im.Width < 1 || im.Height < 1 {
		return nil, fmt.Errorf("size %d×%d: width and height must be at least 1", im.Width, im.Height)
	}
	if im.Width > math.MaxInt/4/im.Height {
		return nil, fmt.Errorf("size %d×%d too large", im.Width, im.Height)
	}
	if im.Rows != nil {
		if im.Data != nil {
			return nil, errors.New("both Data and Rows given: give one")
		}
	} else if n := im.Width * im.Height; len(im.Data) != n {
		return nil, fmt.Errorf("len(Data) = %d, want Width*Height = %d", len(im.Data), n)
	}
	h := newHeader(len(im.Cards) + 20)
	h.add("XTENSION", "IMAGE", "image extension")
	h.add("BITPIX", -32, "IEEE-754 single precision")
	h.add("NAXIS", 2, "number of data axes")
	h.add("NAXIS1", im.Width, "width (x)")
	h.add("NAXIS2", im.Height, "height (y)")
	h.add("PCOUNT", 0, "no parameters")
	h.add("GCOUNT", 1, "one group")
	if im.Name != "" {
		h.add("EXTNAME", im.Name, "")
	}
	if im.Unit != "" {
		h.add("BUNIT", im.Unit, "unit of the pixel values")
	}
	if err := addWCS(h, WCS{Axes: im.Axes}, true); err != nil {
		return nil, err
	}
	keys := map[byte]bool{}
	if im.Axes[0].Type != "" || im.Axes[1].Type != "" {
		keys[0] = true
	}
	for _, w := range im.WCS {
		if w.Key != 0 && (w.Key < 'A' || w.Key > 'Z') {
			return nil, fmt.Errorf("WCS key %q: want 0 (primary) or a letter A-Z", w.Key)
		}
		if keys[w.Key] {
			if w.Key == 0 {
				return nil, errors.New("primary WCS given twice (Axes and WCS)")
			}
			return nil, fmt.Errorf("WCS %c given twice", w.Key)
		}
		keys[w.Key] = true
		if err := addWCS(h, w, false); err != nil {
			return nil, err
		}
	}
	if err := h.addUser(im.Cards); err != nil {
		return nil, err
	}
	return h.finish()
}

// addWCS appends the WCS keywords of Standard 4.0, sec. 8.2, of one
// description (suffixed with its Key if it is an alternate). Either both
// axes have a Type or neither does; with optional set, neither means no
// description at all.
func addWCS(h *header, w WCS, optional bool) error {
	if optional && w.Axes[0].Type == "" && w.Axes[1].Type == "" {
		return nil
	}
	suffix, what := "", "WCS"
	if w.Key != 0 {
		suffix = string(w.Key)
		what = "WCS " + suffix
	}
	for i, a := range w.Axes {
		n := i + 1
		if a.Type == "" {
			return fmt.Errorf("%s axis %d has no Type while axis %d has one", what, n, 3-n)
		}
		for _, v := range [...]struct {
			name string
			x    float64
		}{{"RefPixel", a.RefPixel}, {"RefValue", a.RefValue}, {"Delta", a.Delta}} {
			if math.IsNaN(v.x) || math.IsInf(v.x, 0) {
				return fmt.Errorf("%s axis %d: %s = %v is not finite", what, n, v.name, v.x)
			}
		}
		if a.Delta == 0 {
			// Greisen & Calabretta (2002), sec. 2.1.2: CDELTi shall not be zero.
			return fmt.Errorf("%s axis %d: Delta must not be zero", what, n)
		}
	}
	if m := w.PC; m != nil {
		for _, v := range [...]float64{m[0][0], m[0][1], m[1][0], m[1][1]} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%s: PC matrix element %v is not finite", what, v)
			}
		}
		// Greisen & Calabretta (2002), sec. 2.1.2: PCi_j must be invertible.
		if det := m[0][0]*m[1][1] - m[0][1]*m[1][0]; !(math.Abs(det) > 0) {
			return fmt.Errorf("%s: PC matrix is singular", what)
		}
	}
	if w.Name != "" {
		h.add("WCSNAME"+suffix, w.Name, "name of this coordinate description")
	}
	for i, a := range w.Axes {
		h.add(fmt.Sprintf("CTYPE%d%s", i+1, suffix), a.Type, fmt.Sprintf("axis %d coordinate type", i+1))
	}
	for i, a := range w.Axes {
		if a.Unit != "" {
			h.add(fmt.Sprintf("CUNIT%d%s", i+1, suffix), a.Unit, fmt.Sprintf("axis %d unit", i+1))
		}
	}
	for i, a := range w.Axes {
		h.add(fmt.Sprintf("CRPIX%d%s", i+1, suffix), a.RefPixel, "reference pixel (1-based)")
	}
	for i, a := range w.Axes {
		h.add(fmt.Sprintf("CRVAL%d%s", i+1, suffix), a.RefValue, "world value at reference pixel")
	}
	for i, a := range w.Axes {
		h.add(fmt.Sprintf("CDELT%d%s", i+1, suffix), a.Delta, "world increment per pixel")
	}
	if m := w.PC; m != nil {
		for i := range 2 {
			for j := range 2 {
				h.add(fmt.Sprintf("PC%d_%d%s", i+1, j+1, suffix), m[i][j], "linear transformation matrix")
			}
		}
	}
	if w.RefSystem != "" {
		h.add("RADESYS"+suffix, w.RefSystem, "celestial reference frame")
	}
	return h.err
}

// writeData writes pixels as big-endian IEEE-754 float32 (Standard 4.0,
// sec. 5.3), unchanged (NaN payloads and signed zeros included). It
// encodes straight into the buffer's free space, so it allocates nothing.
func writeData(bw *bufio.Writer, data []float32) error {
	for len(data) > 0 {
		if bw.Available() < 4 {
			if err := bw.Flush(); err != nil {
				return err
			}
		}
		k := min(bw.Available()/4, len(data))
		b := bw.AvailableBuffer()[:4*k]
		for i, v := range data[:k] {
			binary.BigEndian.PutUint32(b[4*i:4*i+4], math.Float32bits(v))
		}
		if _, err := bw.Write(b); err != nil {
			return err
		}
		data = data[k:]
	}
	return nil
}

// padData writes the zero bytes that fill the last data block of an image of
// n pixels (Standard 4.0, sec. 3.3.2).
func padData(bw *bufio.Writer, n int) error {
	if p := (blockSize - 4*n%blockSize) % blockSize; p > 0 {
		_, err := bw.Write(zeroBlock[:p])
		return err
	}
	return nil
}
