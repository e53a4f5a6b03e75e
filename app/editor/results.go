package editor

import (
	"github.com/golang/geo/r2"

	"dimerpath/planner"
)

// Plan returns the last plan of the current variant and whether it is
// out of date (the design changed since it was made); nil when the
// current variant has not been planned.
func (s *Session) Plan() (p *planner.Plan, stale bool) {
	if s.plan == nil || s.planVariant != s.Variant().Name {
		return nil, false
	}
	return s.plan, s.planState != s.hist.current()
}

// SetPlan records p as the plan of the variant named variant, made from
// the design as it was at the history state from (see PlanToken).
func (s *Session) SetPlan(p *planner.Plan, variant string, from PlanToken) {
	s.plan, s.planVariant, s.planState = p, variant, from.state
	s.notify(ChangePlan | ChangeSites)
}

// Checked reports whether any design-rule check has reported since the
// session opened.
func (s *Session) Checked() bool { return s.findState != nil }

// Findings returns the last design-rule findings of the current variant
// and whether they are out of date.
func (s *Session) Findings() (f []Finding, stale bool) {
	return s.findings, s.findState != s.hist.current()
}

// SetFindings records the findings of a check made at state from.
func (s *Session) SetFindings(f []Finding, from PlanToken) {
	s.SetCheck(CheckResult{Findings: f}, from)
}

// SetCheck records a check's findings and tunnel-gap widths, made at
// state from.
func (s *Session) SetCheck(c CheckResult, from PlanToken) {
	f := c.Findings
	s.findings, s.findState, s.gapWidths = f, from.state, c.GapWidths
	s.chosen = -1
	s.notify(ChangeFindings | ChangeSites)
}

// ChooseFinding marks finding i as the one chosen in the list (-1 for
// none); the canvas draws it emphasised.
func (s *Session) ChooseFinding(i int) {
	if i >= len(s.findings) {
		i = -1
	}
	s.chosen = i
	s.notify(ChangeSites)
}

// FindingAt returns the position (field nm) finding i names.
func (s *Session) FindingAt(i int) r2.Point { return s.findings[i].At }
