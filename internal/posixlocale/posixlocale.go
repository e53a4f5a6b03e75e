// Package posixlocale quiets a spurious GUI-toolkit error on machines whose
// locale is the POSIX one with an encoding suffix ("C.UTF-8", common in
// containers and CI): the toolkit reads "C" as a language tag, fails, and
// logs an error on every start, even for command-line subcommands.
//
// Importing the package (for its side effect) rewrites such a value to
// plain "C", which the toolkit treats as "no preference". It must be
// initialised before the toolkit's language package; Go initialises
// packages in import-path order among those whose imports are ready, and
// "dimerpath/..." sorts before "fyne.io/...", so a blank import anywhere
// in the program is enough.
package posixlocale

import (
	"os"
	"strings"
)

func init() {
	// The first non-empty of these decides, as in gettext.
	for _, name := range [...]string{"LC_ALL", "LC_MESSAGES", "LANG"} {
		v := os.Getenv(name)
		if v == "" {
			continue
		}
		if strings.HasPrefix(v, "C.") || strings.HasPrefix(v, "POSIX.") {
			os.Setenv(name, "C")
		}
		return
	}
}
