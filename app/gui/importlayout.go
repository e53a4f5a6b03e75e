package gui

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/editor"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/lattice/design/gdsimport"
)

// File > Import layout: choose a GDSII file, see its layers and labels,
// choose layers, how to map chip to field and what to make of them. The
// reading and mapping are gdsimport's, the edit the session's.

func (u *UI) importLayoutDialog() {
	u.chooseOpenFile([]string{".gds", ".GDS", ".gds2", ".gdsii"}, func(path string) {
		u.hintLabel.SetText("Reading " + filepath.Base(path) + "…")
		go func() {
			c, err := safely(func() (*gdsimport.Contents, error) { return gdsimport.Inspect(path) })
			fyne.Do(func() {
				u.hintLabel.SetText("")
				if err != nil {
					u.showJobError("Reading the layout", err)
					return
				}
				u.askImport(path, c)
			})
		}()
	})
}

// safely runs f under editor.Guard, so a bug in reading a layout is
// reported as one and never takes the window (and unsaved work) down.
func safely[T any](f func() (T, error)) (v T, err error) {
	err = editor.Guard(func() error {
		var e error
		v, e = f()
		return e
	})
	return v, err
}

const (
	importAsReference = "Reference overlay (shown, never written)"
	importAsRegion    = "New region of role"
	frameByOffset     = "Chip offset and rotation"
	frameByMarks      = "Two labelled marks on two fiducials"
)

// askImport shows the import form for a layout whose contents are c.
func (u *UI) askImport(path string, c *gdsimport.Contents) {
	if len(c.Layers) == 0 {
		dialog.ShowInformation("Import layout", filepath.Base(path)+" holds no polygons or paths.", u.Win)
		return
	}
	var layerOpts []string
	byOpt := map[string]gdsimport.Layer{}
	for _, l := range c.Layers {
		o := fmt.Sprintf("%s   (%s)", l.Layer, plural(l.Elements, "shape"))
		layerOpts = append(layerOpts, o)
		byOpt[o] = l.Layer
	}
	layers := widget.NewCheckGroup(layerOpts, nil)
	layerBox := container.NewVScroll(layers)
	layerBox.SetMinSize(fyne.NewSize(260, float32(min(len(layerOpts), 6))*36))

	as := widget.NewRadioGroup([]string{importAsReference, importAsRegion}, nil)
	as.SetSelected(importAsReference)
	var roleOpts []string
	for _, r := range design.Roles {
		roleOpts = append(roleOpts, roleOf(r))
	}
	role := widget.NewSelect(roleOpts, nil)
	role.SetSelected(roleOf(design.RolePad))
	name := widget.NewEntry()
	name.SetText(strings.TrimSuffix(filepath.Base(path), filepath.Ext(path)))

	frame := widget.NewRadioGroup([]string{frameByOffset, frameByMarks}, nil)
	offX, offY, rot := widget.NewEntry(), widget.NewEntry(), widget.NewEntry()
	offX.SetText("0")
	offY.SetText("0")
	rot.SetText("0")
	var labels []string
	for _, l := range c.Labels {
		if !slices.Contains(labels, l.Text) {
			labels = append(labels, l.Text)
		}
	}
	var fids []string
	for _, f := range u.Session.Design().Fiducials {
		fids = append(fids, f.Name)
	}
	mark1, mark2 := widget.NewSelect(labels, nil), widget.NewSelect(labels, nil)
	fid1, fid2 := widget.NewSelect(fids, nil), widget.NewSelect(fids, nil)
	if len(labels) >= 2 && len(fids) >= 2 {
		mark1.SetSelected(labels[0])
		mark2.SetSelected(labels[1])
		fid1.SetSelected(fids[0])
		fid2.SetSelected(fids[1])
	}
	byOffset := container.NewGridWithColumns(3, entryWith("x nm", offX), entryWith("y nm", offY), entryWith("degrees", rot))
	byMarks := container.NewGridWithColumns(4, mark1, widget.NewLabel("on fiducial"), fid1, widget.NewLabel(""),
		mark2, widget.NewLabel("on fiducial"), fid2, widget.NewLabel(""))
	frame.OnChanged = func(s string) {
		if s == frameByMarks {
			byOffset.Hide()
			byMarks.Show()
		} else {
			byMarks.Hide()
			byOffset.Show()
		}
	}
	frame.SetSelected(frameByOffset)
	if len(labels) < 2 || len(fids) < 2 {
		frame.Disable()
	}
	as.OnChanged = func(s string) {
		if s == importAsRegion {
			role.Enable()
		} else {
			role.Disable()
		}
	}
	role.Disable()

	items := []*widget.FormItem{
		widget.NewFormItem("Layers", layerBox),
		widget.NewFormItem("Import as", container.NewVBox(as, role)),
		widget.NewFormItem("Name", name),
		widget.NewFormItem("Chip to field", container.NewVBox(frame, byOffset, byMarks)),
	}
	form := dialog.NewForm("Import layout: "+filepath.Base(path), "Import", "Cancel", items, func(ok bool) {
		if !ok {
			return
		}
		var chosen []gdsimport.Layer
		for _, o := range layers.Selected {
			chosen = append(chosen, byOpt[o])
		}
		if len(chosen) == 0 {
			dialog.ShowError(fmt.Errorf("choose at least one layer to import"), u.Win)
			return
		}
		req := importRequest{path: path, layers: chosen, name: strings.TrimSpace(name.Text), region: as.Selected == importAsRegion}
		for _, r := range design.Roles {
			if roleOf(r) == role.Selected {
				req.role = r
			}
		}
		if frame.Selected == frameByMarks {
			req.marks = &[2]gdsimport.Mark{{Label: mark1.Selected, Fiducial: fid1.Selected}, {Label: mark2.Selected, Fiducial: fid2.Selected}}
		} else {
			f, err := frameOf(offX.Text, offY.Text, rot.Text)
			if err != nil {
				dialog.ShowError(err, u.Win)
				return
			}
			req.frame = f
		}
		u.runImport(req)
	}, u.Win)
	form.Resize(fyne.NewSize(640, 0))
	form.Show()
}

