package editor

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"slices"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/app/render"
	"dimerpath/assets"
	"dimerpath/lattice/design"
	"dimerpath/lattice/placement"
	"dimerpath/lattice/survey"
)

// The design's survey (a topograph of the surface, analysed by
// lattice/survey) and the placements found on it (lattice/placement).
// The analysis, the shading and the search are those packages'; these
// methods put their results into the design as one undoable edit each
// and hand the view what to draw. The design's Survey is never changed
// in place: every edit puts in a changed copy, so undo snapshots that
// share the old one keep it.

// ErrNoSurvey: the design has no survey.
var ErrNoSurvey = errors.New("the design has no survey: add a survey image first (File > Add survey image…, or Add image… in the Survey tab)")

// Widths of a defect added by hand (its apparent full width at half
// maximum, design.SurveyDefect.SizeNM). The default is one dangling
// bond's as filled-state images show it, about 1 nm (from memory, as
// survey.ClassOf's bounds); the limits keep a typing error out.
const (
	DefaultDefectSizeNM = 1.0
	MinDefectSizeNM     = 0.1
	MaxDefectSizeNM     = 100.0
)

// SurveyImage is a survey topograph shaded for display: W x H grey
// levels, line 0 at the bottom (survey.Shade).
type SurveyImage struct {
	Source string // the file it was read from, or the demo's name
	W, H   int
	Grey   []uint8
}

// SurveySource returns the file of the design's survey image, resolved
// from the design file's folder, and the built-in demo image's bytes
// when the design is the unsaved demo naming it. Both are empty when
// there is no image to show.
func (s *Session) SurveySource() (path string, embedded []byte) {
	sv := s.d.Survey
	if sv == nil || sv.Image == "" {
		return "", nil
	}
	if s.path == "" && sv.Image == assets.DemoSurveyName {
		return assets.DemoSurveyName, assets.DemoSurvey
	}
	if filepath.IsAbs(sv.Image) || s.path == "" {
		return filepath.FromSlash(sv.Image), nil
	}
	return filepath.Join(filepath.Dir(s.path), filepath.FromSlash(sv.Image)), nil
}

// LoadSurveyImage reads and shades a survey image: the file at path, or
// embedded when not nil (path then names it). Slow for a large image:
// call it off the window's goroutine.
func LoadSurveyImage(path string, embedded []byte) (*SurveyImage, error) {
	var t *survey.Topograph
	var err error
	if embedded != nil {
		t, err = survey.Decode(bytes.NewReader(embedded), path)
	} else {
		t, err = survey.Read(path)
	}
	if err != nil {
		return nil, err
	}
	return &SurveyImage{Source: path, W: t.Width, H: t.Height, Grey: survey.Shade(t)}, nil
}

// SetSurveyImage gives the session the shaded image of its survey (nil
// forgets it). It is not part of the design: the design names the file.
func (s *Session) SetSurveyImage(img *SurveyImage) {
	s.surveyImg = img
	s.notify(ChangeSurvey)
}

// SurveyImageShown returns the shaded image the session holds, or nil.
func (s *Session) SurveyImageShown() *SurveyImage { return s.surveyImg }

// AnalyseSurvey reads, analyses and shades a survey image (the window's
// background job).
func AnalyseSurvey(ctx context.Context, path string, opt survey.Options) (*survey.Analysis, *SurveyImage, error) {
	t, err := survey.Read(path)
	if err != nil {
		return nil, nil, err
	}
	an, err := survey.Analyse(ctx, t, opt)
	if err != nil {
		return nil, nil, err
	}
	return an, &SurveyImage{Source: path, W: t.Width, H: t.Height, Grey: survey.Shade(t)}, nil
}

// PutSurvey makes the analysis of the image at path the design's survey
// (one undoable edit): where the old survey sat, or centred on the
// atomic-precision core with its rows along the core terrace's rows.
func (s *Session) PutSurvey(an *survey.Analysis, img *SurveyImage, path string) error {
	l, err := s.d.Lay(s.Variant().Name)
	if err != nil {
		return err
	}
	name := path
	if s.path != "" {
		dir, _ := filepath.Abs(filepath.Dir(s.path))
		abs, _ := filepath.Abs(path)
		if rel, err := filepath.Rel(dir, abs); err == nil {
			name = filepath.ToSlash(rel)
		}
	}
	sv := an.Lay(l, s.d.Survey, name, nil)
	old := s.d.Survey
	if err := s.validEdit("add survey", func() func() {
		s.d.Survey = sv
		return func() { s.d.Survey = old }
	}); err != nil {
		return err
	}
	s.surveyImg = img
	s.placements = nil
	s.defectSel = -1
	s.commit("add survey "+filepath.Base(path), "", ChangeSurvey|ChangeSites)
	return nil
}

