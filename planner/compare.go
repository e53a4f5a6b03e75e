package planner

import (
	"context"
	"errors"

	"dimerpath/lattice/design"
)

// VariantResult is one variant's plan in a comparison, or the error that
// stopped it (for example a *LimitError).
type VariantResult struct {
	Variant string
	Plan    *Plan
	Err     error
	// Differences says how the variant's layout differs from the first
	// variant's (design.Differences), when Compared: none for the first,
	// or where either could not be laid out.
	Differences []design.Difference
	Compared    bool
}

// Compare lays out and plans every variant of d with prof, in file
// order, and returns one result per variant, each after the first with
// how its layout differs from the first's. A variant that cannot be planned carries its
// error and the others are still planned; Compare itself fails only when
// ctx is cancelled or the profile is invalid. opt.Progress, if set, sees
// each variant's stages with the fraction of the whole comparison done.
func Compare(ctx context.Context, d *design.Design, prof Profile, opt Options) ([]VariantResult, error) {
	if err := prof.Validate(); err != nil {
		return nil, err
	}
	names := d.VariantNames()
	out := make([]VariantResult, 0, len(names))
	var first *design.Layout
	for i, name := range names {
		o := opt
		if opt.Progress != nil {
			n := float64(len(names))
			o.Progress = func(stage string, f float64) {
				opt.Progress(name+": "+stage, (float64(i)+f)/n)
			}
		}
		var p *Plan
		lay, err := d.Lay(name)
		if err == nil {
			p, err = Build(ctx, lay, prof, o)
		}
		if err != nil && (errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)) {
			return out, err
		}
		r := VariantResult{Variant: name, Plan: p, Err: err}
		switch {
		case i == 0:
			first = lay
		case first != nil && lay != nil:
			r.Differences, r.Compared = design.Differences(first, lay), true
		}
		out = append(out, r)
	}
	return out, nil
}
