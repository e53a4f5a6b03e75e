// Package app is dimerpath's user interface: the command line (one file
// per subcommand, each registering itself) and, in app/gui, the Fyne
// desktop window. It holds no science: every computation is a call into
// lattice, planner or export.
package app
