package app

import (
	"flag"
	"fmt"
	"strconv"
	"strings"

	"dimerpath/app/gui"
)

// The desktop window: "dimerpath" with no arguments opens it on the
// built-in demo, "dimerpath open DESIGN.json" on a file, and
// "--screenshot FILE" renders it to a PNG for CI and the README.
func init() {
	run := func(fs *flag.FlagSet) func(Env, []string) int {
		shot := fs.String("screenshot", "", "plan the design, render the main window with the route to this PNG `file`, and exit")
		size := fs.String("size", "1600x1000", "window size `WxH` in pixels for --screenshot")
		return func(env Env, args []string) int {
			if len(args) > 1 {
				fmt.Fprintf(env.Stderr, "dimerpath: one design file at most, got %d\n", len(args))
				return ExitFailure
			}
			o := gui.RunOptions{Screenshot: *shot, Stderr: env.Stderr, Generator: "dimerpath " + Version}
			if len(args) == 1 {
				o.Design = args[0]
			}
			w, h, err := parseSize(*size)
			if err != nil {
				fmt.Fprintf(env.Stderr, "dimerpath: --size %q: %v\n", *size, err)
				return ExitFailure
			}
			o.Width, o.Height = w, h
			if err := checkDisplay(); err != nil {
				fmt.Fprintf(env.Stderr, "dimerpath: %v\n", err)
				return ExitFailure
			}
			return gui.Run(o)
		}
	}
	Register(&Command{
		Name:         "gui",
		Usage:        "gui [DESIGN.json] [--screenshot FILE.png] [--size WxH]",
		Summary:      "open the desktop window (the default when no command is given)",
		NeedsDisplay: true,
		Help: `Opens the design (the built-in demo without one) in the desktop window:
paint on the lattice, check the design rules, plan, compare variants, export.
With --screenshot it plans the design, renders the main window with the route
overlay, writes the PNG and exits (status 0), which needs an X display
(xvfb-run works).`,
		Flags: run,
	})
	Register(&Command{
		Name:         "open",
		Usage:        "open DESIGN.json",
		Summary:      "open a design file in the desktop window",
		NeedsDisplay: true,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			inner := run(fs)
			return func(env Env, args []string) int {
				if len(args) != 1 {
					fmt.Fprintln(env.Stderr, "Usage: dimerpath open DESIGN.json")
					return ExitFailure
				}
				return inner(env, args)
			}
		},
	})
}

// parseSize parses "WxH" with both between 320 and 10000 pixels.
func parseSize(s string) (int, int, error) {
	ws, hs, ok := strings.Cut(strings.ToLower(s), "x")
	if !ok {
		return 0, 0, fmt.Errorf("want WIDTHxHEIGHT")
	}
	w, err1 := strconv.Atoi(ws)
	h, err2 := strconv.Atoi(hs)
	if err1 != nil || err2 != nil || w < 320 || h < 240 || w > 10000 || h > 10000 {
		return 0, 0, fmt.Errorf("want two whole numbers of pixels, at least 320x240 and at most 10000x10000")
	}
	return w, h, nil
}
