// Command kerrscope renders what a distant observer sees of a thin
// accretion disk around a Kerr black hole. It only parses flags and
// dispatches; the work is done by the scene, raytrace and render packages.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
)

// version is the program version, recorded in every output file.
const version = "0.1.0"

// usageError is bad input from the user: printed on one line, exit status
// 2. It wraps the error it was made from (format verb %w), so that callers
// can still find a *scene.FieldError in it with errors.As.
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

func usagef(format string, args ...any) error {
	return usageError{fmt.Errorf(format, args...)}
}

type command struct {
	name, summary string
	run           func(ctx context.Context, args []string, stdout, stderr io.Writer) error
}

func commands() []command {
	return []command{
		{"demo", "render the built-in demo scene into ./kerrscope-demo", runDemo},
		{"render", "render a scene: maps, shadow, spectrum, FITS (see --help)", runRender},
		{"locate", "find where a band of source radii lands on the screen (refined render + report)", runLocate},
		{"lensing", "widths of the lensing bands of each image order along screen directions", runLensing},
		{"sweep", "render a scene over a range of spins, inclinations, ... (resumable, shardable)", runSweep},
		{"sweep-merge", "merge a finished sweep: animated GIFs, all spectra in one plot", runSweepMerge},
		{"spot", "movie of an orbiting hot spot in observer time: frames, GIF, light curve, centroid, line profile vs time", runSpot},
		{"echo", "the disk's echo of a flash of a lamp on the spin axis: lamp profile and fractions, response ψ(E, t), lag spectra", runEcho},
		{"probe", "trace the photon of one screen point and list its disk crossings", runProbe},
		{"version", "print the program version", func(_ context.Context, _ []string, stdout, _ io.Writer) error {
			_, err := fmt.Fprintln(stdout, "kerrscope", version)
			return err
		}},
	}
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "kerrscope: images and line spectra of thin disks around Kerr black holes")
	fmt.Fprintln(w, "\nusage: kerrscope <command> [flags]   (kerrscope <command> --help for its flags)")
	fmt.Fprintln(w, "\ncommands:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-12s %s\n", c.name, c.summary)
	}
}

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		usage(stderr)
		return 2
	}
	switch args[0] {
	case "help", "-h", "--help":
		usage(stdout)
		return 0
	case "--version", "-v":
		args = append([]string{"version"}, args[1:]...)
	}
	for _, c := range commands() {
		if c.name != args[0] {
			continue
		}
		ctx, stop := signalContext()
		err := c.run(ctx, args[1:], stdout, stderr)
		stop()
		var ue usageError
		var sig signalError
		switch {
		case err == nil:
			return 0
		case errors.Is(err, errHelp):
			return 0
		case errors.As(err, &sig), errors.As(context.Cause(ctx), &sig):
			switch {
			case errors.As(err, new(signalError)):
			case errors.Is(err, context.Canceled):
				err = sig
			default:
				err = fmt.Errorf("%w; %v", sig, err)
			}
			fmt.Fprintf(stderr, "kerrscope %s: %v\n", c.name, err)
			return 128 + int(sig.sig) // the shell's status of a process ended by a signal (common practice)
		case errors.As(err, &ue):
			fmt.Fprintf(stderr, "kerrscope %s: %v\n", c.name, err)
			return 2
		default:
			fmt.Fprintf(stderr, "kerrscope %s: %v\n", c.name, err)
			return 1
		}
	}
	fmt.Fprintf(stderr, "kerrscope: unknown command %q (run kerrscope help)\n", args[0])
	return 2
}

// signalError is the cause of a context cancelled by a signal.
type signalError struct{ sig syscall.Signal }

func (e signalError) Error() string {
	name := map[syscall.Signal]string{syscall.SIGINT: "SIGINT", syscall.SIGTERM: "SIGTERM"}[e.sig]
	return "interrupted by " + name
}

// signalContext returns a context that SIGINT (Ctrl-C) or SIGTERM (what
// batch schedulers send before a hard kill) cancels with a signalError,
// and a stop function. After the first signal the default action is
// restored, so a second one ends the process at once: output files are
// journaled, and the next run into the directory completes or undoes an
// interrupted commit.
func signalContext() (context.Context, func()) {
	ctx, cancel := context.WithCancelCause(context.Background())
	ch := make(chan os.Signal, 1)
	signal.Notify(ch, os.Interrupt, syscall.SIGTERM)
	done := make(chan struct{})
	go func() {
		select {
		case s := <-ch:
			signal.Stop(ch)
			sig, _ := s.(syscall.Signal)
			cancel(signalError{sig})
		case <-done:
		}
	}()
	return ctx, func() {
		signal.Stop(ch)
		close(done)
		cancel(nil)
	}
}

// interrupted returns err, or when ctx was cancelled by a signal and err
// is its cancellation, the signal's error followed by what was kept.
func interrupted(ctx context.Context, err error, kept string) error {
	var sig signalError
	if errors.Is(err, context.Canceled) && errors.As(context.Cause(ctx), &sig) {
		return fmt.Errorf("%w; %s", sig, kept)
	}
	return err
}
