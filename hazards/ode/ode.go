// Package ode integrates systems of ordinary differential equations y' = f(t, y) with the embedded
// Runge–Kutta pair of Dormand and Prince, order 5 with an order-4 error estimate (J. R. Dormand and
// P. J. Prince, "A family of embedded Runge-Kutta formulae", J. Comput. Appl. Math. 6(1), 1980, table
// "RK5(4)7M"), with the step-size control and starting-step heuristic of E. Hairer, S. P. Nørsett and
// G. Wanner, Solving Ordinary Differential Equations I (2nd ed., Springer 1993), §II.4, and the
// continuous extension of order 4 given there (§II.6, "dense output of DOPRI5") for locating events.
//
// Every run is bounded: a maximum number of steps, a minimum step and an optional wall-clock deadline.
// A problem that would need more ends with an error wrapping ErrMaxSteps, ErrMinStep or ErrDeadline,
// never with a hang. A non-finite derivative or state ends with ErrNonFinite.
package ode

import (
	"errors"
	"fmt"
	"math"
	"time"
)

// System evaluates dy = f(t, y). It must not retain y or dy.
type System func(t float64, y, dy []float64)

// Event is a scalar function of the state whose zero crossing stops the integration at the crossing.
type Event struct {
	// G is the event function; the event happens where G changes sign between two accepted steps.
	G func(t float64, y []float64) float64
	// Dir selects the crossings: +1 only from negative to non-negative, −1 only from positive to
	// non-positive, 0 both.
	Dir int
	// OnCross, when set, makes the event non-terminal: it is called with the located time and the
	// interpolated state there (read-only, order-4 dense output) and the integration goes on.
	OnCross func(t float64, y []float64)
}

// Options bound and tune one integration. The zero value of each field selects its default.
type Options struct {
	RelTol float64   // relative tolerance; default 1e-6
	AbsTol []float64 // absolute tolerance per component; nil: AbsTolAll for every component
	// AbsTolAll is the absolute tolerance used when AbsTol is nil; default 1e-9.
	AbsTolAll   float64
	InitialStep float64 // first step, s; 0: chosen by the Hairer–Nørsett–Wanner heuristic
	MaxStep     float64 // largest step; default |tEnd − t0|
	// MinStep is the smallest step the controller may take before it gives up with ErrMinStep;
	// default 1e-12·|tEnd − t0|.
	MinStep  float64
	MaxSteps int       // accepted plus rejected steps allowed; default 100000
	Deadline time.Time // wall-clock limit; zero: none
	// EventTol is the absolute tolerance on the located event time; default 1e-12·|tEnd − t0|.
	EventTol float64
	// Observe, when set, is called after every accepted step with the new time and state (read-only).
	// Returning true stops the integration there.
	Observe func(t float64, y []float64) bool
}

// Result reports how an integration ended. The state itself is left in the caller's slice.
type Result struct {
	T        float64 // time reached
	Event    int     // index of the event that stopped the run, −1 if none
	Stopped  bool    // Observe asked to stop
	Steps    int     // accepted steps
	Rejected int     // rejected steps
	Evals    int     // evaluations of the system
	LastStep float64 // last accepted step size, a good first step for a continuation
}

// Errors wrapped by Integrate.
var (
	ErrMaxSteps  = errors.New("ode: step limit reached")
	ErrMinStep   = errors.New("ode: step size fell below the minimum")
	ErrDeadline  = errors.New("ode: wall-time limit reached")
	ErrNonFinite = errors.New("ode: non-finite state or derivative")
	ErrInput     = errors.New("ode: invalid input")
)

// Dormand–Prince RK5(4)7M coefficients (Dormand & Prince 1980; Hairer et al. 1993, Table II.5.2).
const (
	c2, c3, c4, c5 = 1.0 / 5, 3.0 / 10, 4.0 / 5, 8.0 / 9

	a21                     = 1.0 / 5
	a31, a32                = 3.0 / 40, 9.0 / 40
	a41, a42, a43           = 44.0 / 45, -56.0 / 15, 32.0 / 9
	a51, a52, a53, a54      = 19372.0 / 6561, -25360.0 / 2187, 64448.0 / 6561, -212.0 / 729
	a61, a62, a63, a64, a65 = 9017.0 / 3168, -355.0 / 33, 46732.0 / 5247, 49.0 / 176, -5103.0 / 18656

	// 5th-order weights (also row 7 of the tableau: the method is first-same-as-last).
	b1, b3, b4, b5, b6 = 35.0 / 384, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84

	// e = b − b̂ (difference of the 5th- and 4th-order weights).
	e1, e3, e4, e5, e6, e7 = 71.0 / 57600, -71.0 / 16695, 71.0 / 1920, -17253.0 / 339200, 22.0 / 525, -1.0 / 40

	// Dense output coefficients d_i of Hairer et al. (1993), §II.6, for the DOPRI5 continuous extension.
	d1, d3, d4, d5, d6, d7 = -12715105075.0 / 11282082432, 87487479700.0 / 32700410799,
		-10690763975.0 / 1880347072, 701980252875.0 / 199316789632, -1453857185.0 / 822651844,
		69997945.0 / 29380423
)

