package app

import (
	"fmt"
	"net"
	"os"
	"runtime"
	"strconv"
	"strings"
	"time"
)

// errNoDisplayHint ends the one line printed when the window cannot open.
const errNoDisplayHint = `"dimerpath help" lists the commands that need none`

// findDisplay reports, as an error that reads as one line, why the window
// cannot open: on the X11 systems the GUI is built for (Linux and the
// BSDs), GLFW panics with a stack trace when DISPLAY is unset or names a
// server that does not answer, so that is checked first. getenv and dial
// are os.Getenv and a short net.Dial, replaced in tests. A DISPLAY this
// does not understand is left for GLFW to judge (nil).
func findDisplay(getenv func(string) string, dial func(network, addr string) error) error {
	switch runtime.GOOS {
	case "darwin", "windows", "android", "ios", "js":
		return nil // native windowing, no X server
	}
	display := getenv("DISPLAY")
	if display == "" {
		why := "DISPLAY is not set"
		if getenv("WAYLAND_DISPLAY") != "" {
			why = "DISPLAY is not set; under Wayland the window needs XWayland"
		}
		return fmt.Errorf("no display found (%s); %s", why, errNoDisplayHint)
	}
	addrs := xServerAddrs(display)
	if len(addrs) == 0 {
		return nil
	}
	for _, a := range addrs {
		if dial(a[0], a[1]) == nil {
			return nil
		}
	}
	return fmt.Errorf("no display found (no X server answers on DISPLAY=%s); %s", display, errNoDisplayHint)
}

// xServerAddrs returns the (network, address) pairs an X client tries for
// DISPLAY = [host]:number[.screen]: the local socket (and, on Linux, its
// abstract twin) for an empty host or "unix", else TCP port 6000+number.
// It returns nil for a DISPLAY it does not understand.
func xServerAddrs(display string) [][2]string {
	host, rest, ok := strings.Cut(display, ":")
	if !ok || strings.Contains(host, "/") {
		return nil
	}
	num, _, _ := strings.Cut(rest, ".")
	n, err := strconv.Atoi(num)
	if err != nil || n < 0 || n > 65535-6000 {
		return nil
	}
	if host == "" || host == "unix" {
		path := "/tmp/.X11-unix/X" + num
		addrs := [][2]string{{"unix", path}}
		if runtime.GOOS == "linux" {
			addrs = append(addrs, [2]string{"unix", "@" + path})
		}
		return addrs
	}
	return [][2]string{{"tcp", net.JoinHostPort(host, strconv.Itoa(6000+n))}}
}

// dialQuickly connects to addr and hangs up at once: an X server that is
// there accepts within milliseconds.
func dialQuickly(network, addr string) error {
	c, err := net.DialTimeout(network, addr, 2*time.Second)
	if err != nil {
		return err
	}
	return c.Close()
}

// checkDisplay is findDisplay on the real environment.
func checkDisplay() error { return findDisplay(os.Getenv, dialQuickly) }
