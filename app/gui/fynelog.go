package gui

import (
	"bytes"
	"io"
	"sync"
)

// Every file dialog used to print, on stderr:
//
//	Fyne error:  Getting favorite locations
//	  Cause: this computer does not define a VIDEOS folder
//	  At: …/fyne.io/fyne/v2@v2.7.1/dialog/file.go:396
//
// The cause: a Fyne file dialog lists the user's Desktop, Documents,
// Downloads, Music, Pictures and Videos folders. On Linux it asks
// xdg-user-dir for each; on an account without XDG user folders (no
// ~/.config/user-dirs.dirs, common on lab machines and minimal installs)
// xdg-user-dir names the home folder, which Fyne takes as "not defined"
// and replaces by ~/Desktop and so on, which do not exist. Fyne 2.7's
// loop over the folders then tests the wrong error variable: after the
// first folder it cannot list, it skips every later one (also one that
// exists) and keeps the last one's error, VIDEOS, which it logs each time
// a dialog opens. Nothing is wrong with the dialog or the file chosen;
// the dialog only lists fewer places. The remedy on the machine is
// xdg-user-dirs-update, which defines and makes the folders; the fix in
// Fyne is to test the error just returned (upstream, not ours to patch
// in the module cache).
//
// fyneLog passes the standard logger's output (where Fyne logs) through
// unchanged, but for that report, which it replaces by one line saying
// what it means, once per run.
type fyneLog struct {
	mu    sync.Mutex
	out   io.Writer
	held  []byte // a "Getting favorite locations" line waiting for its cause
	skip  bool   // drop the report's "At:" line
	noted bool
}

// favouritesNote says what the favourites report means.
const favouritesNote = "dimerpath: the file dialogs list fewer places than usual: this account has no XDG user folders " +
	"(Desktop, Documents, …; xdg-user-dirs-update makes them), which Fyne reports as an error. It is harmless.\n"

// Write takes one log record (the standard logger writes each in one
// call).
func (l *fyneLog) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	n := len(p)
	if l.held != nil {
		held := l.held
		l.held = nil
		if bytes.Contains(p, []byte("Cause: this computer does not define a")) {
			l.skip = true
			if !l.noted {
				l.noted = true
				_, err := io.WriteString(l.out, favouritesNote)
				return n, err
			}
			return n, nil
		}
		if _, err := l.out.Write(held); err != nil {
			return 0, err
		}
	}
	switch {
	case l.skip && bytes.Contains(p, []byte("  At: ")):
		l.skip = false
		return n, nil
	case bytes.Contains(p, []byte("Fyne error:  Getting favorite locations")):
		l.skip = false
		l.held = append([]byte(nil), p...)
		return n, nil
	}
	l.skip = false
	_, err := l.out.Write(p)
	return n, err
}