// Solver holds the work space for one system dimension, so that repeated integrations allocate nothing.
type Solver struct {
	n                          int
	k1, k2, k3, k4, k5, k6, k7 []float64
	ytmp, ynew, yerr, yold     []float64
	r1, r2, r3, r4, r5         []float64 // dense-output coefficients of the last step
	evPrev                     []float64
	tOld, hOld                 float64
}

// NewSolver returns a solver for systems of dimension n.
func NewSolver(n int) *Solver {
	mk := func() []float64 { return make([]float64, n) }
	return &Solver{n: n, k1: mk(), k2: mk(), k3: mk(), k4: mk(), k5: mk(), k6: mk(), k7: mk(),
		ytmp: mk(), ynew: mk(), yerr: mk(), yold: mk(), r1: mk(), r2: mk(), r3: mk(), r4: mk(), r5: mk()}
}

// Integrate advances y (length n, updated in place) from t0 towards tEnd under f, stopping early at the
// first event crossing (the state is then the state at the located crossing) or when Observe asks.
// tEnd may be below t0 (backward integration).
func (s *Solver) Integrate(f System, t0, tEnd float64, y []float64, events []Event, opt Options) (Result, error) {
	res := Result{T: t0, Event: -1}
	if len(y) != s.n {
		return res, fmt.Errorf("%w: state has %d components, solver %d", ErrInput, len(y), s.n)
	}
	if opt.AbsTol != nil && len(opt.AbsTol) != s.n {
		return res, fmt.Errorf("%w: %d absolute tolerances for %d components", ErrInput, len(opt.AbsTol), s.n)
	}
	span := tEnd - t0
	if !(math.Abs(span) > 0) || math.IsInf(span, 0) {
		return res, fmt.Errorf("%w: integration interval [%g, %g]", ErrInput, t0, tEnd)
	}
	dir := 1.0
	if span < 0 {
		dir = -1
	}
	rtol := def(opt.RelTol, 1e-6)
	atolAll := def(opt.AbsTolAll, 1e-9)
	hmax := def(opt.MaxStep, math.Abs(span))
	hmin := def(opt.MinStep, 1e-12*math.Abs(span))
	maxSteps := opt.MaxSteps
	if maxSteps <= 0 {
		maxSteps = 100000
	}
	evTol := def(opt.EventTol, 1e-12*math.Abs(span))
	atol := func(i int) float64 {
		if opt.AbsTol != nil {
			return opt.AbsTol[i]
		}
		return atolAll
	}
	if !allFinite(y) {
		return res, fmt.Errorf("%w: initial state", ErrNonFinite)
	}

	t := t0
	f(t, y, s.k1)
	res.Evals++
	if !allFinite(s.k1) {
		return res, fmt.Errorf("%w: derivative at t = %g", ErrNonFinite, t)
	}
	if cap(s.evPrev) < len(events) {
		s.evPrev = make([]float64, len(events))
	}
	s.evPrev = s.evPrev[:len(events)]
	for i, e := range events {
		s.evPrev[i] = e.G(t, y)
	}

	// Weighted RMS norm of v against the scale atol + rtol·max(|y|, |ynew|).
	norm := func(v, ya, yb []float64) float64 {
		var sum float64
		for i := range v {
			sc := atol(i) + rtol*math.Max(math.Abs(ya[i]), math.Abs(yb[i]))
			x := v[i] / sc
			sum += x * x
		}
		return math.Sqrt(sum / float64(len(v)))
	}

	h := opt.InitialStep
	if h <= 0 {
		// Hairer et al. (1993), §II.4, starting step: h0 = 0.01·‖y‖/‖f‖, one explicit Euler trial step
		// and a second-derivative estimate; the result is the smaller of 100·h0 and (0.01/max(d1,d2))^(1/5).
		d0 := norm(y, y, y)
		dd1 := norm(s.k1, y, y)
		h0 := 1e-6
		if d0 >= 1e-5 && dd1 >= 1e-5 {
			h0 = 0.01 * d0 / dd1
		}
		h0 = math.Min(h0, hmax)
		for i := range y {
			s.ytmp[i] = y[i] + dir*h0*s.k1[i]
		}
		f(t+dir*h0, s.ytmp, s.k2)
		res.Evals++
		for i := range y {
			s.yerr[i] = (s.k2[i] - s.k1[i]) / h0
		}
		dd2 := norm(s.yerr, y, y)
		var h1 float64
		if m := math.Max(dd1, dd2); m <= 1e-15 {
			h1 = math.Max(1e-6, h0*1e-3)
		} else {
			h1 = math.Pow(0.01/m, 1.0/5)
		}
		h = math.Min(100*h0, h1)
	}
	h = math.Min(math.Max(h, hmin), hmax)

	const (
		safety  = 0.9
		facMin  = 0.2
		facMax  = 5.0
		beta    = 0.04 // PI control (Hairer et al. 1993, §IV.2, with β = 0.04 recommended for DOPRI5)
		alphaPI = 1.0/5 - 0.75*beta
	)
	errOld := 1e-4
	rejectedLast := false
	for {
		if res.Steps+res.Rejected >= maxSteps {
			return res, fmt.Errorf("%w: %d steps at t = %g of [%g, %g]", ErrMaxSteps, maxSteps, t, t0, tEnd)
		}
		if !opt.Deadline.IsZero() && (res.Steps+res.Rejected)%32 == 0 && time.Now().After(opt.Deadline) {
			return res, fmt.Errorf("%w: stopped at t = %g of [%g, %g] after %d steps", ErrDeadline, t, t0, tEnd, res.Steps)
		}
		last := false
		if dir*(t+dir*h-tEnd) >= 0 {
			h = math.Abs(tEnd - t)
			last = true
		}
		hs := dir * h
		s.step(f, t, hs, y)
		res.Evals += 6
		errNorm := norm(s.yerr, y, s.ynew)
		if math.IsNaN(errNorm) || !allFinite(s.ynew) {
			errNorm = math.Inf(1)
		}
		if errNorm <= 1 {
			// Accept.
			copy(s.yold, y)
			s.prepareDense(hs, y)
			s.tOld, s.hOld = t, hs
			tNew := t + hs
			if last {
				tNew = tEnd
			}
			copy(y, s.ynew)
			copy(s.k1, s.k7) // FSAL
			t = tNew
			res.Steps++
			res.LastStep = h
			res.T = t
			if !allFinite(s.k1) {
				return res, fmt.Errorf("%w: derivative at t = %g", ErrNonFinite, t)
			}
			// Terminal events: the first crossing in time order among those that changed sign.
			best, bestT := -1, 0.0
			for i, e := range events {
				if e.OnCross != nil {
					continue
				}
				g := e.G(t, y)
				if crossed(s.evPrev[i], g, e.Dir) {
					te := s.locate(e, s.evPrev[i], g, evTol)
					if best < 0 || dir*(te-bestT) < 0 {
						best, bestT = i, te
					}
				}
				s.evPrev[i] = g
			}
			// Non-terminal events up to the terminal one (if any). locate and dense use s.ytmp, so the
			// state passed to OnCross is interpolated afresh into s.yerr, free once the step is accepted.
			for i, e := range events {
				if e.OnCross == nil {
					continue
				}
				g := e.G(t, y)
				if crossed(s.evPrev[i], g, e.Dir) {
					te := s.locate(e, s.evPrev[i], g, evTol)
					if best < 0 || dir*(te-bestT) <= 0 {
						s.dense(te, s.yerr)
						e.OnCross(te, s.yerr)
					}
				}
				s.evPrev[i] = g
			}
			if best >= 0 {
				// Re-take the step from the old state to the event time for a full-order state there.
				copy(y, s.yold)
				hh := bestT - s.tOld
				if hh != 0 {
					f(s.tOld, y, s.k1)
					s.step(f, s.tOld, hh, y)
					res.Evals += 7
					copy(y, s.ynew)
				}
				res.T = bestT
				res.Event = best
				if !allFinite(y) {
					return res, fmt.Errorf("%w: state at event t = %g", ErrNonFinite, bestT)
				}
				return res, nil
			}
			if opt.Observe != nil && opt.Observe(t, y) {
				res.Stopped = true
				return res, nil
			}
			if last {
				return res, nil
			}
			fac := facMax
			if errNorm > 0 {
				fac = safety * math.Pow(errNorm, -alphaPI) * math.Pow(errOld, beta)
				fac = math.Min(facMax, math.Max(facMin, fac))
			}
			if rejectedLast {
				fac = math.Min(fac, 1)
			}
			errOld = math.Max(errNorm, 1e-4)
			h = math.Min(h*fac, hmax)
			rejectedLast = false
		} else {
			res.Rejected++
			fac := facMin
			if !math.IsInf(errNorm, 1) {
				fac = math.Max(facMin, safety*math.Pow(errNorm, -1.0/5))
			}
			h *= fac
			rejectedLast = true
		}
		if h < hmin {
			return res, fmt.Errorf("%w: step %g below %g at t = %g", ErrMinStep, h, hmin, t)
		}
	}
}

