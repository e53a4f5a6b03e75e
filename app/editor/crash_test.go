package editor

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/golang/geo/r2"

	"dimerpath/export"
	"dimerpath/internal/atomicfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// crashVersions returns the two versions of a design the crash test
// alternates between: the demo, and the demo renamed with a large
// hand-painted region (so that saving it takes a while).
func crashVersions(t testing.TB) (a, b *design.Design) {
	a, err := DemoDesign()
	if err != nil {
		t.Fatal(err)
	}
	b, _ = DemoDesign()
	b.Name = "crash test, version B"
	surf, err := b.Surface()
	if err != nil {
		t.Fatal(err)
	}
	set := lattice.NewSiteSet()
	for y := 100.0; y < 500; y += 1.6 { // thin strips: many runs to write (a few MB)
		surf.Paint(set, lattice.RectFromCorners(r2.Point{X: 100, Y: y}, r2.Point{X: 700, Y: y + 0.4}))
	}
	b.Variants[0].Regions = append(b.Variants[0].Regions, design.Region{Name: "hand", Role: design.RoleOther, Mode: design.ModeFE, Painted: set})
	return a, b
}

var crashDate = time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC)

// TestCrashChild is the process TestKilledWhileWriting kills: it saves,
// autosaves and exports in a loop, as the window does, until killed.
func TestCrashChild(t *testing.T) {
	dir := os.Getenv("DIMERPATH_CRASH_DIR")
	if dir == "" {
		t.Skip("run by TestKilledWhileWriting")
	}
	a, b := crashVersions(t)
	p, err := BuildPlan(context.Background(), a, "", planner.DefaultProfile(), planner.Options{Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	es := ExportSettings{Paper: export.A4, Date: crashDate, Generator: "dimerpath test"}
	for i := 0; ; i++ {
		d := a
		if i%2 == 1 {
			d = b
		}
		if err := SaveDesign(filepath.Join(dir, "design.json"), d); err != nil {
			t.Fatal(err)
		}
		if err := WriteRecovery(filepath.Join(dir, "config"), d, RecoveryInfo{Path: filepath.Join(dir, "design.json"), SavedAt: crashDate, Design: d.Name}, SaveDesign); err != nil {
			t.Fatal(err)
		}
		if err := ExportPlan(context.Background(), filepath.Join(dir, "plan.pdf"), a, p, es, nil); err != nil {
			t.Fatal(err)
		}
		if err := ExportPlan(context.Background(), filepath.Join(dir, "plan.csv"), a, p, es, nil); err != nil {
			t.Fatal(err)
		}
		if i == 1 {
			os.Stdout.WriteString("ready\n") // every file exists in both versions' turn
		}
	}
}

// Issue 16 §5: a process killed (SIGKILL) at a random moment while it
// saves the design, autosaves the recovery copy and exports leaves each
// file either as it was or complete: the design and the recovery copy
// load as one of the two versions, the exports are whole, and the next
// start (FindRecovery, CleanStaleFiles) leaves no temporary file behind.
func TestKilledWhileWriting(t *testing.T) {
	if testing.Short() {
		t.Skip("kills a writer process many times")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Skip(err)
	}
	dir := t.TempDir()
	config := filepath.Join(dir, "config")
	a, b := crashVersions(t)
	want := map[string]bool{}
	for _, d := range []*design.Design{a, b} {
		d.Format, d.Version = design.FormatName, design.FormatVersion
		data, err := design.Marshal(d)
		if err != nil {
			t.Fatal(err)
		}
		want[string(data)] = true
	}
	// The exports are deterministic: what a complete one holds.
	ref := t.TempDir()
	p, err := BuildPlan(context.Background(), a, "", planner.DefaultProfile(), planner.Options{Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	es := ExportSettings{Paper: export.A4, Date: crashDate, Generator: "dimerpath test"}
	complete := map[string][]byte{}
	for _, name := range []string{"plan.pdf", "plan.csv"} {
		if err := ExportPlan(context.Background(), filepath.Join(ref, name), a, p, es, nil); err != nil {
			t.Fatal(err)
		}
		complete[name], _ = os.ReadFile(filepath.Join(ref, name))
	}

	rng := rand.New(rand.NewPCG(16, 5))
	kills, leftBehind := 8, 0
	for k := range kills {
		cmd := exec.Command(exe, "-test.run", "^TestCrashChild$")
		cmd.Env = append(os.Environ(), "DIMERPATH_CRASH_DIR="+dir)
		out, _ := cmd.StdoutPipe()
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		if _, err := bufio.NewReader(out).ReadString('\n'); err != nil {
			cmd.Process.Kill()
			cmd.Wait()
			t.Fatalf("kill %d: the writer did not start: %v", k, err)
		}
		time.Sleep(time.Duration(rng.IntN(600)) * time.Millisecond)
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()

		// The user's files: old or complete new, never half.
		if data, err := os.ReadFile(filepath.Join(dir, "design.json")); err != nil || !want[string(data)] {
			t.Errorf("kill %d: design.json is neither version (%d bytes, %v)", k, len(data), err)
		}
		for name, whole := range complete {
			if data, err := os.ReadFile(filepath.Join(dir, name)); err != nil || !bytes.Equal(data, whole) {
				t.Errorf("kill %d: %s is not the complete export (%d of %d bytes, %v)", k, name, len(data), len(whole), err)
			}
		}
		// The recovery copy always loads, as one of the two versions.
		d, info, err := LoadRecovery(config)
		if err != nil || (d.Name != a.Name && d.Name != b.Name) || info.Design == "" {
			t.Errorf("kill %d: recovery copy: %v, %+v", k, err, info)
		}
		leftBehind += len(temps(dir)) + len(temps(config))
		// The next start removes what the killed writer left.
		CleanStaleFiles(dir)
		FindRecovery(config)
		if left := append(temps(dir), temps(config)...); len(left) > 0 {
			t.Errorf("kill %d: temporary files left after the next start: %v", k, left)
		}
	}
	t.Logf("%d kills left %d temporary files, all removed at the next start", kills, leftBehind)
}

// temps lists the temporary files of atomicfile in dir.
func temps(dir string) []string {
	entries, _ := os.ReadDir(dir)
	var out []string
	for _, e := range entries {
		if atomicfile.IsTemp(e.Name()) {
			out = append(out, fmt.Sprintf("%s/%s", filepath.Base(dir), e.Name()))
		}
	}
	return out
}
