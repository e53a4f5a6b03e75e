package gui

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/lattice/design"
	"dimerpath/lattice/placement"
	"dimerpath/lattice/survey"
)

// The Survey tab: the design's survey topograph under the lattice (shown
// or hidden, its opacity), its terraces made the design's, its defects
// edited by hand, and the placements of the core found on it. The
// analysis, the search and every edit are the editor's; this is widgets.

type surveyPanel struct {
	u       *UI
	content fyne.CanvasObject
	summary *widget.Label
	show    *widget.Check
	opacity *widget.Slider
	msg     *widget.Label
	defects *widget.List
	// listSel is the defect the list shows selected (-1: none); it
	// follows the session's selection, made here or on the canvas.
	listSel int
	// following says the list is being set from the session's
	// selection: the view stays where it is (the user is looking there).
	following bool
	// shownAt is the field position the x and y fields were last given
	// from a defect: they are set again only when it moves, so what is
	// being typed there stays.
	shownAt  r2.Point
	defX     *keyEntry
	defY     *keyEntry
	atX      *keyEntry
	atY      *keyEntry
	turn     *keyEntry
	places   *widget.List
	placeSel int
	// searchBox and coreRegions narrow the placement search: a field
	// box "X0,Y0,X1,Y1" and region names "A,B" (empty: the survey's area
	// and every atomic-precision region), as the place command's flags.
	searchBox   *keyEntry
	coreRegions *keyEntry
	find        *widget.Button
	apply       *widget.Button
	// loading is the image being read in the background, so it is read
	// once.
	loading string
	busy    bool
	// imageJobs counts the image loads running, until their report is
	// done (tests wait on it: Fyne's test driver runs the report on the
	// job's goroutine).
	imageJobs sync.WaitGroup
}

