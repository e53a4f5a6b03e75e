package planner

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// censoredFit is the maximum-likelihood fit of the linear model
// y = X·β + ε, ε ~ N(0, s²), in which some observations are known only to
// lie at or below 0 (left-censored at 0: the Tobit model, Tobin,
// Econometrica 26, 24 (1958)). Without censored observations it is
// ordinary least squares.
type censoredFit struct {
	Beta []float64
	// Cov is the covariance of Beta and S the residual standard
	// deviation, both with n − p degrees of freedom (DOF): exactly the
	// least-squares values without censoring; with it, the
	// maximum-likelihood values scaled by n/(n − p), the same
	// small-sample correction.
	Cov        *mat.SymDense
	S          float64
	DOF        int
	Censored   int
	Iterations int
}

// errCannotFit is wrapped by the errors of fitCensored.
var errCannotFit = errors.New("cannot be fitted")

// fitCensored fits the model to the rows of x (each of length p) and y;
// censored[i] marks an observation known only to be ≤ 0 (its y is not
// used). It needs at least p+1 observations, at least one uncensored, and
// uncensored rows that determine every coefficient (full column rank).
//
// With censoring it maximises the log-likelihood by Newton's method in
// Olsen's parameters (γ = β/s, h = 1/s; Olsen, Econometrica 46, 1211
// (1978)), in which it is concave, from the least-squares fit of the
// uncensored rows; the covariance is the inverse of the observed
// information, carried back to (β, s) by the delta method.
func fitCensored(x [][]float64, y []float64, censored []bool) (censoredFit, error) {
	n := len(x)
	if n == 0 {
		return censoredFit{}, fmt.Errorf("%w: no observations", errCannotFit)
	}
	p := len(x[0])
	var unc []int
	for i := range x {
		if !censored[i] {
			unc = append(unc, i)
		}
	}
	fit := censoredFit{DOF: n - p, Censored: n - len(unc)}
	switch {
	case n < p+1:
		return fit, fmt.Errorf("%w: %d observation(s) for %d coefficient(s) and the noise: need at least %d", errCannotFit, n, p, p+1)
	case len(unc) == 0:
		return fit, fmt.Errorf("%w: every observation is censored", errCannotFit)
	}
	xu := mat.NewDense(len(unc), p, nil)
	yu := mat.NewVecDense(len(unc), nil)
	for r, i := range unc {
		xu.SetRow(r, x[i])
		yu.SetVec(r, y[i])
	}
	if len(unc) < p || rankOf(xu) < p {
		return fit, fmt.Errorf("%w: the uncensored observations do not determine all %d coefficients", errCannotFit, p)
	}
	var qr mat.QR
	qr.Factorize(xu)
	var beta mat.VecDense
	if err := qr.SolveVecTo(&beta, false, yu); err != nil {
		return fit, fmt.Errorf("%w: %v", errCannotFit, err)
	}
	rss := 0.0
	for r, i := range unc {
		d := y[i] - mat.Dot(xu.RowView(r), &beta)
		rss += d * d
	}
	// leastSquares returns the least-squares fit of the uncensored rows
	// with dof degrees of freedom.
	leastSquares := func(dof int) (censoredFit, error) {
		fit.Beta, fit.DOF = beta.RawVector().Data, dof
		fit.S = math.Sqrt(rss / float64(dof))
		var xtx mat.SymDense
		xtx.SymOuterK(1, xu.T())
		var inv mat.SymDense
		if err := inv.PowPSD(&xtx, -1); err != nil {
			return fit, fmt.Errorf("%w: %v", errCannotFit, err)
		}
		inv.ScaleSym(fit.S*fit.S, &inv)
		fit.Cov = &inv
		return fit, nil
	}
	if fit.Censored == 0 {
		return leastSquares(fit.DOF)
	}
	if nu := len(unc); nu > p {
		// Censored rows predicted far below 0 by the uncensored rows'
		// least-squares fit (8 residual SDs: Φ(−8) ≈ 6·10⁻¹⁶) add nothing
		// to the likelihood, its gradient or its curvature: the fit is the
		// least-squares fit of the uncensored rows, with their degrees of
		// freedom. (With nearly exact data, Newton's method in h = 1/s
		// would run into a singular information matrix.)
		su := math.Sqrt(rss / float64(nu-p))
		far := true
		for i := range x {
			if censored[i] && floats.Dot(x[i], beta.RawVector().Data) > -8*su {
				far = false
				break
			}
		}
		if far {
			return leastSquares(nu - p)
		}
	}
	if rss <= 0 {
		// The uncensored rows fit exactly: start from a small noise.
		rss = 1e-12 * (1 + mat.Dot(yu, yu))
	}
	s0 := math.Sqrt(rss / float64(max(len(unc)-p, 1)))
	theta := make([]float64, p+1) // γ, then h
	for j := range p {
		theta[j] = beta.AtVec(j) / s0
	}
	theta[p] = 1 / s0
	ll, grad, hess := tobitOlsen(x, y, censored, theta)
	converged := false
	for it := 1; it <= 200 && !converged; it++ {
		fit.Iterations = it
		// Newton step: solve (−H)·δ = g.
		var neg mat.SymDense
		neg.ScaleSym(-1, hess)
		var chol mat.Cholesky
		var step mat.VecDense
		if chol.Factorize(&neg) {
			if err := chol.SolveVecTo(&step, mat.NewVecDense(p+1, grad)); err != nil {
				return fit, fmt.Errorf("%w: %v", errCannotFit, err)
			}
		} else {
			step.CloneFromVec(mat.NewVecDense(p+1, grad)) // steepest ascent
		}
		t := 1.0
		for range 60 {
			cand := make([]float64, p+1)
			for j := range cand {
				cand[j] = theta[j] + t*step.AtVec(j)
			}
			if cand[p] > 0 {
				cll, cg, ch := tobitOlsen(x, y, censored, cand)
				if cll >= ll-1e-12*math.Abs(ll) {
					converged = cll-ll <= 1e-12*(1+math.Abs(ll)) && mat.Norm(&step, 2)*t <= 1e-9*(1+floats2norm(theta))
					theta, ll, grad, hess = cand, cll, cg, ch
					break
				}
			}
			t /= 2
		}
		if t < 1e-15 {
			converged = true // no ascent left within float precision
		}
	}
	if !converged {
		return fit, fmt.Errorf("%w: the likelihood did not converge in %d Newton steps", errCannotFit, fit.Iterations)
	}
	h := theta[p]
	fit.Beta = make([]float64, p)
	for j := range p {
		fit.Beta[j] = theta[j] / h
	}
	var neg mat.SymDense
	neg.ScaleSym(-1, hess)
	var infoInv mat.SymDense
	if err := infoInv.PowPSD(&neg, -1); err != nil {
		return fit, fmt.Errorf("%w: the information matrix is singular: %v", errCannotFit, err)
	}
	// β = γ/h, s = 1/h: J = ∂(β)/∂(γ, h).
	jac := mat.NewDense(p, p+1, nil)
	for j := range p {
		jac.Set(j, j, 1/h)
		jac.Set(j, p, -theta[j]/(h*h))
	}
	var tmp mat.Dense
	tmp.Mul(jac, &infoInv)
	var cov mat.Dense
	cov.Mul(&tmp, jac.T())
	scale := float64(n) / float64(fit.DOF)
	sym := mat.NewSymDense(p, nil)
	for i := range p {
		for j := i; j < p; j++ {
			sym.SetSym(i, j, scale*(cov.At(i, j)+cov.At(j, i))/2)
		}
	}
	fit.Cov = sym
	fit.S = math.Sqrt(scale) / h
	return fit, nil
}

