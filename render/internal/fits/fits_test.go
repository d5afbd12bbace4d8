package fits

import (
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// hdu is one header-data unit as split from a file by the test's own reader.
type hdu struct {
	cards  []string // 80-byte records up to and including END
	header []byte   // the whole header, padding included
	data   []byte   // the whole data area, padding included
	ndata  int      // significant data bytes, |BITPIX|/8 × ΠNAXISn
}

// value returns the raw value field of the first card with the keyword.
func (h hdu) value(t *testing.T, key string) string {
	t.Helper()
	for _, c := range h.cards {
		if strings.TrimRight(c[:8], " ") == key {
			return c[10:]
		}
	}
	t.Fatalf("keyword %s not found", key)
	return ""
}

func (h hdu) int(t *testing.T, key string) int {
	t.Helper()
	n, err := strconv.Atoi(strings.TrimSpace(h.value(t, key)[:20]))
	if err != nil {
		t.Fatalf("%s: %v", key, err)
	}
	return n
}

// splitHDUs reads a FITS byte stream with the rules of FITS Standard 4.0,
// sec. 3.1 (2880-byte blocks), 4.4.1 (END ends the header, NAXISn and BITPIX
// give the data size) and 7.1 (PCOUNT = 0, GCOUNT = 1 for images).
func splitHDUs(t *testing.T, b []byte) []hdu {
	t.Helper()
	var out []hdu
	for len(b) > 0 {
		var h hdu
		end := -1
		for off := 0; off+80 <= len(b); off += 80 {
			c := string(b[off : off+80])
			h.cards = append(h.cards, c)
			if strings.TrimRight(c, " ") == "END" {
				end = off + 80
				break
			}
		}
		if end < 0 {
			t.Fatalf("HDU %d: no END card", len(out))
		}
		hlen := (end + blockSize - 1) / blockSize * blockSize
		if hlen > len(b) {
			t.Fatalf("HDU %d: header block truncated", len(out))
		}
		h.header = b[:hlen]
		naxis := h.int(t, "NAXIS")
		n := 0
		if naxis > 0 {
			n = abs(h.int(t, "BITPIX")) / 8
			for i := 1; i <= naxis; i++ {
				n *= h.int(t, "NAXIS"+strconv.Itoa(i))
			}
		}
		h.ndata = n
		dlen := (n + blockSize - 1) / blockSize * blockSize
		if hlen+dlen > len(b) {
			t.Fatalf("HDU %d: data truncated", len(out))
		}
		h.data = b[hlen : hlen+dlen]
		out = append(out, h)
		b = b[hlen+dlen:]
	}
	return out
}

func abs(n int) int {
	if n < 0 {
		return -n
	}
	return n
}

func encode(t *testing.T, primary []Card, images []Image) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := Encode(&buf, primary, images); err != nil {
		t.Fatalf("Encode: %v", err)
	}
	return buf.Bytes()
}

func ramp(w, h int) []float32 {
	d := make([]float32, w*h)
	for i := range d {
		d[i] = float32(i) * 0.25
	}
	return d
}

// sample is a file with a primary header and two images of different sizes.
func sample() ([]Card, []Image) {
	primary := []Card{
		{Key: "OBJECT", Value: "disk", Comment: "what is shown"},
		{Key: "SPIN", Value: 0.9375, Comment: "a/M"},
		{Key: "HISTORY", Value: "written by kerrscope"},
	}
	images := []Image{
		{
			Name: "REDSHIFT", Width: 5, Height: 3, Data: ramp(5, 3),
			Axes: [2]Axis{
				{Type: "XSCREEN", RefPixel: 3, RefValue: 0, Delta: 0.5},
				{Type: "YSCREEN", RefPixel: 2, RefValue: 0, Delta: 0.5},
			},
			Cards: []Card{{Key: "RETRO", Value: false}, {Key: "NPIX", Value: int64(15)}},
		},
		{Name: "FLUX", Unit: "erg/s/cm2", Width: 700, Height: 2, Data: ramp(700, 2)},
	}
	return primary, images
}

