package app

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime/debug"
	"strings"
	"time"

	"dimerpath/planner"
)

// ExitBug is the exit status of a command that hit a bug in dimerpath: a
// panic, or a broken invariant the planner reported (planner.ErrInternal).
const ExitBug = 3

// bugReportDir is where bug reports are written; tests point it
// elsewhere.
var bugReportDir = func() string {
	if dir, err := os.UserCacheDir(); err == nil {
		return filepath.Join(dir, "dimerpath")
	}
	return os.TempDir()
}

// reportBug writes the details of a bug (what happened, the stack, the
// command line, the version) to a file of its own and prints one line on
// stderr saying that it is a bug and where the details are. It returns
// ExitBug.
func reportBug(env Env, cmd, what string, stack []byte) int {
	what = strings.Join(strings.Fields(what), " ")
	var b strings.Builder
	fmt.Fprintf(&b, "dimerpath %s: bug report\ntime: %s\ncommand: dimerpath %s %s\nwhat: %s\n\n%s\n",
		Version, time.Now().Format(time.RFC3339), cmd, strings.Join(env.Args, " "), what, stack)
	where := "the details could not be written"
	dir := bugReportDir()
	if err := os.MkdirAll(dir, 0o755); err == nil {
		name := filepath.Join(dir, fmt.Sprintf("bug-%s-%d.txt", time.Now().Format("20060102-150405"), os.Getpid()))
		if err := os.WriteFile(name, []byte(b.String()), 0o644); err == nil {
			where = "details in " + name
		} else {
			where += ": " + err.Error()
		}
	} else {
		where += ": " + err.Error()
	}
	if len(what) > 200 {
		what = what[:200] + "…"
	}
	fmt.Fprintf(env.Stderr, "dimerpath %s: this is a bug in dimerpath, not a problem with your input (%s); %s; please report it\n", cmd, what, where)
	return ExitBug
}

// recoverBug, deferred by runCommand, turns a panic of a command into a
// bug report and ExitBug.
func recoverBug(env Env, cmd string, code *int) {
	if r := recover(); r != nil {
		*code = reportBug(env, cmd, fmt.Sprintf("panic: %v", r), debug.Stack())
	}
}

// internalError reports err as a bug when it is one (planner.ErrInternal)
// and returns ExitBug, or returns 0 for any other error.
func internalError(env Env, cmd string, err error) int {
	if !errors.Is(err, planner.ErrInternal) {
		return 0
	}
	var stack []byte
	if ie, ok := errors.AsType[*planner.InternalError](err); ok {
		stack = ie.Stack
	}
	return reportBug(env, cmd, err.Error(), stack)
}
