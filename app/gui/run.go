package gui

import (
	"context"
	"fmt"
	"image/png"
	"io"
	"log"
	"os"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/app"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/driver/software"

	"dimerpath/app/editor"
	"dimerpath/app/render"
	"dimerpath/internal/atomicfile"
)

// AppID is the Fyne application id; preferences (recent files) are kept
// under it.
const AppID = "dev.dimerpath.desktop"

// RunOptions configure Run.
type RunOptions struct {
	// Design is the file to open; "" opens the built-in demo.
	Design string
	// Screenshot, when set, makes Run plan the design, draw the main
	// window with the route, save it as a PNG at this path and return.
	Screenshot string
	// Width and Height are the window size in device pixels for a
	// screenshot (default 1600 x 1000).
	Width, Height int
	// Generator is the program name and version for exported reports.
	Generator string
	Stderr    io.Writer
}

// Run opens the main window and returns the process exit status when it
// closes: 0, or 2 when the design cannot be opened or the screenshot not
// written.
func Run(o RunOptions) int {
	if o.Stderr == nil {
		o.Stderr = os.Stderr
	}
	if o.Screenshot != "" {
		// One device pixel per Fyne unit, so the PNG has exactly the
		// size asked for whatever the X server reports.
		os.Setenv("FYNE_SCALE", "1")
	}
	d, err := editor.DemoDesign()
	path := ""
	if o.Design != "" {
		d, err = editor.LoadDesign(o.Design)
		path = o.Design
	}
	if err != nil {
		fmt.Fprintf(o.Stderr, "dimerpath: %v\n", err)
		return 2
	}
	s, err := editor.NewSession(d, path)
	if err != nil {
		fmt.Fprintf(o.Stderr, "dimerpath: %s: %v\n", o.Design, err)
		return 2
	}
	// Fyne logs through the standard logger; see fynelog.go for the one
	// report it makes on every file dialog and what it means.
	log.SetOutput(&fyneLog{out: o.Stderr})
	a := app.NewWithID(AppID)
	a.Settings().SetTheme(newLabTheme())
	w := a.NewWindow(s.Title())
	opts := Options{Generator: o.Generator}
	if o.Screenshot != "" {
		opts.Autosave, opts.CheckDelay = -1, -1
	}
	u := New(a, w, s, opts)
	if path != "" {
		u.addRecent(path)
	}
	if o.Screenshot == "" {
		// A size that fits a 1280 x 800 laptop screen; the window can be
		// maximised.
		w.Resize(fyne.NewSize(1280, 800))
		u.StartAutosave()
		u.OfferRecovery()
		u.scheduleCheck()
		w.ShowAndRun()
		return 0
	}
	return u.screenshot(o)
}

// screenshot plans the design, shows the window with the route at the
// requested size and saves it as a PNG.
func (u *UI) screenshot(o RunOptions) int {
	if o.Width == 0 || o.Height == 0 {
		o.Width, o.Height = 1600, 1000
	}
	status := 0
	u.CheckSync()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	if err := u.PlanNow(ctx); err != nil {
		// The window is still worth a look; the plan panel says why.
		fmt.Fprintf(o.Stderr, "dimerpath: planning for the screenshot: %v\n", err)
	}
	// The GL driver's Capture reads the front buffer, which Mesa's
	// software GL under Xvfb returns empty; Fyne's software painter draws
	// the same widgets exactly, so the window's content is drawn with it.
	content := u.Win.Content()
	u.Win.SetContent(canvas.NewRectangle(render.ColOutside))
	c := software.NewCanvas()
	c.SetPadded(false)
	c.SetContent(content)
	c.Resize(fyne.NewSize(float32(o.Width), float32(o.Height)))
	img := c.Capture()
	// The raster is generated at the final size only on the first
	// capture; the second one shows it laid out.
	img = c.Capture()
	err := atomicfile.Write(o.Screenshot, 0o644, func(w io.Writer) error { return png.Encode(w, img) })
	if err != nil {
		fmt.Fprintf(o.Stderr, "dimerpath: screenshot: %v\n", err)
		status = 2
	}
	return status
}
