package design

import (
	"strings"
	"testing"
)

// The example in the README's "Design files" section loads and passes
// the checks, so the documentation cannot drift from the format.
func TestReadmeExample(t *testing.T) {
	readme := string(mustRead(t, "../../README.md"))
	_, rest, ok := strings.Cut(readme, "## Design files")
	if !ok {
		t.Fatal("README has no Design files section")
	}
	_, rest, ok = strings.Cut(rest, "```json\n")
	block, _, ok2 := strings.Cut(rest, "```")
	if !ok || !ok2 {
		t.Fatal("Design files section has no json block")
	}
	d, err := Parse("README.md", []byte(block))
	if err != nil {
		t.Fatal(err)
	}
	fs, err := Check(d, "")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range fs {
		t.Errorf("README example: %v", f)
	}
	l, _ := d.Lay("")
	if n := len(l.Region("donors").Windows); n != 2 {
		t.Errorf("README example has %d windows, want 2", n)
	}
}