func newSurveyPanel(u *UI) *surveyPanel {
	p := &surveyPanel{u: u, listSel: -1, placeSel: -1}
	p.summary = wrapLabel("")
	p.msg = errorLabel()
	p.show = widget.NewCheck("Show the survey", func(on bool) {
		p.u.View.Opts.Survey = on
		p.u.View.Invalidate()
	})
	p.show.SetChecked(true)
	p.opacity = widget.NewSlider(0, 1)
	p.opacity.Step = 0.05
	p.opacity.SetValue(0.6)
	p.opacity.OnChanged = func(v float64) {
		p.u.View.Opts.SurveyOpacity = v
		p.u.View.Invalidate()
	}
	u.View.Opts.Survey, u.View.Opts.SurveyOpacity = true, 0.6
	add := widget.NewButtonWithIcon("Add image…", theme.FileImageIcon(), p.addDialog)
	terr := widget.NewButton("Use its terraces", func() {
		showErr(p.msg, p.u.Session.TerracesFromSurvey())
	})
	remove := widget.NewButtonWithIcon("Remove", theme.DeleteIcon(), func() { p.u.Session.RemoveSurvey() })
	// Registration on the field: where the image's lower-left corner
	// sits and the field angle of its x axis.
	p.atX, p.atY, p.turn = u.newEntry(), u.newEntry(), u.newEntry()
	place := widget.NewButtonWithIcon("Apply", theme.ConfirmIcon(), p.applyPlace)
	for _, e := range []*keyEntry{p.atX, p.atY, p.turn} {
		e.OnSubmitted = func(string) { p.applyPlace() }
	}
	placeRow := widget.NewForm(
		widget.NewFormItem("Corner x, y (nm)", container.NewGridWithColumns(2, p.atX, p.atY)),
		widget.NewFormItem("Turned (°)", container.NewBorder(nil, nil, nil, place, p.turn)))

	p.defects = widget.NewList(
		func() int { return p.defectCount() },
		func() fyne.CanvasObject {
			return listLabel("00 bright dangling bond at (0000.00, 0000.00) nm, 0.00 nm wide")
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			sv := p.u.Session.Design().Survey
			if sv == nil || i >= len(sv.Defects) {
				return
			}
			d := sv.Defects[i]
			at := sv.ToField(r2.Point{X: d.AtNM[0], Y: d.AtNM[1]})
			hand := ""
			if d.ByHand {
				hand = " (by hand)"
			}
			o.(*widget.Label).SetText(fmt.Sprintf("%d %s %s at (%.2f, %.2f) nm, %.2f nm wide%s", i+1, d.Kind, d.Class, at.X, at.Y, d.SizeNM, hand))
		})
	p.defects.OnSelected = func(i widget.ListItemID) {
		p.listSel = i
		sv := p.u.Session.Design().Survey
		if sv == nil || i >= len(sv.Defects) {
			return
		}
		p.showDefectAt(i)
		if !p.following {
			// The Defect tool acts on what was chosen here: the status
			// line names it and Delete removes it, not the regions
			// another tool had selected.
			p.u.Session.SetTool(editor.ToolDefect)
			p.u.Session.SelectDefect(i)
			at := sv.FieldDefects()[i].At
			p.u.View.ZoomTo(r2.RectFromCenterSize(at, r2.Point{X: 12, Y: 12}))
		}
	}
	p.defects.OnUnselected = func(widget.ListItemID) { p.listSel = -1 }
	p.defX, p.defY = u.newEntry(), u.newEntry()
	moveDef := widget.NewButton("Move", func() {
		x, errX := parseNumber("x", p.defX.Text)
		y, errY := parseNumber("y", p.defY.Text)
		switch {
		case errX != nil:
			showErr(p.msg, errX)
		case errY != nil:
			showErr(p.msg, errY)
		case p.u.Session.SelectedDefect() < 0:
			showErr(p.msg, fmt.Errorf("choose a defect in the list or with the Defect tool first"))
		default:
			showErr(p.msg, p.u.Session.MoveDefect(p.u.Session.SelectedDefect(), r2.Point{X: x, Y: y}))
		}
	})
	addDef := func(kind string) func() {
		return func() {
			// At the view's centre: pan there, then add (or click there
			// with the Defect tool).
			showErr(p.msg, p.u.Session.AddDefect(p.u.View.View().Center, kind, p.u.Session.Opts.DefectSizeNM))
		}
	}
	delDef := widget.NewButtonWithIcon("Delete", theme.DeleteIcon(), func() {
		_, err := p.u.Session.DeleteSelectedDefect()
		showErr(p.msg, err)
	})
	defForm := container.NewVBox(
		container.NewGridWithColumns(2, widget.NewForm(widget.NewFormItem("x (nm)", p.defX)), widget.NewForm(widget.NewFormItem("y (nm)", p.defY))),
		container.NewGridWithColumns(4, moveDef, delDef,
			widget.NewButton("Add bright", addDef(design.DefectBright)), widget.NewButton("Add dark", addDef(design.DefectDark))),
	)

	p.places = widget.NewList(
		func() int {
			if ps := p.u.Session.Placements(); ps != nil {
				return len(ps.Best)
			}
			return 0
		},
		func() fyne.CanvasObject {
			return listLabel("0  move (+000.00, +000.00) nm: margin 00.00 nm; windows 00.00, others 00.00, steps 00.00")
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			ps := p.u.Session.Placements()
			if ps == nil || i >= len(ps.Best) {
				return
			}
			o.(*widget.Label).SetText(fmt.Sprintf("%d  %s", i+1, placementText(ps.Best[i])))
		})
	p.places.OnSelected = func(i widget.ListItemID) {
		p.placeSel = i
		p.u.Session.ChoosePlacement(i)
		if ps := p.u.Session.Placements(); ps != nil && i < len(ps.Best) {
			c := ps.Core.Center().Add(ps.Best[i].MoveNM)
			p.u.View.ZoomTo(r2.RectFromCenterSize(c, ps.Core.Size().Mul(2.5)))
		}
		p.refreshButtons()
	}
	p.find = widget.NewButtonWithIcon("Find placements", theme.SearchIcon(), p.findPlacements)
	p.searchBox, p.coreRegions = u.newEntry(), u.newEntry()
	p.searchBox.SetPlaceHolder("the survey's area")
	p.coreRegions.SetPlaceHolder("every atomic-precision region")
	for _, e := range []*keyEntry{p.searchBox, p.coreRegions} {
		e.OnSubmitted = func(string) { p.findPlacements() }
	}
	searchForm := widget.NewForm(
		widget.NewFormItem("Within x0, y0, x1, y1 (nm)", p.searchBox),
		widget.NewFormItem("Core regions", p.coreRegions))
	p.apply = widget.NewButtonWithIcon("Move the core there", theme.ConfirmIcon(), func() {
		if err := p.u.Session.ApplyPlacement(p.placeSel); err != nil {
			showErr(p.msg, err)
			return
		}
		p.placeSel = -1
		p.u.scheduleCheck()
	})

	top := container.NewVBox(heading("Survey"), p.summary,
		container.NewBorder(nil, nil, p.show, nil, container.NewBorder(nil, nil, widget.NewLabel("Image opacity"), nil, p.opacity)),
		container.NewGridWithColumns(3, add, terr, remove), placeRow, p.msg, widget.NewSeparator())
	placeBox := container.NewBorder(container.NewVBox(heading("Placement of the atomic-precision core"),
		mutedLabel("Moves by whole lattice vectors that keep the core clearest of defects and step edges (rule surface-clearance); its fan-outs and pads stay."),
		searchForm, container.NewGridWithColumns(2, p.find, p.apply)), nil, nil, nil, p.places)
	defBox := container.NewBorder(container.NewVBox(heading("Defects"),
		mutedLabel("Classes are by appearance. Add, move or delete defects by hand, here or with the Defect tool (K) on the view: one undo step each.")), defForm, nil, nil, p.defects)
	split := container.NewVSplit(placeBox, defBox)
	split.Offset = 0.45
	p.content = container.NewBorder(top, nil, nil, nil, split)
	return p
}