// step takes one Dormand–Prince step of size h from (t, y) with s.k1 = f(t, y) already set, leaving the
// 5th-order solution in s.ynew, the error estimate in s.yerr and f(t+h, ynew) in s.k7.
func (s *Solver) step(f System, t, h float64, y []float64) {
	yt := s.ytmp
	for i := range y {
		yt[i] = y[i] + h*a21*s.k1[i]
	}
	f(t+c2*h, yt, s.k2)
	for i := range y {
		yt[i] = y[i] + h*(a31*s.k1[i]+a32*s.k2[i])
	}
	f(t+c3*h, yt, s.k3)
	for i := range y {
		yt[i] = y[i] + h*(a41*s.k1[i]+a42*s.k2[i]+a43*s.k3[i])
	}
	f(t+c4*h, yt, s.k4)
	for i := range y {
		yt[i] = y[i] + h*(a51*s.k1[i]+a52*s.k2[i]+a53*s.k3[i]+a54*s.k4[i])
	}
	f(t+c5*h, yt, s.k5)
	for i := range y {
		yt[i] = y[i] + h*(a61*s.k1[i]+a62*s.k2[i]+a63*s.k3[i]+a64*s.k4[i]+a65*s.k5[i])
	}
	f(t+h, yt, s.k6)
	for i := range y {
		s.ynew[i] = y[i] + h*(b1*s.k1[i]+b3*s.k3[i]+b4*s.k4[i]+b5*s.k5[i]+b6*s.k6[i])
	}
	f(t+h, s.ynew, s.k7)
	for i := range y {
		s.yerr[i] = h * (e1*s.k1[i] + e3*s.k3[i] + e4*s.k4[i] + e5*s.k5[i] + e6*s.k6[i] + e7*s.k7[i])
	}
}