// RemoveSurvey takes the survey out of the design.
func (s *Session) RemoveSurvey() {
	if s.d.Survey == nil {
		return
	}
	s.d.Survey = nil
	s.surveyImg = nil
	s.placements = nil
	s.defectSel = -1
	s.commit("remove survey", "", ChangeSurvey|ChangeSites)
}

// MoveSurvey registers the survey on the field: its image's lower-left
// corner at offset (field nm), its x axis at rotationDeg.
func (s *Session) MoveSurvey(offset r2.Point, rotationDeg float64) error {
	if s.d.Survey == nil {
		return ErrNoSurvey
	}
	old := s.d.Survey
	sv := *old
	sv.OffsetNM, sv.RotationDeg = [2]float64{offset.X, offset.Y}, rotationDeg
	if err := s.validEdit("move survey", func() func() {
		s.d.Survey = &sv
		return func() { s.d.Survey = old }
	}); err != nil {
		return err
	}
	s.placements = nil
	s.commit(fmt.Sprintf("move survey to (%.2f, %.2f) nm, %.2f°", offset.X, offset.Y, rotationDeg), "move-survey", ChangeSurvey|ChangeSites)
	return nil
}

// TerracesFromSurvey replaces the design's terraces with the survey's
// (design.Survey.DesignTerraces: the largest takes the rest of the field,
// the others their outlines, each step's direction from the survey's
// heights), one undoable edit.
func (s *Session) TerracesFromSurvey() error {
	if s.d.Survey == nil {
		return ErrNoSurvey
	}
	ts, err := s.d.Survey.DesignTerraces()
	if err != nil {
		return err
	}
	return s.editTerraces(fmt.Sprintf("terraces from survey (%d)", len(ts)), "", func([]design.Terrace) []design.Terrace { return ts })
}

// editDefects applies f to a copy of the survey's defects as one edit,
// selecting defect sel after it (-1: none).
func (s *Session) editDefects(label string, f func([]design.SurveyDefect) []design.SurveyDefect, sel int) error {
	if s.d.Survey == nil {
		return ErrNoSurvey
	}
	old := s.d.Survey
	sv := *old
	sv.Defects = f(slices.Clone(old.Defects))
	if err := s.validEdit(label, func() func() {
		s.d.Survey = &sv
		return func() { s.d.Survey = old }
	}); err != nil {
		return err
	}
	s.placements = nil
	s.defectSel = sel
	s.commit(label, "", ChangeSurvey|ChangeSites)
	return nil
}

// onSurvey refuses a field point off the survey's image: its defects
// lie on it.
func (s *Session) onSurvey(p r2.Point) error {
	if !s.d.Survey.Covers(p) {
		return fmt.Errorf("(%.2f, %.2f) nm lies off the survey image: its defects lie on it", p.X, p.Y)
	}
	return nil
}

// AddDefect adds a defect by hand at field point at, of the given kind
// (design.DefectBright or DefectDark) and apparent width sizeNM, its
// class by appearance (survey.ClassOf), and selects it.
func (s *Session) AddDefect(at r2.Point, kind string, sizeNM float64) error {
	if s.d.Survey == nil {
		return ErrNoSurvey
	}
	if err := s.onSurvey(at); err != nil {
		return err
	}
	n := len(s.d.Survey.Defects)
	err := s.editDefects(fmt.Sprintf("add %s defect %d at (%.2f, %.2f) nm", kind, n+1, at.X, at.Y), func(ds []design.SurveyDefect) []design.SurveyDefect {
		p := s.d.Survey.FromField(at)
		return append(ds, design.SurveyDefect{AtNM: [2]float64{p.X, p.Y}, Kind: kind, SizeNM: sizeNM,
			Class: survey.ClassOf(kind == design.DefectBright, sizeNM), ByHand: true})
	}, n)
	return err
}

// MoveDefect moves defect i to field point to; it is then marked as
// placed by hand, and selected.
func (s *Session) MoveDefect(i int, to r2.Point) error {
	if s.d.Survey == nil || i < 0 || i >= len(s.d.Survey.Defects) {
		return fmt.Errorf("no defect %d", i+1)
	}
	if err := s.onSurvey(to); err != nil {
		return err
	}
	return s.editDefects(fmt.Sprintf("move defect %d to (%.2f, %.2f) nm", i+1, to.X, to.Y), func(ds []design.SurveyDefect) []design.SurveyDefect {
		p := s.d.Survey.FromField(to)
		ds[i].AtNM, ds[i].ByHand = [2]float64{p.X, p.Y}, true
		return ds
	}, i)
}