// FITS Standard 4.0, sec. 3.1: every HDU, header and data, is a whole
// number of 2880-byte blocks; sec. 4.4.1: headers are filled with ASCII
// spaces after END; sec. 3.3.2 and 7.1.3: data are filled with zero bytes.
func TestBlockStructure(t *testing.T) {
	primary, images := sample()
	b := encode(t, primary, images)
	if len(b)%blockSize != 0 {
		t.Fatalf("file length %d is not a multiple of %d", len(b), blockSize)
	}
	hdus := splitHDUs(t, b)
	if len(hdus) != 1+len(images) {
		t.Fatalf("got %d HDUs, want %d", len(hdus), 1+len(images))
	}
	for i, h := range hdus {
		if len(h.header)%blockSize != 0 || len(h.data)%blockSize != 0 {
			t.Errorf("HDU %d: header %d / data %d bytes not whole blocks", i, len(h.header), len(h.data))
		}
		for k, c := range h.header[80*len(h.cards):] {
			if c != ' ' {
				t.Fatalf("HDU %d: header padding byte %d is %#x, want space", i, k, c)
			}
		}
		for k, c := range h.data[h.ndata:] {
			if c != 0 {
				t.Fatalf("HDU %d: data padding byte %d is %#x, want 0", i, k, c)
			}
		}
	}
	// Primary HDU has no data (NAXIS = 0); each image holds 4·W·H bytes.
	if hdus[0].ndata != 0 {
		t.Errorf("primary HDU has %d data bytes", hdus[0].ndata)
	}
	for i, im := range images {
		if got, want := hdus[i+1].ndata, 4*im.Width*im.Height; got != want {
			t.Errorf("image %d: %d data bytes, want %d", i, got, want)
		}
	}
}

// FITS Standard 4.0, sec. 4.1.1: keyword records are 80 characters of the
// restricted ASCII set, decimal 32–126.
func TestCardsArePrintableASCII(t *testing.T) {
	primary, images := sample()
	for i, h := range splitHDUs(t, encode(t, primary, images)) {
		for _, c := range h.cards {
			if len(c) != 80 {
				t.Errorf("HDU %d: card of %d bytes", i, len(c))
			}
			for k := 0; k < len(c); k++ {
				if c[k] < 32 || c[k] > 126 {
					t.Errorf("HDU %d: card %q: byte %d = %#x not printable", i, c, k, c[k])
				}
			}
			// sec. 4.1.2.2: valued keywords have "= " in columns 9–10.
			key := strings.TrimRight(c[:8], " ")
			if key != "END" && key != "COMMENT" && key != "HISTORY" && c[8:10] != "= " {
				t.Errorf("HDU %d: card %q has no value indicator in columns 9-10", i, c)
			}
		}
	}
}

// FITS Standard 4.0, sec. 4.4.1.1 (primary: SIMPLE, BITPIX, NAXIS; EXTEND,
// sec. 4.4.2.1) and sec. 7.1.1 (IMAGE: XTENSION, BITPIX, NAXIS, NAXIS1,
// NAXIS2, PCOUNT, GCOUNT), each header closed by END.
func TestMandatoryKeywordOrder(t *testing.T) {
	primary, images := sample()
	hdus := splitHDUs(t, encode(t, primary, images))
	type kv struct{ key, val string }
	check := func(i int, h hdu, want []kv) {
		t.Helper()
		if len(h.cards) < len(want)+1 {
			t.Fatalf("HDU %d: only %d cards", i, len(h.cards))
		}
		for k, w := range want {
			c := h.cards[k]
			if got := strings.TrimRight(c[:8], " "); got != w.key {
				t.Errorf("HDU %d card %d: keyword %q, want %q", i, k+1, got, w.key)
				continue
			}
			if got := c[10:30]; w.val != "" && got != w.val {
				t.Errorf("HDU %d %s: value field %q, want %q", i, w.key, got, w.val)
			}
		}
		if last := h.cards[len(h.cards)-1]; last != "END"+strings.Repeat(" ", 77) {
			t.Errorf("HDU %d: last card %q, want END", i, last)
		}
	}
	check(0, hdus[0], []kv{
		{"SIMPLE", "                   T"},
		{"BITPIX", ""},
		{"NAXIS", "                   0"},
		{"EXTEND", "                   T"},
	})
	for i, im := range images {
		check(i+1, hdus[i+1], []kv{
			{"XTENSION", "'IMAGE   '          "},
			{"BITPIX", "                 -32"},
			{"NAXIS", "                   2"},
			{"NAXIS1", rj(strconv.Itoa(im.Width))},
			{"NAXIS2", rj(strconv.Itoa(im.Height))},
			{"PCOUNT", "                   0"},
			{"GCOUNT", "                   1"},
		})
	}
}

