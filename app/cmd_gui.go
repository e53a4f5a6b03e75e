package app

import (
	"flag"
	"fmt"
)

// The GUI lands in app/gui; until then the default command prints the
// command list.
func init() {
	Register(&Command{
		Name:    "gui",
		Usage:   "gui [DESIGN.json]",
		Summary: "open the desktop window (the default when no command is given)",
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			return func(env Env, args []string) int {
				fmt.Fprintln(env.Stdout, "dimerpath: the GUI is not built yet.")
				printCommandList(env.Stdout)
				return ExitOK
			}
		},
	})
}
