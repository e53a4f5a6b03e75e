package gui

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/app/editor"
	"github.com/golang/geo/r2"
)

// bruteGap is the least distance (nm) between any site cell of a and
// any of b, by trying every pair: the definition the tunnel-gap rule
// states (README, "tunnel-gap"), computed independently of the design
// package's spatial index.
func bruteGap(s *editor.Session, a, b int) float64 {
	surf := s.Surface()
	var bc []r2.Rect
	for site := range s.RegionSites(b).All() {
		bc = append(bc, surf.SiteCell(site))
	}
	best := math.Inf(1)
	for site := range s.RegionSites(a).All() {
		p := surf.SiteCell(site)
		for _, q := range bc {
			dx := math.Max(0, math.Max(q.X.Lo-p.X.Hi, p.X.Lo-q.X.Hi))
			dy := math.Max(0, math.Max(q.Y.Lo-p.Y.Hi, p.Y.Lo-q.Y.Hi))
			best = math.Min(best, math.Hypot(dx, dy))
		}
	}
	return best
}

func TestTunnelGapsDeclaredMeasuredAndKeptConsistent(t *testing.T) {
	u, _ := newTestUI(t, nil)
	s := u.Session
	if err := s.AddTunnelGap("island", "island"); err == nil {
		t.Error("a gap from a region to itself was accepted")
	}
	if err := s.AddTunnelGap("island", "nowhere"); err == nil {
		t.Error("a gap to a missing region was accepted")
	}
	if err := s.AddTunnelGap("island", "lead"); err != nil {
		t.Fatal(err)
	}
	if err := s.AddTunnelGap("lead", "island"); err == nil {
		t.Error("the same gap was declared twice")
	}
	if _, ok := s.GapWidth("island", "lead"); ok {
		t.Error("a gap width is known before any check")
	}
	u.CheckSync()
	w, ok := s.GapWidth("lead", "island")
	if !ok {
		t.Fatal("the check did not measure the gap")
	}
	if want := bruteGap(s, 0, 1); math.Abs(w.NM-want) > 1e-6 {
		t.Errorf("gap measured %.4f nm, brute force over site cells %.4f nm", w.NM, want)
	}
	if want := fmt.Sprintf("%.2f nm (diagonal: ", w.NM); !strings.HasPrefix(w.Text, want) {
		t.Errorf("gap described as %q, want %q…: the lead sits off the island's corner", w.Text, want)
	}
	// The Regions panel shows it on the island.
	s.Select(0)
	if got := texts(u.regions.gaps); !strings.Contains(got, "Tunnel gap to lead: "+w.Text) {
		t.Errorf("Regions panel shows %q", got)
	}

	// Renaming a region renames its gaps, so the design still saves.
	if err := s.RenameRegion(0, "sensor island"); err != nil {
		t.Fatal(err)
	}
	if g := s.Variant().TunnelGaps[0]; g.A != "sensor island" || g.B != "lead" {
		t.Errorf("after the rename the gap is %s – %s", g.A, g.B)
	}
	path := filepath.Join(t.TempDir(), "renamed.json")
	if err := u.SaveTo(path); err != nil {
		t.Fatalf("a renamed region with a tunnel gap could not be saved: %v", err)
	}
	// Deleting a region drops its gaps.
	s.DeleteRegions(1)
	if n := len(s.Variant().TunnelGaps); n != 0 {
		t.Errorf("%d gaps left after deleting the lead", n)
	}
	if err := u.SaveTo(path); err != nil {
		t.Fatalf("saving after deleting a coupled region: %v", err)
	}
	s.Undo()
	if n := len(s.Variant().TunnelGaps); n != 1 {
		t.Errorf("undoing the delete brought back %d gaps, want 1", n)
	}
	s.RemoveTunnelGap(0)
	if n := len(s.Variant().TunnelGaps); n != 0 || s.UndoLabel() != "remove tunnel gap sensor island – lead" {
		t.Errorf("after removing: %d gaps, undo %q", n, s.UndoLabel())
	}
}

func TestFindingsSayWhatToDo(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.CheckSync()
	u.tabs.Select(u.tabFindings)
	w.Canvas().Capture()
	got := texts(u.findings.content)
	if !strings.Contains(got, "floating") || !strings.Contains(got, "declare the tunnel gap") {
		t.Errorf("the Checks panel does not say how to fix a floating region:\n%s", got)
	}
	if !strings.Contains(got, "2 errors and 0 warnings") {
		t.Errorf("summary not in words:\n%s", got)
	}
}