// applyPlace moves the survey to the corner and angle entered.
func (p *surveyPanel) applyPlace() {
	x, errX := parseNumber("corner x", p.atX.Text)
	y, errY := parseNumber("corner y", p.atY.Text)
	a, errA := parseNumber("turned", p.turn.Text)
	for _, err := range []error{errX, errY, errA} {
		if err != nil {
			showErr(p.msg, err)
			return
		}
	}
	showErr(p.msg, p.u.Session.MoveSurvey(r2.Point{X: x, Y: y}, a))
}

// placementText says what a placement does and leaves.
func placementText(pl placement.Placement) string {
	nm := func(v float64) string {
		if math.IsInf(v, 1) {
			return "clear"
		}
		return fmt.Sprintf("%.2f nm", v)
	}
	return fmt.Sprintf("move (%+.2f, %+.2f) nm = %+d dimers, %+d rows: margin %s; windows %s, other sites %s, steps and border %s",
		pl.MoveNM.X, pl.MoveNM.Y, pl.Dimers, pl.Rows, nm(pl.MarginNM), nm(pl.WindowClearanceNM), nm(pl.OtherClearanceNM), nm(pl.StepClearanceNM))
}

func (p *surveyPanel) defectCount() int {
	if sv := p.u.Session.Design().Survey; sv != nil {
		return len(sv.Defects)
	}
	return 0
}

func (p *surveyPanel) refreshButtons() {
	ps := p.u.Session.Placements()
	if ps != nil && p.placeSel >= 0 && p.placeSel < len(ps.Best) && !p.busy {
		p.apply.Enable()
	} else {
		p.apply.Disable()
	}
	if p.u.Session.Design().Survey != nil && !p.busy {
		p.find.Enable()
	} else {
		p.find.Disable()
	}
}

func (p *surveyPanel) refresh() {
	s := p.u.Session
	sv := s.Design().Survey
	if sv == nil {
		p.summary.SetText("No survey. Add a survey topograph of the surface (PNG, TIFF or a height matrix): it is calibrated on the lattice, and its terraces, step edges and defects are found (as dimerpath survey does).")
	} else {
		img := "no image"
		if sv.Image != "" {
			img = sv.Image
		}
		hand := 0
		for _, d := range sv.Defects {
			if d.ByHand {
				hand++
			}
		}
		p.summary.SetText(fmt.Sprintf("%s, %d x %d px at %.4f x %.4f nm/px (measured on the lattice), skew %.2f°; lower-left corner at (%.1f, %.1f) nm, turned %.2f°. %d terraces, %d step edges, %d defects (%d by hand).",
			img, sv.SizePx[0], sv.SizePx[1], sv.ScaleNMPerPx[0], sv.ScaleNMPerPx[1], sv.SkewDeg, sv.OffsetNM[0], sv.OffsetNM[1], sv.RotationDeg,
			len(sv.Terraces), len(sv.Steps), len(sv.Defects), hand))
	}
	if sv != nil {
		p.atX.SetText(fmt.Sprintf("%.2f", sv.OffsetNM[0]))
		p.atY.SetText(fmt.Sprintf("%.2f", sv.OffsetNM[1]))
		p.turn.SetText(fmt.Sprintf("%.3f", sv.RotationDeg))
	} else {
		// Nothing to register or move: no numbers of another design's survey.
		for _, e := range []*keyEntry{p.atX, p.atY, p.turn, p.defX, p.defY} {
			e.SetText("")
		}
		p.shownAt = r2.Point{}
	}
	p.defects.Refresh()
	p.followSelection()
	if s.Placements() == nil && p.placeSel >= 0 {
		p.placeSel = -1
		p.places.UnselectAll()
	}
	p.places.Refresh()
	p.refreshButtons()
	p.loadImage()
}

