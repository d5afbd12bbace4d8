package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"kerrscope/scene"
)

var errHelp = errors.New("help shown")

// invalidValue matches the flag package's message for a value its flag
// refuses: the quoted value, the flag name, the reason.
var invalidValue = regexp.MustCompile(`(?s)^invalid value (".*") for flag -([\w-]+): (.*)$`)

// flags wraps a FlagSet so that every parse error is one line naming the
// flag, and --help prints the flags to stdout.
type flags struct {
	fs     *flag.FlagSet
	out    io.Writer
	set    map[string]bool
	failed error        // the last scene flag value that could not be read
	base   *scene.Scene // the scene the command starts from (sceneFlags)
	hidden map[string]bool
}

// hide keeps a flag out of --help; it is still parsed (so that using it
// can be refused with a reason).
func (f *flags) hide(name string) {
	if f.hidden == nil {
		f.hidden = map[string]bool{}
	}
	f.hidden[name] = true
}

func newFlags(name string, stdout io.Writer) *flags {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	return &flags{fs: fs, out: stdout}
}

func (f *flags) parse(args []string) error {
	err := f.fs.Parse(args)
	if errors.Is(err, flag.ErrHelp) {
		f.help()
		return errHelp
	}
	if err != nil && f.failed != nil {
		return usagef("%w", f.failed)
	}
	if err != nil {
		msg := err.Error()
		if m := invalidValue.FindStringSubmatch(msg); m != nil {
			v, uerr := strconv.Unquote(m[1])
			if uerr != nil {
				v = m[1]
			}
			return usagef("--%s %s: %s", m[2], scene.Cut(v), cutLine(f.reason(m[2], m[3])))
		}
		// flag's messages say "-name"; we document "--name".
		msg = strings.Replace(msg, " -", " --", 1)
		return usagef("%s", cutLine(msg))
	}
	if f.fs.NArg() > 0 {
		return usagef("unexpected argument %q", f.fs.Arg(0))
	}
	f.set = map[string]bool{}
	f.fs.Visit(func(fl *flag.Flag) { f.set[fl.Name] = true })
	return nil
}

// cutLine shortens a message to at most 240 characters, ending in "…"
// when cut, so that an echoed value cannot make an error line huge.
func cutLine(s string) string {
	const n = 240
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	return string([]rune(s)[:n-1]) + "…"
}

// reason puts the flag package's reason for refusing a value of flag name
// in words.
func (f *flags) reason(name, why string) string {
	if why != "parse error" && why != "value out of range" {
		return why
	}
	fl := f.fs.Lookup(name)
	if fl == nil {
		return why
	}
	if _, err := strconv.Atoi(fl.DefValue); err == nil {
		if why == "value out of range" {
			return "whole number too large"
		}
		return "not a whole number"
	}
	if b, ok := fl.Value.(interface{ IsBoolFlag() bool }); ok && b.IsBoolFlag() {
		return "must be true or false"
	}
	return why
}

// given reports whether the user set the flag.
func (f *flags) given(name string) bool { return f.set[name] }

// number is a float flag that refuses NaN and ±Inf at parse time.
type number struct{ v *float64 }

func (n number) String() string {
	if n.v == nil {
		return ""
	}
	return strconv.FormatFloat(*n.v, 'g', -1, 64)
}

func (n number) Set(s string) error {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil {
		return fmt.Errorf("not a number")
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("must be a finite number")
	}
	*n.v = v
	return nil
}

func (f *flags) float(p *float64, name string, def float64, usage string) {
	*p = def
	f.fs.Var(number{p}, name, usage)
}

// defaultNote matches a default stated in a flag's usage text.
var defaultNote = regexp.MustCompile(` \(default[ :][^()]*(\([^()]*\)[^()]*)*\)`)

// help lists the flags with two dashes, their meaning and their defaults:
// for scene flags, the values of the scene the command starts from. A
// default the usage text states is shown only when no value replaces it.
func (f *flags) help() {
	fmt.Fprintf(f.out, "usage: kerrscope %s [flags]\n\nflags:\n", f.fs.Name())
	var defaults map[string]string
	if f.base != nil {
		defaults = f.base.Values()
	}
	f.fs.VisitAll(func(fl *flag.Flag) {
		if f.hidden[fl.Name] {
			return
		}
		def, usage := fl.DefValue, fl.Usage
		if sf, ok := fl.Value.(sceneFlag); ok {
			def = defaults[sf.field.Key]
			if f.base.Automatic(sf.field.Key) {
				def = "automatic"
			}
			if sf.field.Bool {
				def = "" // a switch: off unless given
			}
		}
		if strings.Contains(usage, "(required)") {
			def = ""
		}
		if def == "false" {
			def = ""
		}
		if defaultNote.MatchString(usage) {
			if _, ok := fl.Value.(sceneFlag); !ok || def == "" {
				def = "" // the usage text states it
			} else {
				usage = defaultNote.ReplaceAllString(usage, "")
			}
		}
		name := "--" + fl.Name
		if def != "" {
			fmt.Fprintf(f.out, "  %-18s %s (default %s)\n", name, usage, def)
			return
		}
		fmt.Fprintf(f.out, "  %-18s %s\n", name, usage)
	})
}
