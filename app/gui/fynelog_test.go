package gui

import (
	"bytes"
	"log"
	"strings"
	"testing"
)

// Issue 13: each file dialog printed Fyne's "Getting favorite
// locations: this computer does not define a VIDEOS folder" on stderr.
// The report is replaced by one line saying what it means, once; every
// other log line passes unchanged.
func TestFyneFavouritesReportExplainedOnce(t *testing.T) {
	var out bytes.Buffer
	lg := log.New(&fyneLog{out: &out}, "2026/12/02 15:16:36 ", 0)
	report := func() {
		lg.Println("Fyne error: ", "Getting favorite locations")
		lg.Println("  Cause:", "this computer does not define a VIDEOS folder")
		lg.Printf("  At: %s:%d", "/root/go/pkg/mod/fyne.io/fyne/v2@v2.7.1/dialog/file.go", 396)
	}
	report()
	lg.Println("Fyne error: ", "Getting favorite locations")
	lg.Println("  Cause:", "permission denied")
	lg.Printf("  At: %s:%d", "file.go", 396)
	report()
	lg.Println("something else")
	got := out.String()
	if n := strings.Count(got, favouritesNote); n != 1 {
		t.Errorf("the note appears %d times:\n%s", n, got)
	}
	if strings.Contains(got, "VIDEOS") {
		t.Errorf("the VIDEOS report still shows:\n%s", got)
	}
	for _, want := range []string{"Getting favorite locations\n", "Cause: permission denied", "At: file.go:396", "something else"} {
		if !strings.Contains(got, want) {
			t.Errorf("another error's line %q was lost:\n%s", want, got)
		}
	}
}
