package fits

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

const (
	cardLen    = 80 // bytes per keyword record (Standard 4.0, sec. 4.1.1)
	keyLen     = 8  // keyword name field, columns 1–8 (sec. 4.1.2.1)
	valueStart = 10 // 0-based offset of column 11, where values begin (sec. 4.1.2.3)
	fixedWidth = 20 // fixed-format values occupy columns 11–30 (sec. 4.2)
	maxText    = cardLen - keyLen
)

// header accumulates the keyword records of one HDU. The first error is
// kept and later additions are ignored.
type header struct {
	buf  []byte
	seen map[string]bool
	err  error
}

func newHeader(cards int) *header {
	return &header{
		buf:  make([]byte, 0, (cards+1)*cardLen),
		seen: make(map[string]bool, cards),
	}
}

// add formats one card and appends it, rejecting a keyword that is already
// in the header (commentary keywords excepted).
func (h *header) add(key string, value any, comment string) {
	if h.err != nil {
		return
	}
	card, err := formatCard(Card{Key: key, Value: value, Comment: comment})
	if err != nil {
		h.err = err
		return
	}
	if !isCommentary(key) {
		if h.seen[key] {
			h.err = fmt.Errorf("card %q: keyword appears more than once", key)
			return
		}
		h.seen[key] = true
	}
	h.buf = append(h.buf, card...)
}

// addUser appends caller-supplied cards after checking that none of them is
// a keyword the encoder reserves.
func (h *header) addUser(cards []Card) error {
	for _, c := range cards {
		if h.err != nil {
			break
		}
		if reserved(c.Key) {
			return fmt.Errorf("card %q: keyword is reserved: the encoder writes it or it would change how the data are read", c.Key)
		}
		h.add(c.Key, c.Value, c.Comment)
	}
	return h.err
}

// finish appends END and pads the header with ASCII spaces to a whole
// number of 2880-byte blocks (Standard 4.0, sec. 4.4.1 and 3.1).
func (h *header) finish() ([]byte, error) {
	if h.err != nil {
		return nil, h.err
	}
	h.buf = append(h.buf, "END"...)
	n := (len(h.buf) + blockSize - 1) / blockSize * blockSize
	h.buf = slices.Grow(h.buf, n-len(h.buf))
	for len(h.buf) < n {
		h.buf = append(h.buf, ' ')
	}
	return h.buf, nil
}

// reserved reports whether key may not appear among caller-supplied cards:
// the mandatory keywords of sec. 4.4.1 and 7.1.1, END, EXTEND, keywords that
// change the meaning of the data array (BSCALE, BZERO, BLANK; sec. 4.4.2.5),
// CONTINUE (long strings are not written), and the keywords Encode derives
// from Image fields (EXTNAME, BUNIT and the WCS keywords of axes 1 and 2,
// primary or alternate: CTYPE, CUNIT, CRPIX, CRVAL, CDELT, PCi_j, CDi_j,
// WCSNAME, RADESYS, WCSAXES, each optionally suffixed with A–Z).
func reserved(key string) bool {
	switch key {
	case "SIMPLE", "BITPIX", "NAXIS", "EXTEND", "XTENSION", "PCOUNT", "GCOUNT", "END",
		"BSCALE", "BZERO", "BLANK", "CONTINUE", "EXTNAME", "BUNIT":
		return true
	}
	if rest, ok := strings.CutPrefix(key, "NAXIS"); ok && isDigits(rest) {
		return true
	}
	// Drop an alternate-description letter (sec. 8.2.1).
	base := key
	if n := len(key); n > 1 && key[n-1] >= 'A' && key[n-1] <= 'Z' {
		base = key[:n-1]
	}
	for _, k := range [...]string{key, base} {
		for _, p := range [...]string{"CTYPE", "CUNIT", "CRPIX", "CRVAL", "CDELT"} {
			if rest, ok := strings.CutPrefix(k, p); ok && (rest == "1" || rest == "2") {
				return true
			}
		}
		for _, p := range [...]string{"PC", "CD"} {
			if rest, ok := strings.CutPrefix(k, p); ok && len(rest) == 3 && rest[1] == '_' && strings.ContainsRune("12", rune(rest[0])) && strings.ContainsRune("12", rune(rest[2])) {
				return true
			}
		}
		switch k {
		case "WCSNAME", "RADESYS", "WCSAXES":
			return true
		}
	}
	return false
}