// prepareDense stores the coefficients of the continuous extension of the step just taken from y to
// s.ynew (Hairer et al. 1993, §II.6, subroutine CONTD5):
// u(θ) = r1 + θ(r2 + (1−θ)(r3 + θ(r4 + (1−θ) r5))).
func (s *Solver) prepareDense(h float64, y []float64) {
	for i := range y {
		dy := s.ynew[i] - y[i]
		bspl := h*s.k1[i] - dy
		s.r1[i] = y[i]
		s.r2[i] = dy
		s.r3[i] = bspl
		s.r4[i] = dy - h*s.k7[i] - bspl
		s.r5[i] = h * (d1*s.k1[i] + d3*s.k3[i] + d4*s.k4[i] + d5*s.k5[i] + d6*s.k6[i] + d7*s.k7[i])
	}
}

// dense writes the interpolated state at time t of the last accepted step into out.
func (s *Solver) dense(t float64, out []float64) {
	th := (t - s.tOld) / s.hOld
	th1 := 1 - th
	for i := range out {
		out[i] = s.r1[i] + th*(s.r2[i]+th1*(s.r3[i]+th*(s.r4[i]+th1*s.r5[i])))
	}
}

// locate finds the event time in the last step by the Illinois variant of regula falsi on the dense
// output (Dowell & Jarratt, BIT 11, 1971), to within tol in time.
func (s *Solver) locate(e Event, gA, gB, tol float64) float64 {
	ta, tb := s.tOld, s.tOld+s.hOld
	if gB == 0 {
		// Cannot be later than tb; refine in case g touched zero earlier is not needed: tb is a root.
		return tb
	}
	side := 0
	for it := 0; it < 100 && math.Abs(tb-ta) > tol; it++ {
		tc := tb - gB*(tb-ta)/(gB-gA)
		if !(math.Min(ta, tb) < tc && tc < math.Max(ta, tb)) {
			tc = 0.5 * (ta + tb)
		}
		s.dense(tc, s.ytmp)
		gc := e.G(tc, s.ytmp)
		if gc == 0 {
			return tc
		}
		if (gc > 0) == (gB > 0) {
			tb, gB = tc, gc
			if side == -1 {
				gA /= 2
			}
			side = -1
		} else {
			ta, gA = tc, gc
			if side == 1 {
				gB /= 2
			}
			side = 1
		}
	}
	// Return the side past the crossing so that the event is seen as happened.
	return tb
}

// crossed reports whether an event function changed sign from a to b in the selected direction.
func crossed(a, b float64, dir int) bool {
	switch {
	case dir >= 0 && a < 0 && b >= 0:
		return true
	case dir <= 0 && a > 0 && b <= 0:
		return true
	}
	return false
}

func def(v, d float64) float64 {
	if v > 0 {
		return v
	}
	return d
}

func allFinite(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