// rj right-justifies s in the 20 columns 11–30 (FITS Standard 4.0, sec. 4.2.3).
func rj(s string) string { return strings.Repeat(" ", 20-len(s)) + s }

// FITS Standard 4.0, sec. 5.3: BITPIX = -32 data are big-endian IEEE-754
// single precision; NaN is the undefined value for floats and is kept.
// The first pixel is (1,1) and axis 1 varies fastest (sec. 3.3.2).
func TestDataBigEndianExact(t *testing.T) {
	values := []float32{
		0, float32(math.Copysign(0, -1)), 1, -2, 0.1, math.MaxFloat32, -math.MaxFloat32,
		math.SmallestNonzeroFloat32, float32(math.Inf(1)), float32(math.Inf(-1)),
		float32(math.NaN()), math.Float32frombits(0x7fc00001), math.Float32frombits(0xffbfffff),
		123456.789, -3.5e-20,
	}
	w, h := 5, 3
	values = values[:w*h]
	b := encode(t, nil, []Image{{Name: "D", Width: w, Height: h, Data: values}})
	d := splitHDUs(t, b)[1].data
	for k, v := range values {
		got := binary.BigEndian.Uint32(d[4*k:])
		if want := math.Float32bits(v); got != want {
			t.Errorf("pixel %d: bits %#08x, want %#08x", k, got, want)
		}
	}
	if got := binary.BigEndian.Uint32(d[4:]); got != 0x80000000 {
		t.Errorf("negative zero written as %#08x", got)
	}
}

// An image given by Rows is written like the same pixels given as Data:
// row j of the callback is FITS row j+1, axis 1 fastest (Standard 4.0,
// sec. 3.3.2), each row asked for once and in order, and the last block
// is filled with zeros (sec. 3.3.2).
func TestRowsStreamTheSamePixels(t *testing.T) {
	w, h := 700, 5 // rows of 2800 bytes: rows and blocks do not line up
	want := ramp(w, h)
	next := 0
	rows := func(j int, row []float32) {
		if j != next || len(row) != w {
			t.Fatalf("Rows(%d, len %d) called after row %d", j, len(row), next-1)
		}
		next++
		for i := range row {
			row[i] = float32(j*w+i) * 0.25 // the values of ramp
		}
	}
	b := encode(t, nil, []Image{{Name: "S", Width: w, Height: h, Rows: rows}, {Name: "T", Width: 2, Height: 1, Data: []float32{1, 2}}})
	if next != h {
		t.Fatalf("Rows called for %d rows, want %d", next, h)
	}
	hdus := splitHDUs(t, b)
	if len(hdus) != 3 {
		t.Fatalf("%d HDUs, want 3", len(hdus))
	}
	d := hdus[1].data
	if len(d)%blockSize != 0 || len(d) < 4*w*h {
		t.Fatalf("data of %d bytes", len(d))
	}
	for k, v := range want {
		if got := binary.BigEndian.Uint32(d[4*k:]); got != math.Float32bits(v) {
			t.Fatalf("pixel %d: bits %#08x, want %#08x", k, got, math.Float32bits(v))
		}
	}
	for k := 4 * w * h; k < len(d); k++ {
		if d[k] != 0 {
			t.Fatalf("fill byte %d is %#02x, want 0", k, d[k])
		}
	}
	if !bytes.Equal(b, encode(t, nil, []Image{{Name: "S", Width: w, Height: h, Data: want}, {Name: "T", Width: 2, Height: 1, Data: []float32{1, 2}}})) {
		t.Error("Rows and Data give different files")
	}
}

// FITS Standard 4.0, sec. 4.2.1.1 (strings: quote in column 11, embedded
// quotes doubled, at least 8 characters so the closing quote is at column 20
// or later), 4.2.2 (logical T/F in column 30), 4.2.3 (integers right-justified
// in columns 11–30).
func TestValueColumns(t *testing.T) {
	cases := []struct {
		value any
		field string // columns 11–30
	}{
		{true, "                   T"},
		{false, "                   F"},
		{0, "                   0"},
		{-17, "                 -17"},
		{int64(math.MaxInt64), " 9223372036854775807"},
		{int64(math.MinInt64), "-9223372036854775808"},
		{"disk", "'disk    '          "},
		{"", "'        '          "},
		{"O'Neil", "'O''Neil '          "},
		{"''", "'''''    '          "},
		{"exactly8", "'exactly8'          "},
		{" lead", "' lead   '          "},
		{"a much longer string", "'a much longer strin"},
	}
	for _, c := range cases {
		card, err := formatCard(Card{Key: "K", Value: c.value})
		if err != nil {
			t.Errorf("%v: %v", c.value, err)
			continue
		}
		if got := card[10:30]; got != c.field {
			t.Errorf("%#v: columns 11-30 %q, want %q", c.value, got, c.field)
		}
		if s, ok := c.value.(string); ok {
			if got := parseString(t, card); got != strings.TrimRight(s, " ") {
				t.Errorf("%q read back as %q", s, got)
			}
			if closing := strings.LastIndexByte(card, '\''); closing < 19 {
				t.Errorf("%q: closing quote in column %d, want ≥ 20", s, closing+1)
			}
		}
	}
}

