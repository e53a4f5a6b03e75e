package planner

import (
	"context"
	"errors"

	"dimerpath/lattice/design"
)

// Options control how a plan is built.
type Options struct {
	// Seed drives every random choice (route perturbations, Monte Carlo):
	// the same design, profile and seed give the same plan.
	Seed int64
	// MonteCarloRuns is the number of samples for the time spread
	// (0 takes a default).
	MonteCarloRuns int
	// Progress, when non-nil, is called with a stage name and the
	// fraction of the whole work done (0..1), from the planning goroutine.
	Progress func(stage string, fraction float64)
}

// Build plans one variant of d with the instrument profile prof. It
// returns ctx.Err() when cancelled, and a *LimitError when the plan
// would need a value beyond prof.Limits.
func Build(ctx context.Context, d *design.Design, variant string, prof Profile, opt Options) (*Plan, error) {
	return nil, errors.New("planner: not implemented yet")
}
