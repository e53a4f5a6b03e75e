package gui

import "fyne.io/fyne/v2/dialog"

// editProfile opens the instrument-profile editor.
func (u *UI) editProfile() {
	dialog.ShowInformation("Instrument profile", "The profile editor arrives with the planner package.", u.Win)
}