func isDigits(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

func isCommentary(key string) bool { return key == "COMMENT" || key == "HISTORY" }

// checkKey enforces sec. 4.1.2.1: 1–8 characters from A–Z, 0–9, '-', '_'.
func checkKey(key string) error {
	if len(key) < 1 || len(key) > keyLen {
		return fmt.Errorf("keyword %q must have 1 to %d characters", key, keyLen)
	}
	for i := 0; i < len(key); i++ {
		c := key[i]
		if !(c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '-' || c == '_') {
			return fmt.Errorf("keyword %q: character %q not allowed (use A-Z, 0-9, '-', '_')", key, c)
		}
	}
	return nil
}

// checkText enforces the restricted ASCII text characters 32–126 of
// sec. 4.1.1 / 4.2.1.
func checkText(s string) error {
	for i := 0; i < len(s); i++ {
		if s[i] < ' ' || s[i] > '~' {
			return fmt.Errorf("byte %#02x at offset %d is not printable ASCII", s[i], i)
		}
	}
	return nil
}

// formatCard returns the 80-character record for c.
func formatCard(c Card) (string, error) {
	if err := checkKey(c.Key); err != nil {
		return "", err
	}
	if isCommentary(c.Key) {
		return formatCommentary(c)
	}
	field, err := formatValue(c.Value)
	if err != nil {
		return "", fmt.Errorf("card %q: %w", c.Key, err)
	}
	if err := checkText(c.Comment); err != nil {
		return "", fmt.Errorf("card %q: comment: %w", c.Key, err)
	}
	var b strings.Builder
	b.Grow(cardLen)
	b.WriteString(c.Key)
	pad(&b, keyLen)
	b.WriteString("= ") // value indicator, columns 9–10 (sec. 4.1.2.2)
	b.WriteString(field)
	if c.Comment != "" {
		// " / " then as much of the comment as fits (sec. 4.1.2.3
		// recommends a space before the slash).
		if room := cardLen - b.Len() - 3; room > 0 {
			b.WriteString(" / ")
			b.WriteString(c.Comment[:min(room, len(c.Comment))])
		}
	}
	pad(&b, cardLen)
	return b.String(), nil
}

// formatCommentary writes COMMENT or HISTORY text in columns 9–80
// (sec. 4.4.2.4).
func formatCommentary(c Card) (string, error) {
	s, ok := c.Value.(string)
	if !ok {
		return "", fmt.Errorf("card %q: value must be a string, got %T", c.Key, c.Value)
	}
	if c.Comment != "" {
		return "", fmt.Errorf("card %q: commentary cards take no comment", c.Key)
	}
	if err := checkText(s); err != nil {
		return "", fmt.Errorf("card %q: %w", c.Key, err)
	}
	if len(s) > maxText {
		return "", fmt.Errorf("card %q: text of %d characters exceeds %d", c.Key, len(s), maxText)
	}
	var b strings.Builder
	b.Grow(cardLen)
	b.WriteString(c.Key)
	pad(&b, keyLen)
	b.WriteString(s)
	pad(&b, cardLen)
	return b.String(), nil
}

// pad appends spaces until b is n bytes long.
func pad(b *strings.Builder, n int) {
	for b.Len() < n {
		b.WriteByte(' ')
	}
}

// formatValue returns the value field starting at column 11. Logical,
// integer and real values are right-justified in columns 11–30 (sec. 4.2.2–
// 4.2.4); strings start with a quote in column 11 and are padded so that the
// field reaches column 30, which keeps comments aligned. A real whose
// shortest round-tripping form needs more than 20 characters is written in
// free format, starting at column 11.
func formatValue(v any) (string, error) {
	switch x := v.(type) {
	case bool:
		s := "F"
		if x {
			s = "T"
		}
		return rightJustify(s), nil
	case int:
		return rightJustify(strconv.Itoa(x)), nil
	case int64:
		return rightJustify(strconv.FormatInt(x, 10)), nil
	case float64:
		s, err := formatReal(x)
		if err != nil {
			return "", err
		}
		if len(s) > fixedWidth {
			return s, nil
		}
		return rightJustify(s), nil
	case string:
		return formatString(x)
	case nil:
		return "", fmt.Errorf("value is nil")
	default:
		return "", fmt.Errorf("unsupported value type %T (want bool, int, int64, float64 or string)", v)
	}
}

func rightJustify(s string) string {
	if len(s) >= fixedWidth {
		return s
	}
	return strings.Repeat(" ", fixedWidth-len(s)) + s
}

// formatString quotes s as in sec. 4.2.1.1: embedded quotes are doubled and
// the text is padded with spaces to at least 8 characters (so the closing
// quote is at column 20 or later). A string that does not fit on the card is
// an error: it is never truncated.
func formatString(s string) (string, error) {
	if err := checkText(s); err != nil {
		return "", fmt.Errorf("string value: %w", err)
	}
	q := strings.ReplaceAll(s, "'", "''")
	if len(q) < 8 {
		q += strings.Repeat(" ", 8-len(q))
	}
	field := "'" + q + "'"
	if valueStart+len(field) > cardLen {
		return "", fmt.Errorf("string value of %d characters (%d quoted) does not fit in columns 11–80", len(s), len(field))
	}
	if len(field) < fixedWidth {
		field += strings.Repeat(" ", fixedWidth-len(field))
	}
	return field, nil
}

// formatReal returns the shortest decimal form of x that parses back to
// exactly x, with a decimal point in the mantissa and an upper-case E
// exponent when one is used (sec. 4.2.4). Among the forms tried it prefers
// plain notation for moderate exponents, then scientific notation, then
// scientific with a compact exponent, taking the first that fits the 20
// fixed-format columns; if none fits (some 17-digit values do not), it
// returns the shortest. Infinities and NaN have no FITS representation as
// header values and are refused.
func formatReal(x float64) (string, error) {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "", fmt.Errorf("real value %v cannot be written in a FITS header", x)
	}
	// Shortest round-trip digits: "[-]d[.ddd]E±dd[d]".
	e := strconv.FormatFloat(x, 'E', -1, 64)
	mant, exp, _ := strings.Cut(e, "E")
	if !strings.Contains(mant, ".") {
		mant += ".0"
	}
	expN, err := strconv.Atoi(exp)
	if err != nil {
		return "", fmt.Errorf("real value %v: unexpected formatting %q", x, e)
	}
	var cands []string
	if expN >= -5 && expN < 15 {
		p := strconv.FormatFloat(x, 'f', -1, 64)
		if !strings.Contains(p, ".") {
			p += ".0"
		}
		cands = append(cands, p)
	}
	cands = append(cands,
		mant+"E"+exp,                // e.g. 1.5E+20, 2.5E-07
		mant+"E"+strconv.Itoa(expN), // e.g. 1.5E20, 2.5E-7
	)
	best := cands[0]
	for _, c := range cands {
		if len(c) <= fixedWidth {
			return c, nil
		}
		if len(c) < len(best) {
			best = c
		}
	}
	return best, nil
}
