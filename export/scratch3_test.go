package export

import (
	"context"
	"dimerpath/export/internal/planfixture"
	"testing"
	"time"
)

func TestScratch3(t *testing.T) {
	d := planfixture.SET()
	p := d.Plan
	p.Design = "Vesterholm Atomic Devices Group — Kestrel-7 donor-pair sensor with a very long descriptive design name µ±²Å"
	p.Variant = "gap-9 (both tunnel gaps 9 dimer rows, 6.9 nm)"
	p.Profile = "Vesterholm RT-STM 2, W tip etched 2026-03-01, room temperature, calibrated from test lines"
	p.Fiducials[0].Name = "F-southwest-corner-mark"
	for i := range p.Segments {
		if p.Segments[i].Fiducial == "F-SW" {
			p.Segments[i].Fiducial = "F-southwest-corner-mark"
		}
	}
	p.Modes[0].Region = "sensor-island-with-a-long-name-that-will-not-fit"
	p.Modes[0].Reason = "the placement tolerance ±0.2 nm is tighter than the field-emission edge roughness (±2 nm), so the region is written atom by atom in AP mode"
	p.Warnings = append(p.Warnings, "a very long warning that goes on and on about something the operator should know before the session starts, with numbers 1.23 nm and 4.56 s")
	opt := fixtureOptions(d)
	opt.Paper = Letter
	opt.Date = time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC)
	if err := WriteFile(context.Background(), "/tmp/exp/long.pdf", p, opt); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(context.Background(), "/tmp/exp/empty.pdf", emptyPlan(), Options{}); err != nil {
		t.Fatal(err)
	}
}
