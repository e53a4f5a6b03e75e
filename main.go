// Command dimerpath plans STM hydrogen-depassivation lithography on
// Si(100)-2x1:H: it lays a device out on the real lattice, checks it,
// orders the tip's writes, splits them into drift-safe segments and
// estimates write time and dopant yield. Run "dimerpath help" for the
// subcommands.
package main

import (
	"os"

	"dimerpath/app"
)

func main() {
	os.Exit(app.Main(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}