// parseString reads a quoted string from column 11 as the standard
// describes (sec. 4.2.1.1): ” inside stands for ', trailing spaces are not
// significant.
func parseString(t *testing.T, card string) string {
	t.Helper()
	if card[10] != '\'' {
		t.Fatalf("card %q: no quote in column 11", card)
	}
	var b strings.Builder
	for i := 11; i < len(card); i++ {
		if card[i] == '\'' {
			if i+1 < len(card) && card[i+1] == '\'' {
				b.WriteByte('\'')
				i++
				continue
			}
			return strings.TrimRight(b.String(), " ")
		}
		b.WriteByte(card[i])
	}
	t.Fatalf("card %q: unterminated string", card)
	return ""
}

// FITS Standard 4.0, sec. 4.2.4: reals are right-justified in columns
// 11–30 with a decimal point (and an upper-case E exponent if any). A real
// that needs more than 20 characters to round-trip is written in free
// format from column 11. Either way strconv must read back the exact value.
func TestRealRoundTrip(t *testing.T) {
	values := []float64{
		0, math.Copysign(0, -1), 1, -1, 0.5, 0.1, 1.0 / 3, -2.0 / 3, 100, 123456, 1e6,
		1e15, 1e21, 1e-5, 1e-7, 6.02214076e23, 0.1 + 0.2, 9007199254740993,
		math.Pi, -math.E * 1e-200, math.MaxFloat64, -math.MaxFloat64,
		math.SmallestNonzeroFloat64, 2.2250738585072014e-308, -1.2345678901234567e-10,
		float64(math.MaxFloat32), float64(float32(0.1)),
	}
	r := rand.New(rand.NewPCG(1, 2))
	for len(values) < 3000 {
		x := math.Float64frombits(r.Uint64())
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			values = append(values, x)
		}
	}
	for _, x := range values {
		card, err := formatCard(Card{Key: "X", Value: x, Comment: "c"})
		if err != nil {
			t.Fatalf("%v: %v", x, err)
		}
		if len(card) != 80 {
			t.Fatalf("%v: card of %d bytes", x, len(card))
		}
		field, _, _ := strings.Cut(card[10:], " / ")
		s := strings.TrimSpace(field)
		if len(s) <= 20 {
			if field[:20] != rj(s) {
				t.Errorf("%v: %q not right-justified in columns 11-30", x, card)
			}
		} else if card[10] == ' ' {
			t.Errorf("%v: free-format value %q should start in column 11", x, card)
		}
		if len(s) > 24 {
			t.Errorf("%v: %q longer than any shortest float64 form needs", x, s)
		}
		mant, _, _ := strings.Cut(s, "E")
		if !strings.Contains(mant, ".") || strings.ContainsAny(s, "eDd ") {
			t.Errorf("%v: %q needs a decimal point in the mantissa and an upper-case exponent", x, s)
		}
		got, err := strconv.ParseFloat(s, 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(x) {
			t.Errorf("%v: written %q, read back %v (%v)", x, s, got, err)
		}
		// With at most 13 significant digits even "-d.dddddddddddddE-308"
		// (1+14+5 = 20 characters) fits the fixed format.
		if digits := sigDigits(x); digits <= 13 && len(s) > 20 {
			t.Errorf("%v (%d digits): %q should fit 20 columns", x, digits, s)
		}
	}
}

// sigDigits counts the significant digits of the shortest decimal form of x.
func sigDigits(x float64) int {
	m, _, _ := strings.Cut(strconv.FormatFloat(math.Abs(x), 'e', -1, 64), "e")
	return len(strings.Replace(m, ".", "", 1))
}