// tobitOlsen returns the Tobit log-likelihood in Olsen's parameters θ =
// (γ, h) with its gradient and Hessian. An uncensored observation adds
// ln h − (h·y − x·γ)²/2 − ln√(2π), a censored one ln Φ(−x·γ).
func tobitOlsen(x [][]float64, y []float64, censored []bool, theta []float64) (float64, []float64, *mat.SymDense) {
	p := len(theta) - 1
	h := theta[p]
	ll := 0.0
	g := make([]float64, p+1)
	hs := mat.NewSymDense(p+1, nil)
	add := func(i, j int, v float64) { hs.SetSym(i, j, hs.At(i, j)+v) }
	for i, row := range x {
		xg := 0.0
		for j := range p {
			xg += row[j] * theta[j]
		}
		if censored[i] {
			z := -xg
			ll += logNormalCDF(z)
			lam := millsRatio(z)
			for j := range p {
				g[j] -= lam * row[j]
			}
			c := -lam * (lam + z)
			for a := range p {
				for b := a; b < p; b++ {
					add(a, b, c*row[a]*row[b])
				}
			}
			continue
		}
		r := h*y[i] - xg
		ll += math.Log(h) - r*r/2 - 0.5*math.Log(2*math.Pi)
		for j := range p {
			g[j] += r * row[j]
		}
		g[p] += 1/h - r*y[i]
		for a := range p {
			for b := a; b < p; b++ {
				add(a, b, -row[a]*row[b])
			}
			add(a, p, y[i]*row[a])
		}
		add(p, p, -1/(h*h)-y[i]*y[i])
	}
	return ll, g, hs
}

// logNormalCDF returns ln Φ(z), accurate far into the lower tail.
func logNormalCDF(z float64) float64 {
	if z > -30 {
		return math.Log(normalCDF(z))
	}
	// Φ(z) = φ(z)/(−z)·(1 − 1/z² + 3/z⁴ − …) (Abramowitz & Stegun 26.2.12).
	z2 := z * z
	return -z2/2 - math.Log(-z) - 0.5*math.Log(2*math.Pi) + math.Log(1-1/z2+3/(z2*z2))
}

// millsRatio returns φ(z)/Φ(z), accurate far into the lower tail.
func millsRatio(z float64) float64 {
	if z > -30 {
		return math.Exp(-z*z/2) / math.Sqrt(2*math.Pi) / normalCDF(z)
	}
	z2 := z * z
	return -z / (1 - 1/z2 + 3/(z2*z2))
}

// rankOf returns the numerical rank of a (singular values above
// 1e-10 of the largest).
func rankOf(a *mat.Dense) int {
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDNone) {
		return 0
	}
	vals := svd.Values(nil)
	r := 0
	for _, v := range vals {
		if v > 1e-10*vals[0] {
			r++
		}
	}
	return r
}

func floats2norm(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x * x
	}
	return math.Sqrt(s)
}