// followSelection makes the defect list show the session's selected
// defect (scrolled to it, its place in the x and y fields), without
// moving the view.
func (p *surveyPanel) followSelection() {
	sel := p.u.Session.SelectedDefect()
	p.following = true
	defer func() { p.following = false }()
	switch {
	case sel < 0:
		p.defects.UnselectAll()
	case sel != p.listSel:
		p.defects.Select(sel)
	case sel < len(p.u.Session.Design().Survey.Defects) && p.u.Session.Design().Survey.FieldDefects()[sel].At != p.shownAt:
		p.showDefectAt(sel) // it moved
	}
}

// showDefectAt puts defect i's field position in the x and y fields.
func (p *surveyPanel) showDefectAt(i int) {
	sv := p.u.Session.Design().Survey
	if sv == nil || i < 0 || i >= len(sv.Defects) {
		return
	}
	at := sv.FieldDefects()[i].At
	p.shownAt = at
	p.defX.SetText(fmt.Sprintf("%.2f", at.X))
	p.defY.SetText(fmt.Sprintf("%.2f", at.Y))
}

// loadImage reads and shades the survey's image in the background when
// the session does not hold it yet.
func (p *surveyPanel) loadImage() {
	s := p.u.Session
	path, embedded := s.SurveySource()
	if path == "" || p.loading == path {
		return
	}
	if img := s.SurveyImageShown(); img != nil && img.Source == path {
		return
	}
	p.loading = path
	p.imageJobs.Add(1)
	go func() {
		img, err := safely(func() (*editor.SurveyImage, error) { return editor.LoadSurveyImage(path, embedded) })
		fyne.Do(func() {
			defer p.imageJobs.Done()
			p.loading = ""
			if s != p.u.Session {
				return
			}
			if err != nil {
				showErr(p.msg, fmt.Errorf("the survey image cannot be shown: %w", err))
				return
			}
			s.SetSurveyImage(img)
		})
	}()
}

// addDialog asks for a topograph, analyses it in the background and puts
// it into the design.
func (p *surveyPanel) addDialog() {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil {
			dialog.ShowError(err, p.u.Win)
			return
		}
		if r == nil {
			return
		}
		path := r.URI().Path()
		r.Close()
		p.analyse(path)
	}, p.u.Win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".png", ".PNG", ".tif", ".tiff", ".TIF", ".TIFF", ".txt", ".csv", ".dat", ".asc"}))
	if dir := p.u.lastDir(); dir != nil {
		d.SetLocation(dir)
	}
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

// analyse analyses the topograph at path and makes it the design's
// survey.
func (p *surveyPanel) analyse(path string) {
	if p.busy {
		return
	}
	p.busy = true
	p.refreshButtons()
	s := p.u.Session
	p.u.hintLabel.SetText("Analysing " + filepath.Base(path) + " on the lattice…")
	go func() {
		type result struct {
			an  *survey.Analysis
			img *editor.SurveyImage
		}
		res, err := safely(func() (result, error) {
			an, img, err := editor.AnalyseSurvey(context.Background(), path, survey.Options{})
			return result{an, img}, err
		})
		fyne.Do(func() {
			p.busy = false
			p.u.hintLabel.SetText("")
			p.refreshButtons()
			if err != nil {
				p.u.showJobError("Analysing the survey", err)
				return
			}
			if s != p.u.Session {
				return
			}
			if err := s.PutSurvey(res.an, res.img, path); err != nil {
				showErr(p.msg, err)
				return
			}
			p.u.scheduleCheck()
		})
	}()
}

// findPlacements searches the placements on a copy of the design.
func (p *surveyPanel) findPlacements() {
	if p.busy {
		return
	}
	box, err := placement.ParseBox(p.searchBox.Text)
	if err != nil {
		showErr(p.msg, fmt.Errorf("search box %w", err))
		return
	}
	opt := placement.Options{Best: 8, Box: box, Regions: placement.ParseRegions(p.coreRegions.Text)}
	s := p.u.Session
	d, variant, tok := s.DesignCopy(), s.Variant().Name, s.Token()
	p.busy = true
	p.refreshButtons()
	p.u.hintLabel.SetText("Searching placements of the core…")
	go func() {
		ps, err := safely(func() (*editor.Placements, error) {
			return editor.FindPlacements(context.Background(), d, variant, opt)
		})
		fyne.Do(func() {
			if p.u.jobDone != nil {
				defer p.u.jobDone()
			}
			p.busy = false
			p.u.hintLabel.SetText("")
			if err != nil {
				showErr(p.msg, err)
				p.refreshButtons()
				return
			}
			if s != p.u.Session {
				return
			}
			showErr(p.msg, nil)
			s.SetPlacements(ps, tok)
			if s.Placements() != nil {
				p.u.hintLabel.SetText(fmt.Sprintf("As drawn: %s", placementText(ps.Current)))
			}
		})
	}()
}
