package gui

import (
	"errors"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/app/render/rendertest"
	"dimerpath/export"
	"dimerpath/internal/units"
)

// texts returns every text shown under o.
func texts(o fyne.CanvasObject) string {
	var b strings.Builder
	var walk func(fyne.CanvasObject)
	walk = func(o fyne.CanvasObject) {
		switch w := o.(type) {
		case *widget.Label:
			b.WriteString(w.Text + "\n")
		case *canvas.Text:
			b.WriteString(w.Text + "\n")
		case *fyne.Container:
			for _, c := range w.Objects {
				walk(c)
			}
		case fyne.Widget:
			r := widgetRenderer(w)
			for _, c := range r.Objects() {
				walk(c)
			}
		}
	}
	walk(o)
	return b.String()
}

func TestPlanShownOnCanvasAndPanel(t *testing.T) {
	u, w := newTestUI(t, nil)
	p := editortest.HandPlan(u.Session)
	u.Session.SetPlan(p, p.Variant, u.Session.Token())
	mid := p.Strokes[0].Path[0].Add(p.Strokes[0].Path[1]).Mul(0.5)
	// Zoomed out, strokes are drawn opaque in their segment's colour.
	img := zoomOn(w, u, mid, 0.5)
	if got, want := pixelAt(img, u, mid), render.SegmentColor(0); got != want {
		t.Errorf("stroke of segment 0 drawn %v, want %v", got, want)
	}
	mid1 := p.Strokes[1].Path[0].Add(p.Strokes[1].Path[1]).Mul(0.5)
	if got, want := pixelAt(img, u, mid1), render.SegmentColor(1); got != want {
		t.Errorf("stroke of segment 1 drawn %v, want %v", got, want)
	}
	// Zoomed in, they are see-through: the segment colour over the lead.
	img = zoomOn(w, u, mid, 0.03)
	if got := pixelAt(img, u, mid); got == render.SegmentColor(0) || got.R <= got.B {
		t.Errorf("wide stroke drawn %v, want segment 0's red laid over the sites", got)
	}
	u.View.Fit()
	u.tabs.Select(u.tabPlan)
	rendertest.SaveImage(t, "window-plan.png", w.Canvas().Capture())
	zoomOn(w, u, mid, 0.5)
	panel := texts(u.planView.content)
	for _, want := range []string{units.Duration(3720), "P10 " + units.Duration(3500), "Every window opened as drawn with exactly one donor: 40 % (68 % interval 33 – 47 %, 95 % interval 26 – 54 %", "2 drift-safe segments"} {
		if !strings.Contains(panel, want) {
			t.Errorf("plan panel lacks %q:\n%s", want, panel)
		}
	}
	if legend := texts(u.legend); !strings.Contains(legend, "strokes by segment (2)") {
		t.Errorf("legend lacks the route:\n%s", legend)
	}

	// Hiding the route shows the lead again.
	u.routeCheck.SetChecked(false)
	if got := pixelAt(w.Canvas().Capture(), u, mid); got == render.SegmentColor(0) {
		t.Error("route still drawn after hiding it")
	}
	u.routeCheck.SetChecked(true)

	// An edit makes the plan stale, and the views say so.
	u.Session.AddRegion("afterthought", "other")
	if _, stale := u.Session.Plan(); !stale {
		t.Fatal("plan not stale after an edit")
	}
	if !strings.Contains(texts(u.planView.content), "changed since this plan") {
		t.Error("plan panel does not say the plan is out of date")
	}
	if !strings.Contains(texts(u.legend), "out of date") {
		t.Error("legend does not say the route is out of date")
	}
	// Another variant has no plan.
	u.Session.SetVariant(1)
	if got, _ := u.Session.Plan(); got != nil {
		t.Error("variant B shows variant A's plan")
	}
	if !strings.Contains(texts(u.planView.content), "has not been planned") {
		t.Error("plan panel has no empty state for an unplanned variant")
	}
}

func TestComparisonView(t *testing.T) {
	u, _ := newTestUI(t, nil)
	p := editortest.HandPlan(u.Session)
	res := []exportResult{{Variant: "A", Plan: p}, {Variant: "B", Err: errPlanTest}}
	view := comparisonView(res, nil)
	if w := view.MinSize().Width; w > 1100 {
		t.Errorf("comparison is %g units wide, more than its 1100-unit dialog", w)
	}
	text := texts(view)
	// P(all windows good) with its 95 % interval (issue 10 §4).
	for _, want := range []string{"A", units.Clock(3720), "40 %", "95 % interval", "26 – 54 %", "40 % (95 %: 26 – 54 %)", "B", errPlanTest.Error()} { // times to the second (issue 13)
		if !strings.Contains(text, want) {
			t.Errorf("comparison lacks %q:\n%s", want, text)
		}
	}
}

type exportResult = export.VariantResult

var errPlanTest = errors.New("refused: fe.bias_v beyond the limit")

func widgetRenderer(w fyne.Widget) fyne.WidgetRenderer { return test.WidgetRenderer(w) }

// Issue 13: the yield rows mixed raw probabilities ("8.1e-07") with
// percentages; every probability is a percentage.
func TestProbabilitiesArePercentages(t *testing.T) {
	for _, c := range []struct {
		p    float64
		want string
	}{
		{0.611, "61.1 %"},
		{0.0111, "1.11 %"},
		{3.12e-4, "0.0312 %"},
		{1e-5, "0.001 %"},
		{8.1e-7, "8.1·10⁻⁵ %"},
		{9.96e-9, "1·10⁻⁶ %"},
		{2.5e-20, "2.5·10⁻¹⁸ %"},
		{0, "0 %"},
	} {
		if got := formatProbability(c.p); got != c.want {
			t.Errorf("formatProbability(%g) = %q, want %q", c.p, got, c.want)
		}
	}
}
