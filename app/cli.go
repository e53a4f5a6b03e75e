package app

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"sort"
	"strings"

	"dimerpath/planner"
)

// Env is what a subcommand may touch: its arguments and the standard
// streams. Commands never use os.Stdout directly, so tests can capture
// everything a command prints.
type Env struct {
	Args   []string
	Stdin  io.Reader
	Stdout io.Writer
	Stderr io.Writer
}

// Command is one subcommand of the dimerpath binary.
type Command struct {
	// Name is the word typed after "dimerpath".
	Name string
	// Usage is the synopsis printed by --help, without the program name,
	// for example "check DESIGN.json [--variant NAME]".
	Usage string
	// Summary is one line for the command list.
	Summary string
	// Help is the longer text printed by --help, after the flags.
	Help string
	// NeedsDisplay marks a command that opens a window; the command list
	// says which, so a user on a machine without a display knows what
	// runs there.
	NeedsDisplay bool
	// Flags declares the command's flags on fs and returns the function
	// that runs the command once fs has been parsed; args are the
	// positional arguments, with flags removed wherever they stood.
	Flags func(fs *flag.FlagSet) func(env Env, args []string) int
}

var commands = map[string]*Command{}

// Register adds a subcommand. Each subcommand registers itself from an
// init function in its own file, so adding one touches no shared list.
// It panics if the name is taken: that is a programming error.
func Register(c *Command) {
	if _, dup := commands[c.Name]; dup {
		panic("app: command registered twice: " + c.Name)
	}
	commands[c.Name] = c
}

// Exit statuses shared by all subcommands.
const (
	ExitOK       = 0 // success, and no error-level findings
	ExitFindings = 1 // the command ran and found errors in the input (check)
	ExitFailure  = 2 // bad usage, unreadable input, refused parameters
	// ExitBug (3, bugs.go): a bug in dimerpath, reported with its details.
)

// Main runs the dimerpath command line and returns the exit status.
// With no arguments it opens the GUI on the built-in demo design
// (without a display it says so in one line and returns ExitFailure).
func Main(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	env := Env{Stdin: stdin, Stdout: stdout, Stderr: stderr}
	if len(args) == 0 {
		if c, ok := commands[defaultCommand]; ok {
			return runCommand(c, nil, env)
		}
		printCommandList(stdout)
		return ExitOK
	}
	switch args[0] {
	case "help", "-h", "-help", "--help":
		if len(args) > 1 {
			if c, ok := commands[args[1]]; ok {
				return runCommand(c, []string{"--help"}, env)
			}
			fmt.Fprintf(stderr, "dimerpath: unknown command %q\n", args[1])
			return ExitFailure
		}
		printCommandList(stdout)
		return ExitOK
	case "version", "--version":
		fmt.Fprintf(stdout, "dimerpath %s\n", Version)
		return ExitOK
	}
	c, ok := commands[args[0]]
	if !ok {
		// A leading flag (such as --screenshot) belongs to the default
		// command, which opens the GUI.
		if strings.HasPrefix(args[0], "-") {
			if c, ok := commands[defaultCommand]; ok {
				return runCommand(c, args, env)
			}
		}
		fmt.Fprintf(stderr, "dimerpath: unknown command %q (run \"dimerpath help\" for the list)\n", args[0])
		return ExitFailure
	}
	return runCommand(c, args[1:], env)
}

// defaultCommand runs when dimerpath is started with no subcommand.
const defaultCommand = "gui"

// Version is the program version, printed by "dimerpath version" and on
// every exported plan.
var Version = "0.1.0"

func runCommand(c *Command, args []string, env Env) (code int) {
	env.Args = args
	defer recoverBug(env, c.Name, &code)
	fs := flag.NewFlagSet(c.Name, flag.ContinueOnError)
	fs.SetOutput(env.Stderr)
	run := c.Flags(fs)
	// The flag package prints its own error line; the full help goes to
	// stdout only when asked for.
	fs.Usage = func() {}
	positional, err := parseInterspersed(fs, args)
	if errors.Is(err, flag.ErrHelp) {
		printCommandHelp(env.Stdout, c, fs, env.Stderr)
		return ExitOK
	}
	if err != nil {
		fmt.Fprintf(env.Stderr, "Usage: dimerpath %s   (dimerpath %s --help for more)\n", c.Usage, c.Name)
		return ExitFailure
	}
	env.Args = positional
	return run(env, positional)
}

// parseInterspersed parses flags wherever they stand among the
// positional arguments, so "check --variant B demo.json" and
// "check demo.json --variant B" mean the same. A lone "--" ends flag
// parsing.
func parseInterspersed(fs *flag.FlagSet, args []string) ([]string, error) {
	var positional []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return positional, nil
		}
		// fs.Parse stops at the first non-flag or after "--".
		consumed := len(args) - len(rest)
		if consumed > 0 && args[consumed-1] == "--" {
			return append(positional, rest...), nil
		}
		positional = append(positional, rest[0])
		args = rest[1:]
	}
}

func printCommandList(w io.Writer) {
	fmt.Fprintf(w, "dimerpath %s: plan STM hydrogen-depassivation lithography on Si(100)-2x1:H\n\n", Version)
	fmt.Fprintln(w, "Usage: dimerpath COMMAND [ARGS] [FLAGS]   (flags may stand before or after the arguments)")
	fmt.Fprintln(w)
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	var windowed []string
	for _, n := range names {
		fmt.Fprintf(w, "  %-10s %s\n", n, commands[n].Summary)
		if commands[n].NeedsDisplay {
			windowed = append(windowed, n)
		}
	}
	if len(windowed) > 0 {
		fmt.Fprintf(w, "\nThe window commands (%s) need a display; the others run without one.\n", strings.Join(windowed, ", "))
	}
	fmt.Fprintln(w, "\nRun \"dimerpath COMMAND --help\" for a command's flags.")
	fmt.Fprintln(w, "\n"+planner.Caution)
}

// printCommandHelp prints c's usage, flags and help to w, then points the
// flag set's own error output back at restore.
func printCommandHelp(w io.Writer, c *Command, fs *flag.FlagSet, restore io.Writer) {
	fmt.Fprintf(w, "Usage: dimerpath %s\n\n%s\n", c.Usage, c.Summary)
	hasFlags := false
	fs.VisitAll(func(*flag.Flag) { hasFlags = true })
	if hasFlags {
		fmt.Fprintln(w, "\nFlags:")
		fs.SetOutput(w)
		fs.PrintDefaults()
		fs.SetOutput(restore)
	}
	if c.Help != "" {
		fmt.Fprintf(w, "\n%s\n", strings.TrimSpace(c.Help))
	}
}
