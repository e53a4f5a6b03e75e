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
}

// Compare lays out and plans every variant of d with prof, in file
// order, and returns one result per variant. A variant that cannot be planned carries its
// error and the others are still planned; Compare itself fails only when
// ctx is cancelled or the profile is invalid. opt.Progress, if set, sees
// each variant's stages with the fraction of the whole comparison done.
func Compare(ctx context.Context, d *design.Design, prof Profile, opt Options) ([]VariantResult, error) {
	if err := prof.Validate(); err != nil {
		return nil, err
	}
	names := d.VariantNames()
	out := make([]VariantResult, 0, len(names))
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
		out = append(out, VariantResult{Variant: name, Plan: p, Err: err})
	}
	return out, nil
}