// FITS Standard 4.0, sec. 4.1.2.3: the comment follows a slash; it may be
// cut to fit the 80-column card, while a string value never is
// (sec. 4.2.1.1: the closing quote must be at or before column 80).
func TestCommentTruncationAndLongestString(t *testing.T) {
	long := strings.Repeat("c", 100)
	card, err := formatCard(Card{Key: "N", Value: 1, Comment: long})
	if err != nil {
		t.Fatal(err)
	}
	if want := "N       =                    1 / " + long[:47]; card != want {
		t.Errorf("got  %q\nwant %q", card, want)
	}
	s68 := strings.Repeat("s", 68)
	card, err = formatCard(Card{Key: "S", Value: s68, Comment: "dropped"})
	if err != nil {
		t.Fatal(err)
	}
	if want := "S       = '" + s68 + "'"; card != want {
		t.Errorf("got  %q\nwant %q", card, want)
	}
	q34 := strings.Repeat("'", 34) // 68 characters once doubled
	card, err = formatCard(Card{Key: "Q", Value: q34})
	if err != nil {
		t.Fatal(err)
	}
	if got := parseString(t, card); got != q34 {
		t.Errorf("read back %q", got)
	}
}

// FITS Standard 4.0, sec. 4.4.2.4: COMMENT and HISTORY carry text in
// columns 9–80 and no value indicator.
func TestCommentaryCards(t *testing.T) {
	text := strings.Repeat("h", 72)
	card, err := formatCard(Card{Key: "HISTORY", Value: text})
	if err != nil {
		t.Fatal(err)
	}
	if card != "HISTORY "+text {
		t.Errorf("got %q", card)
	}
	b := encode(t, []Card{{Key: "COMMENT", Value: "one"}, {Key: "COMMENT", Value: "two"}}, nil)
	cards := splitHDUs(t, b)[0].cards
	if cards[4][:11] != "COMMENT one" || cards[5][:11] != "COMMENT two" {
		t.Errorf("repeated COMMENT cards: %q, %q", cards[4], cards[5])
	}
}

// A tiny 2×1 image laid out by hand from FITS Standard 4.0: primary header
// (sec. 4.4.1.1), IMAGE extension header (sec. 7.1.1), each padded with
// spaces to 2880 bytes, then 1.0 and -2.0 as big-endian IEEE-754 singles
// (sec. 5.3: 0x3F800000 and 0xC0000000) padded with zeros to 2880 bytes.
func TestTinyImageLayout(t *testing.T) {
	got := encode(t, nil, []Image{{
		Name: "TINY", Width: 2, Height: 1, Data: []float32{1, -2},
		Cards: []Card{{Key: "SPIN", Value: 0.5}},
	}})
	card := func(s string) string { return s + strings.Repeat(" ", 80-len(s)) }
	block := func(cards ...string) []byte {
		var b []byte
		for _, c := range cards {
			b = append(b, card(c)...)
		}
		return append(b, bytes.Repeat([]byte{' '}, 2880-len(b))...)
	}
	var want []byte
	want = append(want, block(
		"SIMPLE  =                    T / conforms to FITS Standard 4.0",
		"BITPIX  =                    8 / no primary data",
		"NAXIS   =                    0 / no primary data",
		"EXTEND  =                    T / IMAGE extensions follow",
		"END",
	)...)
	want = append(want, block(
		"XTENSION= 'IMAGE   '           / image extension",
		"BITPIX  =                  -32 / IEEE-754 single precision",
		"NAXIS   =                    2 / number of data axes",
		"NAXIS1  =                    2 / width (x)",
		"NAXIS2  =                    1 / height (y)",
		"PCOUNT  =                    0 / no parameters",
		"GCOUNT  =                    1 / one group",
		"EXTNAME = 'TINY    '",
		"SPIN    =                  0.5",
		"END",
	)...)
	want = append(want, 0x3F, 0x80, 0x00, 0x00, 0xC0, 0x00, 0x00, 0x00)
	want = append(want, make([]byte, 2880-8)...)
	if len(got) != 3*2880 {
		t.Fatalf("length %d, want %d", len(got), 3*2880)
	}
	for i := range want {
		if got[i] != want[i] {
			lo := i / 80 * 80
			t.Fatalf("first difference at byte %d:\ngot  %q\nwant %q", i, got[lo:lo+80], want[lo:lo+80])
		}
	}
}