// DeleteDefect deletes defect i; the selection stays on the defect it
// was on, or none if that was i.
func (s *Session) DeleteDefect(i int) error {
	if s.d.Survey == nil || i < 0 || i >= len(s.d.Survey.Defects) {
		return fmt.Errorf("no defect %d", i+1)
	}
	sel := s.defectSel
	switch {
	case sel == i:
		sel = -1
	case sel > i:
		sel--
	}
	return s.editDefects(fmt.Sprintf("delete defect %d", i+1), func(ds []design.SurveyDefect) []design.SurveyDefect {
		return slices.Delete(ds, i, i+1)
	}, sel)
}

// SelectedDefect returns the selected defect of the survey, or -1.
func (s *Session) SelectedDefect() int {
	if s.d.Survey == nil || s.defectSel >= len(s.d.Survey.Defects) {
		return -1
	}
	return s.defectSel
}

// SelectDefect selects defect i of the survey (-1: none). The view rings
// it; the Survey panel's list follows.
func (s *Session) SelectDefect(i int) {
	if s.d.Survey == nil || i < 0 || i >= len(s.d.Survey.Defects) {
		i = -1
	}
	if i == s.defectSel {
		return
	}
	s.defectSel = i
	s.notify(ChangeSurvey)
}

// DeleteSelectedDefect deletes the selected defect, if any, and reports
// whether there was one.
func (s *Session) DeleteSelectedDefect() (bool, error) {
	i := s.SelectedDefect()
	if i < 0 {
		return false, nil
	}
	return true, s.DeleteDefect(i)
}

// DefectAt returns the defect whose marker lies under field point p
// (render.DefectMarkAt: within near nm, or its own radius and more), or
// -1.
func (s *Session) DefectAt(p r2.Point, near float64) int {
	if s.d.Survey == nil {
		return -1
	}
	return render.DefectMarkAt(defectMarks(s.d.Survey), p, near)
}

// defectMarks returns the survey's defects as the view marks them, in
// the survey's order.
func defectMarks(sv *design.Survey) []render.DefectMark {
	fd := sv.FieldDefects()
	marks := make([]render.DefectMark, len(fd))
	for i, d := range fd {
		marks[i] = render.DefectMark{At: d.At, RadiusNM: d.RadiusNM, Bright: d.Kind == design.DefectBright, ByHand: d.ByHand}
	}
	return marks
}

// --- The Defect tool (tools.go routes its gestures here) ---

// defectClick adds a defect of the tool's kind and width at p, or selects
// the one whose marker is under p.
func (s *Session) defectClick(p r2.Point, near float64) {
	if s.d.Survey == nil {
		s.Err = ErrNoSurvey
		s.notify(ChangePreview)
		return
	}
	if i := s.DefectAt(p, near); i >= 0 {
		s.SelectDefect(i)
		return
	}
	if err := s.AddDefect(p, s.Opts.DefectKind, s.Opts.DefectSizeNM); err != nil {
		s.Err = err
		s.notify(ChangePreview)
	}
}

// defectPress starts a drag with the Defect tool: on a defect's marker
// it selects the defect and will move it; elsewhere it does nothing.
func (s *Session) defectPress(g *gesture, p r2.Point) {
	g.target = -1
	if s.d.Survey == nil {
		s.Err = ErrNoSurvey
		return
	}
	if i := s.DefectAt(p, s.near); i >= 0 {
		s.SelectDefect(i)
		g.target, g.moving = i, true
	}
}

// defectRelease moves the defect dragged by the drag's length.
func (s *Session) defectRelease(g *gesture) {
	if !g.moving || !g.dragged || g.last == g.start || s.d.Survey == nil || g.target >= len(s.d.Survey.Defects) {
		return
	}
	at := s.d.Survey.FieldDefects()[g.target].At
	if err := s.MoveDefect(g.target, at.Add(g.last.Sub(g.start))); err != nil {
		s.Err = err
	}
}

// Placements are the placements of the current variant's core the last
// search found: the core as it is, and the best moves, best first.
type Placements struct {
	Current placement.Placement
	Best    []placement.Placement
	// Core is the core's extent (field nm) as it is; a placement's
	// extent is Core moved by its MoveNM.
	Core    r2.Rect
	Variant string
	Chosen  int // index into Best of the placement shown, or -1
	from    PlanToken
}

// FindPlacements searches placements of the variant's atomic-precision
// core on d's survey (the window's background job, on a copy).
func FindPlacements(ctx context.Context, d *design.Design, variant string, opt placement.Options) (*Placements, error) {
	l, err := d.Lay(variant)
	if err != nil {
		return nil, err
	}
	cur, best, err := placement.Search(ctx, l, opt)
	if err != nil {
		return nil, err
	}
	core := r2.EmptyRect()
	idx, _, err := placement.Moved(l, opt.Regions, placement.Placement{})
	if err != nil {
		return nil, err
	}
	for _, i := range idx {
		if b := l.Regions[i].Bounds; !b.IsEmpty() {
			core = core.Union(b)
		}
	}
	return &Placements{Current: cur, Best: best, Core: core, Variant: variant, Chosen: -1}, nil
}

