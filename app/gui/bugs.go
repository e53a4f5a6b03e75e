package gui

import (
	"fmt"
	"runtime"
	"runtime/debug"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/editor"
)

// Background jobs run through editor.Guard, so a panic in one comes back
// as an error; their results are shown on Fyne's goroutine under
// recoverUI. Either way a bug is reported in a dialog instead of closing
// the window: the jobs work on a copy of the design, so the session, its
// design and its undo history are as they were.

// showJobError reports the error of a background job; what says what
// was running ("Planning variant A"). A bug in dimerpath (a recovered
// panic, an internal error of the planner) gets the bug dialog, any
// other error the usual one.
func (u *UI) showJobError(what string, err error) {
	if details, bug := editor.BugDetails(err); bug {
		u.showBug(what, err, details)
		return
	}
	dialog.ShowError(fmt.Errorf("%s: %w", what, err), u.Win)
}

// showBugOnce shows the bug dialog for an automatic job (the checks
// after each edit, the autosave) the first time this bug happens in the
// session, and says it in the status bar after that.
func (u *UI) showBugOnce(what string, err error) {
	details, _ := editor.BugDetails(err)
	key := what + "\x00" + err.Error()
	if u.bugsShown[key] {
		u.hintLabel.SetText(what + " failed again on the internal error reported before.")
		return
	}
	u.bugsShown[key] = true
	u.showBug(what, err, details)
}

// recoverUI, deferred where a job's result is shown on Fyne's goroutine,
// reports a panic there as a bug instead of letting it close the window.
func (u *UI) recoverUI(what string) {
	if v := recover(); v != nil {
		err := &editor.PanicError{Value: v, Stack: debug.Stack()}
		details, _ := editor.BugDetails(err)
		u.showBug(what, err, details)
	}
}

// bugReport is the text "Copy details" puts on the clipboard.
func (u *UI) bugReport(what string, details string) string {
	gen := u.opts.Generator
	if gen == "" {
		gen = "dimerpath"
	}
	return fmt.Sprintf("%s, %s %s/%s\n%s stopped on an internal error.\n\n%s\n", gen, runtime.Version(), runtime.GOOS, runtime.GOARCH, what, details)
}

// showBug shows a bug in dimerpath: what was running, the message, that
// the design is kept, and a button that copies the details (version,
// message, stack) for a bug report.
func (u *UI) showBug(what string, err error, details string) {
	msg := widget.NewLabel(fmt.Sprintf("%s stopped on an internal error:\n\n%v\n\n"+
		"Your design and its undo history are as they were: save your work. "+
		"To report the bug, copy the details and send them, with the design if you can.", what, err))
	msg.Wrapping = fyne.TextWrapWord
	report := u.bugReport(what, details)
	var d *dialog.CustomDialog
	copyBtn := widget.NewButtonWithIcon("Copy details", theme.ContentCopyIcon(), func() {
		u.App.Clipboard().SetContent(report)
		u.hintLabel.SetText("The details of the internal error are on the clipboard.")
	})
	closeBtn := widget.NewButton("Close", func() { d.Hide() })
	closeBtn.Importance = widget.HighImportance
	d = dialog.NewCustomWithoutButtons("Internal error", container.NewVBox(msg), u.Win)
	d.SetButtons([]fyne.CanvasObject{copyBtn, closeBtn})
	d.Resize(fyne.NewSize(560, 1))
	d.Show()
}