// A file with no images is a valid primary-only FITS file of one block.
func TestNoImages(t *testing.T) {
	b := encode(t, nil, nil)
	if len(b) != blockSize {
		t.Fatalf("length %d, want %d", len(b), blockSize)
	}
	if h := splitHDUs(t, b); len(h) != 1 {
		t.Fatalf("%d HDUs", len(h))
	}
}

// The same input must always give the same bytes.
func TestDeterministic(t *testing.T) {
	primary, images := sample()
	a := encode(t, primary, images)
	b := encode(t, primary, images)
	if !bytes.Equal(a, b) {
		t.Fatal("two encodings of the same input differ")
	}
}

func TestValidationErrors(t *testing.T) {
	good := func() Image {
		return Image{Name: "G", Width: 2, Height: 2, Data: make([]float32, 4)}
	}
	withCard := func(c Card) []Image {
		im := good()
		im.Cards = []Card{c}
		return []Image{im}
	}
	withImage := func(f func(*Image)) []Image {
		im := good()
		f(&im)
		return []Image{im}
	}
	wcs := [2]Axis{{Type: "ALPHA", Delta: 1}, {Type: "BETA", Delta: 1}}
	cases := []struct {
		name    string
		primary []Card
		images  []Image
		want    string // substring the error must contain
	}{
		// FITS Standard 4.0, sec. 4.1.2.1: keyword names.
		{"lowercase key", []Card{{Key: "spin", Value: 1}}, nil, `"spin"`},
		{"nine-char key", []Card{{Key: "ABCDEFGHI", Value: 1}}, nil, `"ABCDEFGHI"`},
		{"empty key", []Card{{Key: "", Value: 1}}, nil, `""`},
		{"space in key", []Card{{Key: "A B", Value: 1}}, nil, `"A B"`},
		{"dot in key", []Card{{Key: "A.B", Value: 1}}, nil, `"A.B"`},
		{"non-ASCII key", []Card{{Key: "Ä", Value: 1}}, nil, `"Ä"`},
		// sec. 4.4.1, 7.1.1: structural keywords are the encoder's.
		{"reserved SIMPLE", []Card{{Key: "SIMPLE", Value: true}}, nil, `"SIMPLE"`},
		{"reserved NAXIS", nil, withCard(Card{Key: "NAXIS", Value: 3}), `"NAXIS"`},
		{"reserved NAXIS3", nil, withCard(Card{Key: "NAXIS3", Value: 3}), `"NAXIS3"`},
		{"reserved BITPIX", nil, withCard(Card{Key: "BITPIX", Value: 16}), `"BITPIX"`},
		{"reserved XTENSION", nil, withCard(Card{Key: "XTENSION", Value: "TABLE"}), `"XTENSION"`},
		{"reserved PCOUNT", nil, withCard(Card{Key: "PCOUNT", Value: 0}), `"PCOUNT"`},
		{"reserved GCOUNT", nil, withCard(Card{Key: "GCOUNT", Value: 1}), `"GCOUNT"`},
		{"reserved EXTEND", []Card{{Key: "EXTEND", Value: false}}, nil, `"EXTEND"`},
		{"reserved END", []Card{{Key: "END", Value: 1}}, nil, `"END"`},
		{"reserved BSCALE", nil, withCard(Card{Key: "BSCALE", Value: 2.0}), `"BSCALE"`},
		{"reserved BZERO", nil, withCard(Card{Key: "BZERO", Value: 2.0}), `"BZERO"`},
		{"reserved BLANK", nil, withCard(Card{Key: "BLANK", Value: -1}), `"BLANK"`},
		{"reserved CONTINUE", []Card{{Key: "CONTINUE", Value: "x"}}, nil, `"CONTINUE"`},
		{"reserved EXTNAME", nil, withCard(Card{Key: "EXTNAME", Value: "X"}), `"EXTNAME"`},
		{"reserved BUNIT", nil, withCard(Card{Key: "BUNIT", Value: "K"}), `"BUNIT"`},
		{"reserved CTYPE1", nil, withCard(Card{Key: "CTYPE1", Value: "X"}), `"CTYPE1"`},
		{"reserved CDELT2", nil, withCard(Card{Key: "CDELT2", Value: 1.0}), `"CDELT2"`},
		// sec. 8.2: the WCS keywords of every description are the encoder's.
		{"reserved CTYPE1A", nil, withCard(Card{Key: "CTYPE1A", Value: "X"}), `"CTYPE1A"`},
		{"reserved PC1_2", nil, withCard(Card{Key: "PC1_2", Value: 0.5}), `"PC1_2"`},
		{"reserved CD2_1B", nil, withCard(Card{Key: "CD2_1B", Value: 0.5}), `"CD2_1B"`},
		{"reserved RADESYS", nil, withCard(Card{Key: "RADESYS", Value: "FK5"}), `"RADESYS"`},
		{"reserved WCSNAMEA", nil, withCard(Card{Key: "WCSNAMEA", Value: "x"}), `"WCSNAMEA"`},
		{"primary twice", nil, withImage(func(im *Image) { im.Axes = wcs; im.WCS = []WCS{{Axes: wcs}} }), "primary WCS given twice"},
		{"alternate twice", nil, withImage(func(im *Image) { im.WCS = []WCS{{Key: 'A', Axes: wcs}, {Key: 'A', Axes: wcs}} }), "WCS A given twice"},
		{"lower-case alternate", nil, withImage(func(im *Image) { im.WCS = []WCS{{Key: 'a', Axes: wcs}} }), "A-Z"},
		{"alternate without axes", nil, withImage(func(im *Image) { im.WCS = []WCS{{Key: 'B'}} }), "WCS B axis 1 has no Type"},
		{"singular PC", nil, withImage(func(im *Image) { im.WCS = []WCS{{Axes: wcs, PC: &[2][2]float64{{1, 2}, {2, 4}}}} }), "singular"},
		{"NaN PC", nil, withImage(func(im *Image) { im.WCS = []WCS{{Axes: wcs, PC: &[2][2]float64{{1, math.NaN()}, {0, 1}}}} }), "not finite"},
		{"duplicate key", []Card{{Key: "A", Value: 1}, {Key: "A", Value: 2}}, nil, `"A"`},
		// Supported value types.
		{"float32 value", []Card{{Key: "F", Value: float32(1)}}, nil, `"F"`},
		{"uint value", []Card{{Key: "U", Value: uint(1)}}, nil, `"U"`},
		{"nil value", []Card{{Key: "N", Value: nil}}, nil, `"N"`},
		{"slice value", []Card{{Key: "S", Value: []int{1}}}, nil, `"S"`},
		// sec. 4.2.4: reals are finite decimal numbers.
		{"NaN value", []Card{{Key: "R", Value: math.NaN()}}, nil, `"R"`},
		{"+Inf value", []Card{{Key: "R", Value: math.Inf(1)}}, nil, `"R"`},
		{"-Inf value", nil, withCard(Card{Key: "R", Value: math.Inf(-1)}), `"R"`},
		// sec. 4.2.1.1: strings of printable ASCII within the card.
		{"tab in string", []Card{{Key: "S", Value: "a\tb"}}, nil, `"S"`},
		{"newline in string", []Card{{Key: "S", Value: "a\nb"}}, nil, `"S"`},
		{"non-ASCII string", []Card{{Key: "S", Value: "é"}}, nil, `"S"`},
		{"DEL in string", []Card{{Key: "S", Value: "\x7f"}}, nil, `"S"`},
		{"69-char string", []Card{{Key: "S", Value: strings.Repeat("x", 69)}}, nil, `"S"`},
		{"string too long once quotes doubled", []Card{{Key: "S", Value: strings.Repeat("'", 35)}}, nil, `"S"`},
		{"non-ASCII comment", []Card{{Key: "C", Value: 1, Comment: "µ"}}, nil, `"C"`},
		// sec. 4.4.2.4: commentary cards.
		{"COMMENT not string", []Card{{Key: "COMMENT", Value: 1}}, nil, `"COMMENT"`},
		{"COMMENT with comment", []Card{{Key: "COMMENT", Value: "x", Comment: "y"}}, nil, `"COMMENT"`},
		{"HISTORY too long", []Card{{Key: "HISTORY", Value: strings.Repeat("h", 73)}}, nil, `"HISTORY"`},
		{"HISTORY control char", []Card{{Key: "HISTORY", Value: "\x00"}}, nil, `"HISTORY"`},
		// Image geometry.
		{"zero width", nil, withImage(func(im *Image) { im.Width, im.Data = 0, nil }), "width"},
		{"negative height", nil, withImage(func(im *Image) { im.Height = -1 }), "height"},
		{"short data", nil, withImage(func(im *Image) { im.Data = im.Data[:3] }), "len(Data)"},
		{"long data", nil, withImage(func(im *Image) { im.Data = make([]float32, 5) }), "len(Data)"},
		{"nil data", nil, withImage(func(im *Image) { im.Data = nil }), "len(Data)"},
		{"data and rows", nil, withImage(func(im *Image) { im.Rows = func(int, []float32) {} }), "Rows"},
		{"overflowing size", nil, withImage(func(im *Image) { im.Width, im.Height = math.MaxInt/2, 3 }), "too large"},
		// Image strings.
		{"name too long", nil, withImage(func(im *Image) { im.Name = strings.Repeat("n", 69) }), `"EXTNAME"`},
		{"name not ASCII", nil, withImage(func(im *Image) { im.Name = "ñ" }), `"EXTNAME"`},
		{"unit not ASCII", nil, withImage(func(im *Image) { im.Unit = "µm" }), `"BUNIT"`},
		{"duplicate EXTNAME", nil, []Image{good(), good()}, "EXTNAME"},
		{"duplicate EXTNAME by case and trailing space", nil,
			[]Image{good(), withImage(func(im *Image) { im.Name = "g " })[0]}, "EXTNAME"},
		// sec. 8.2; Greisen & Calabretta (2002): complete, finite, non-degenerate WCS.
		{"WCS axis 2 untyped", nil, withImage(func(im *Image) { im.Axes[0] = wcs[0] }), "axis 2"},
		{"WCS axis 1 untyped", nil, withImage(func(im *Image) { im.Axes[1] = wcs[1] }), "axis 1"},
		{"WCS zero delta", nil, withImage(func(im *Image) { im.Axes = wcs; im.Axes[1].Delta = 0 }), "Delta"},
		{"WCS NaN refpix", nil, withImage(func(im *Image) { im.Axes = wcs; im.Axes[0].RefPixel = math.NaN() }), "RefPixel"},
		{"WCS Inf refval", nil, withImage(func(im *Image) { im.Axes = wcs; im.Axes[0].RefValue = math.Inf(1) }), "RefValue"},
		{"WCS Inf delta", nil, withImage(func(im *Image) { im.Axes = wcs; im.Axes[0].Delta = math.Inf(-1) }), "Delta"},
		{"WCS type not ASCII", nil, withImage(func(im *Image) { im.Axes = wcs; im.Axes[0].Type = "α" }), `"CTYPE1"`},
		{"WCS unit too long", nil, withImage(func(im *Image) { im.Axes = wcs; im.Axes[1].Unit = strings.Repeat("u", 80) }), `"CUNIT2"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			err := Encode(&buf, c.primary, c.images)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not mention %s", err, c.want)
			}
			if buf.Len() != 0 {
				t.Errorf("%d bytes written despite the error", buf.Len())
			}
		})
	}
	if err := Encode(nil, nil, nil); err == nil {
		t.Error("nil writer: no error")
	}
}

// failWriter accepts n bytes and then fails.
type failWriter struct{ n int }

var errFull = errors.New("disk full")

func (f *failWriter) Write(p []byte) (int, error) {
	if len(p) > f.n {
		k := f.n
		f.n = 0
		return k, errFull
	}
	f.n -= len(p)
	return len(p), nil
}

// Write errors are returned, wherever in the file they happen.
func TestWriterErrors(t *testing.T) {
	primary, images := sample()
	size := len(encode(t, primary, images))
	for _, n := range []int{0, 100, blockSize, 2*blockSize + 7, size - 1} {
		err := Encode(&failWriter{n: n}, primary, images)
		if !errors.Is(err, errFull) {
			t.Errorf("failing after %d of %d bytes: error %v", n, size, err)
		}
	}
}

// Encoding allocates the same amount whatever the number of pixels. Both
// sizes have the same number of digits and exceed 255 (Go boxes smaller
// integers without allocating), so their headers are built alike; both span
// several output buffers.
func TestNoPerPixelAllocation(t *testing.T) {
	allocs := func(w, h int) float64 {
		im := []Image{{Name: "A", Width: w, Height: h, Data: ramp(w, h)}}
		return testing.AllocsPerRun(5, func() {
			if err := Encode(discard{}, nil, im); err != nil {
				t.Fatal(err)
			}
		})
	}
	small, large := allocs(300, 300), allocs(300, 900)
	if large != small {
		t.Errorf("%v allocations for 9·10^4 pixels, %v for 2.7·10^5", small, large)
	}
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }
