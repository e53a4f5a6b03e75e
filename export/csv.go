package export

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"

	"dimerpath/planner"
)

// ActionColumns are the columns of the action CSV, in order (documented
// in the README under "Plan files"). Lengths are nm, times s, bias V,
// current A, speed nm/s; an empty cell means "not set by this action:
// keep the current conditions".
var ActionColumns = []string{
	"index", "kind", "segment", "stroke", "stroke_number", "region", "mode", "stroke_kind", "fiducial",
	"from_x_nm", "from_y_nm", "to_x_nm", "to_y_nm", "start_s", "duration_s",
	"bias_v", "current_a", "speed_nm_per_s", "passes", "path_nm", "note", "step",
}

// WriteActionsCSV writes one CSV row per tip action of p, in execution
// order, after a header row of ActionColumns: for people who drive their
// instrument from their own scripts. Numbers are written in full
// precision (strconv 'g', shortest exact form). path_nm holds, for write
// and dwell actions, the stroke's whole tip path as "x y" pairs separated
// by ";"; stroke_number is the stroke's number on paper (StrokeNumbers)
// beside its id. It refuses a plan checkPlan refuses. O(actions + points).
func WriteActionsCSV(w io.Writer, p *planner.Plan) error {
	if err := checkPlan(p); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(ActionColumns); err != nil {
		return err
	}
	row := make([]string, len(ActionColumns))
	numbers := StrokeNumbers(p)
	var path strings.Builder
	steps := ActionSteps(p)
	for ai, a := range p.Actions {
		for i := range row {
			row[i] = ""
		}
		row[0] = strconv.Itoa(a.Index)
		row[1] = string(a.Kind)
		row[2] = strconv.Itoa(a.Segment)
		row[3] = strconv.Itoa(a.Stroke)
		row[6] = string(a.Mode)
		if a.Kind == planner.ActRegister && a.Segment >= 0 {
			row[8] = p.Segments[a.Segment].Fiducial
		}
		row[9], row[10] = num(a.From.X), num(a.From.Y)
		row[11], row[12] = num(a.To.X), num(a.To.Y)
		row[13], row[14] = num(a.StartS), num(a.DurationS)
		row[15], row[16], row[17] = optNum(a.BiasV), optNum(a.CurrentA), optNum(a.SpeedNMPS)
		if a.Stroke >= 0 {
			s := &p.Strokes[a.Stroke]
			row[4] = strconv.Itoa(numbers[a.Stroke])
			row[5] = s.Region
			row[7] = string(s.Kind)
			if a.Kind == planner.ActWrite || a.Kind == planner.ActDwell {
				row[18] = strconv.Itoa(s.Passes)
				path.Reset()
				for k, q := range s.Path {
					if k > 0 {
						path.WriteByte(';')
					}
					path.WriteString(num(q.X))
					path.WriteByte(' ')
					path.WriteString(num(q.Y))
				}
				row[19] = path.String()
			}
		}
		row[20] = a.Note
		if steps[ai] >= 0 {
			row[21] = strconv.Itoa(steps[ai])
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// ActionSteps returns, for each action of p, the index of the process
// step it belongs to (its segment's step, else the step whose span holds
// its start), or -1 for an action in no step.
func ActionSteps(p *planner.Plan) []int {
	out := make([]int, len(p.Actions))
	k := 0
	for i, a := range p.Actions {
		out[i] = -1
		if a.Segment >= 0 && a.Segment < len(p.Segments) {
			out[i] = p.Segments[a.Segment].Step
			continue
		}
		for k < len(p.Steps) && a.StartS >= p.Steps[k].StartS+p.Steps[k].DurationS && !(a.DurationS == 0 && a.StartS == p.Steps[k].StartS) {
			k++
		}
		if k < len(p.Steps) && a.StartS >= p.Steps[k].StartS {
			out[i] = k
		}
	}
	return out
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// optNum formats v, or "" for 0 (a value the action does not set).
func optNum(v float64) string {
	if v == 0 {
		return ""
	}
	return num(v)
}
