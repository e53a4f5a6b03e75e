package export

import (
	"context"
	"dimerpath/export/internal/planfixture"
	"testing"
	"time"
)

func TestScratch4(t *testing.T) {
	d := planfixture.SET()
	p := d.Plan
	p.FieldWidthNM, p.FieldHeightNM = 600, 400
	opt := Options{Date: time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC)}
	if err := WriteFile(context.Background(), "/tmp/exp/dev.pdf", p, opt); err != nil {
		t.Fatal(err)
	}
}
