package app

import (
	"errors"
	"net"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

func TestFindDisplay(t *testing.T) {
	if runtime.GOOS == "darwin" || runtime.GOOS == "windows" {
		t.Skip("no X server on this system")
	}
	listening := map[string]bool{"/tmp/.X11-unix/X0": true, "lab-pc:6010": true}
	dial := func(network, addr string) error {
		if listening[addr] {
			return nil
		}
		return errors.New("connection refused")
	}
	for _, tc := range []struct {
		name, display, wayland string
		want                   string // "" for a display found
	}{
		{"unset", "", "", "no display found (DISPLAY is not set)"},
		{"Wayland without XWayland", "", "wayland-0", "under Wayland the window needs XWayland"},
		{"local server", ":0", "", ""},
		{"local server with screen", ":0.0", "", ""},
		{"unix host", "unix:0", "", ""},
		{"no local server", ":77", "", "no X server answers on DISPLAY=:77"},
		{"forwarded over ssh", "lab-pc:10.0", "", ""},
		{"remote server down", "lab-pc:11", "", "no X server answers on DISPLAY=lab-pc:11"},
		{"a form left to GLFW", "/private/tmp/launchd/org.xquartz:0", "", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			env := map[string]string{"DISPLAY": tc.display, "WAYLAND_DISPLAY": tc.wayland}
			err := findDisplay(func(k string) string { return env[k] }, dial)
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("findDisplay(DISPLAY=%q) = %v, want a display", tc.display, err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want) || !strings.HasSuffix(err.Error(), errNoDisplayHint)):
				t.Errorf("findDisplay(DISPLAY=%q) = %v, want an error with %q ending %q", tc.display, err, tc.want, errNoDisplayHint)
			}
		})
	}
}

// TestDialQuicklyFindsAListeningSocket checks the real dial against a
// socket this test listens on.
func TestDialQuicklyFindsAListeningSocket(t *testing.T) {
	path := filepath.Join(t.TempDir(), "X5")
	l, err := net.Listen("unix", path)
	if err != nil {
		t.Skip("no unix sockets here:", err)
	}
	defer l.Close()
	go func() {
		if c, err := l.Accept(); err == nil {
			c.Close()
		}
	}()
	if err := dialQuickly("unix", path); err != nil {
		t.Errorf("dialQuickly(%s) = %v, want nil", path, err)
	}
	if err := dialQuickly("unix", path+"-gone"); err == nil {
		t.Errorf("dialQuickly on a missing socket = nil, want an error")
	}
}

// TestWindowWithoutDisplay runs the window commands as a user on a machine
// without a display would (issue 9: GLFW panicked with a stack trace): one
// line on stderr, exit status 2, nothing on stdout.
func TestWindowWithoutDisplay(t *testing.T) {
	if runtime.GOOS == "darwin" || runtime.GOOS == "windows" {
		t.Skip("no X server on this system")
	}
	t.Setenv("DISPLAY", "")
	t.Setenv("WAYLAND_DISPLAY", "")
	for _, args := range [][]string{nil, {"gui"}, {"open", "../assets/demo.json"}, {"--screenshot", filepath.Join(t.TempDir(), "x.png")}} {
		code, stdout, stderr := run(args...)
		if code != ExitFailure || stdout != "" || strings.Count(stderr, "\n") != 1 ||
			!strings.Contains(stderr, "no display found") || !strings.Contains(stderr, `"dimerpath help" lists the commands that need none`) {
			t.Errorf("dimerpath %v without a display: exit %d, stdout %q, stderr %q; want exit 2 and one line", args, code, stdout, stderr)
		}
	}
	if _, stdout, _ := run("help"); !strings.Contains(stdout, "The window commands (gui, open) need a display") {
		t.Errorf("dimerpath help does not say which commands need a display:\n%s", stdout)
	}
}
