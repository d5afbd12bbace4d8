package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

var errHelp = errors.New("help shown")

// flags wraps a FlagSet so that every parse error is one line naming the
// flag, and --help prints the flags to stdout.
type flags struct {
	fs  *flag.FlagSet
	out io.Writer
	set map[string]bool
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
	if err != nil {
		msg := err.Error()
		// flag's messages say "-name"; we document "--name".
		msg = strings.Replace(msg, " -", " --", 1)
		return usagef("%s", msg)
	}
	if f.fs.NArg() > 0 {
		return usagef("unexpected argument %q", f.fs.Arg(0))
	}
	f.set = map[string]bool{}
	f.fs.Visit(func(fl *flag.Flag) { f.set[fl.Name] = true })
	return nil
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

// help lists the flags with two dashes, their meaning and their defaults
// (for scene flags, the built-in scene's values).
func (f *flags) help() {
	fmt.Fprintf(f.out, "usage: kerrscope %s [flags]\n\nflags:\n", f.fs.Name())
	defaults := sceneDefaults()
	f.fs.VisitAll(func(fl *flag.Flag) {
		def := fl.DefValue
		if sf, ok := fl.Value.(sceneFlag); ok {
			def = defaults[sf.field.Key]
			if sf.field.Bool {
				def = "" // a switch: off unless given
			}
		}
		if strings.Contains(fl.Usage, "(required)") {
			def = ""
		}
		name := "--" + fl.Name
		if _, isBool := fl.Value.(interface{ IsBoolFlag() bool }); !isBool || def != "false" {
			if def != "" && def != "false" {
				fmt.Fprintf(f.out, "  %-18s %s (default %s)\n", name, fl.Usage, def)
				return
			}
		}
		fmt.Fprintf(f.out, "  %-18s %s\n", name, fl.Usage)
	})
}
