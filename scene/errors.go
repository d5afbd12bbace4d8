package scene

import (
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"
)

// FieldError is a scene value that is refused. Key is the scene key
// (section.key; its flag is listed by Fields), Value the value found as
// written (cut to MaxValueLen characters) and Allowed says what is
// accepted. Callers inspect it with errors.As.
type FieldError struct {
	Key     string
	Value   string
	Allowed string
}

func (e *FieldError) Error() string {
	if e.Value == "" {
		return e.Key + ": " + e.Allowed
	}
	return e.Key + " = " + e.Value + ": " + e.Allowed
}

// fieldErr returns a *FieldError for key with value v (formatted with
// %v and cut) and the allowed range as a format.
func fieldErr(key string, v any, format string, args ...any) *FieldError {
	return &FieldError{Key: key, Value: Cut(fmt.Sprint(v)), Allowed: fmt.Sprintf(format, args...)}
}

// ParseError is a scene file that cannot be read as TOML into a scene:
// the file name, the line (1-based; 0 when unknown), the key when the
// problem is at a key, what was found there (cut to MaxValueLen) and the
// problem in words.
type ParseError struct {
	File    string
	Line    int
	Key     string
	Found   string
	Problem string
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	b.WriteString(": ")
	if e.Key != "" {
		fmt.Fprintf(&b, "key %q: ", e.Key)
	}
	b.WriteString(e.Problem)
	if e.Found != "" {
		b.WriteString(" (found " + e.Found + ")")
	}
	return b.String()
}

// MaxValueLen is the number of characters of a value that error messages
// quote; longer values are cut and end in "…".
const MaxValueLen = 60

// Cut returns s shortened to at most MaxValueLen characters, ending in
// "…" when cut, with invalid UTF-8 and control characters quoted so that
// a message stays one readable line.
func Cut(s string) string {
	if !utf8.ValidString(s) || strings.ContainsFunc(s, func(r rune) bool { return r < 0x20 || r == 0x7f }) {
		s = strconv.Quote(s)
		s = s[1 : len(s)-1]
	}
	if utf8.RuneCountInString(s) <= MaxValueLen {
		return s
	}
	n := 0
	for i := range s {
		if n == MaxValueLen-1 {
			return s[:i] + "…"
		}
		n++
	}
	return s
}