// SetPlacements keeps the placements found from the state from; they
// are dropped if the design changed since.
func (s *Session) SetPlacements(p *Placements, from PlanToken) {
	if p == nil || from != s.Token() {
		s.placements = nil
	} else {
		p.from = from
		s.placements = p
	}
	s.notify(ChangeSurvey)
}

// Placements returns the placements found for the current state, or nil.
func (s *Session) Placements() *Placements {
	if p := s.placements; p != nil && p.from == s.Token() && p.Variant == s.Variant().Name {
		return p
	}
	return nil
}

// ChoosePlacement shows placement i (-1: none) on the view.
func (s *Session) ChoosePlacement(i int) {
	if p := s.Placements(); p != nil && i >= -1 && i < len(p.Best) {
		p.Chosen = i
		s.notify(ChangeSurvey)
	}
}

// ApplyPlacement moves the core's regions by placement i as one
// undoable edit; their fan-outs and pads stay (the check then says what
// the move broke).
func (s *Session) ApplyPlacement(i int) error {
	ps := s.Placements()
	if ps == nil || i < 0 || i >= len(ps.Best) {
		return errors.New("no such placement: search again")
	}
	p := ps.Best[i]
	if p.Dimers == 0 && p.Rows == 0 {
		return errors.New("that placement leaves the core where it is")
	}
	l, err := s.d.Lay(s.Variant().Name)
	if err != nil {
		return err
	}
	idx, moved, err := placement.Moved(l, nil, p)
	if err != nil {
		return err
	}
	v := s.Variant()
	old := slices.Clone(v.Regions)
	if err := s.validEdit("apply placement", func() func() {
		for k, i := range idx {
			v.Regions[i] = moved[k]
		}
		return func() { copy(v.Regions, old) }
	}); err != nil {
		return err
	}
	for _, i := range idx {
		c := s.touch(s.variant, i)
		if err := s.rasterise(c, &v.Regions[i]); err != nil {
			s.Err = err
		}
	}
	s.cancelGesture()
	s.shapeSel = nil
	s.placements = nil
	s.commit(fmt.Sprintf("move the core by %+d dimers, %+d rows (%.2f, %.2f) nm", p.Dimers, p.Rows, p.MoveNM.X, p.MoveNM.Y), "", ChangeSites|ChangeRegions|ChangeSurvey)
	return nil
}

// surveyOverlay returns the survey as the view draws it, or nil.
func (s *Session) surveyOverlay(o SceneOptions) *render.SurveyOverlay {
	sv := s.d.Survey
	if sv == nil || !o.Survey {
		return nil
	}
	so := &render.SurveyOverlay{Outline: sv.Outline(), Steps: sv.FieldSteps()}
	src, _ := s.SurveySource()
	if img := s.surveyImg; img != nil && img.Source == src && img.W == sv.SizePx[0] && img.H == sv.SizePx[1] {
		so.Grey, so.W, so.H = img.Grey, img.W, img.H
		so.Origin = sv.ToField(sv.PixelToSurvey(0, 0))
		so.U = sv.ToField(sv.PixelToSurvey(1, 0)).Sub(so.Origin)
		so.V = sv.ToField(sv.PixelToSurvey(0, 1)).Sub(so.Origin)
		so.Opacity = o.SurveyOpacity
	}
	so.Defects = defectMarks(sv)
	if i := s.SelectedDefect(); i >= 0 {
		so.Defects[i].Selected = true
	}
	if g := s.gesture; g != nil && g.tool == ToolDefect && g.moving && g.dragged && g.target < len(so.Defects) {
		// The defect being dragged, where the drag has it so far.
		so.Defects[g.target].At = so.Defects[g.target].At.Add(g.last.Sub(g.start))
	}
	if ps := s.Placements(); ps != nil {
		for k, p := range ps.Best {
			b := ps.Core
			b = r2.Rect{X: r1.Interval{Lo: b.X.Lo + p.MoveNM.X, Hi: b.X.Hi + p.MoveNM.X}, Y: r1.Interval{Lo: b.Y.Lo + p.MoveNM.Y, Hi: b.Y.Hi + p.MoveNM.Y}}
			so.Placements = append(so.Placements, render.PlacementMark{Bounds: b, Rank: k + 1, Chosen: k == ps.Chosen})
		}
	}
	return so
}
