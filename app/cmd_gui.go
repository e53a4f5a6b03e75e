package app

import (
	"flag"
	"fmt"

	"dimerpath/assets"
	"dimerpath/lattice/design"
)

// The GUI lands in app/gui; until then the default command prints the
// summary of the demo design.
func init() {
	Register(&Command{
		Name:    "gui",
		Usage:   "gui [DESIGN.json]",
		Summary: "open the desktop window (the default when no command is given)",
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			return func(env Env, args []string) int {
				// Until the GUI lands: the summary of the built-in demo.
				d, err := design.Parse(assets.DemoName, assets.DemoDesign)
				if err == nil {
					err = printInfo(env.Stdout, assets.DemoName, d, "")
				}
				if err != nil {
					fmt.Fprintf(env.Stderr, "dimerpath: demo design: %v\n", err)
					return ExitFailure
				}
				fmt.Fprintln(env.Stdout, "\n(The GUI is not built yet; \"dimerpath help\" lists the commands.)")
				return ExitOK
			}
		},
	})
}