func entryWith(unit string, e *widget.Entry) fyne.CanvasObject {
	return container.NewBorder(nil, nil, nil, widget.NewLabel(unit), e)
}

// frameOf reads the chip offset (nm) and rotation (degrees) typed in.
func frameOf(x, y, deg string) (lattice.ChipFrame, error) {
	num := func(what, s string) (float64, error) {
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > 1e9 {
			return 0, fmt.Errorf("chip %s %q: want a finite number", what, s)
		}
		return v, nil
	}
	var f lattice.ChipFrame
	var err error
	if f.OffsetNM.X, err = num("offset x", x); err != nil {
		return f, err
	}
	if f.OffsetNM.Y, err = num("offset y", y); err != nil {
		return f, err
	}
	if f.RotationDeg, err = num("rotation", deg); err != nil {
		return f, err
	}
	return f, nil
}

type importRequest struct {
	path   string
	layers []gdsimport.Layer
	name   string
	region bool
	role   design.Role
	frame  lattice.ChipFrame
	marks  *[2]gdsimport.Mark
}

// runImport reads the layout's layers in the background, then maps and
// imports them as one undoable edit.
func (u *UI) runImport(req importRequest) {
	u.hintLabel.SetText("Reading " + filepath.Base(req.path) + "…")
	go func() {
		l, err := safely(func() (*gdsimport.Layout, error) {
			return gdsimport.ReadFile(req.path, gdsimport.Options{Layers: req.layers})
		})
		fyne.Do(func() {
			u.hintLabel.SetText("")
			if err != nil {
				u.showJobError("Importing the layout", err)
				return
			}
			u.finishImport(req, l)
		})
	}()
}

func (u *UI) finishImport(req importRequest, l *gdsimport.Layout) {
	if len(l.Polygons) == 0 {
		dialog.ShowError(fmt.Errorf("%s: nothing on the chosen layers", filepath.Base(req.path)), u.Win)
		return
	}
	f := req.frame
	how := fmt.Sprintf("chip offset (%.1f, %.1f) nm, rotation %g°", f.OffsetNM.X, f.OffsetNM.Y, f.RotationDeg)
	if req.marks != nil {
		var err error
		if f, err = l.FrameFromMarks(u.Session.Design(), *req.marks); err != nil {
			dialog.ShowError(err, u.Win)
			return
		}
		how = fmt.Sprintf("marks %s and %s: chip offset (%.1f, %.1f) nm, rotation %.4f°", req.marks[0].Label, req.marks[1].Label, f.OffsetNM.X, f.OffsetNM.Y, f.RotationDeg)
	}
	var msg string
	if req.region {
		i, n, err := u.Session.ImportRegion(l, req.name, req.role, f)
		if err != nil {
			dialog.ShowError(err, u.Win)
			return
		}
		msg = fmt.Sprintf("Region %q (%s): %d polygons, %d H sites.", u.Session.Variant().Regions[i].Name, roleOf(req.role), len(l.Polygons), n)
	} else {
		name := u.Session.ImportReference(l, req.name, f)
		msg = fmt.Sprintf("Reference overlay %q: %d polygons, drawn dashed on the lattice and on the plan's overview, never written.", name, len(l.Polygons))
	}
	u.hintLabel.SetText("Imported " + filepath.Base(req.path) + ". Undo (Ctrl+Z) takes it back.")
	dialog.ShowInformation("Layout imported", msg+"\n\nMapped through "+how+".\n\n"+
		"Check the mapping against the sample's registration images: the layout is design geometry, not the written device.", u.Win)
}

// removeReferences offers to remove the design's reference overlays.
func (u *UI) removeReferences() {
	names := u.Session.References()
	if len(names) == 0 {
		dialog.ShowInformation("Layout overlays", "The design has no layout overlays.", u.Win)
		return
	}
	dialog.ShowConfirm("Remove layout overlays", "Remove "+strings.Join(names, ", ")+"? Undo brings them back.", func(ok bool) {
		if ok {
			for i := len(names) - 1; i >= 0; i-- {
				u.Session.DeleteReference(i)
			}
		}
	}, u.Win)
}
