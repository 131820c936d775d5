package ode

import (
	"errors"
	"fmt"
	"math"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestKnownSolutions integrates problems whose exact solutions are closed forms.
func TestKnownSolutions(t *testing.T) {
	tests := []struct {
		name   string
		f      System
		y0     []float64
		t0, t1 float64
		exact  func(t float64) []float64
		rtol   float64
		// tol is the allowed relative error of the end state: the local tolerance accumulates over
		// the steps roughly linearly in the number of oscillations, so a margin of 100·rtol is allowed.
		tol float64
	}{
		{
			name: "exponential decay y' = −y (closed form e^−t)",
			f:    func(t float64, y, dy []float64) { dy[0] = -y[0] },
			y0:   []float64{1},
			t0:   0, t1: 5,
			exact: func(t float64) []float64 { return []float64{math.Exp(-t)} },
			rtol:  1e-9, tol: 1e-7,
		},
		{
			name: "harmonic oscillator over ten periods (closed form cos t, −sin t)",
			f:    func(t float64, y, dy []float64) { dy[0] = y[1]; dy[1] = -y[0] },
			y0:   []float64{1, 0},
			t0:   0, t1: 20 * math.Pi,
			exact: func(t float64) []float64 { return []float64{math.Cos(t), -math.Sin(t)} },
			rtol:  1e-10, tol: 1e-7,
		},
		{
			name: "backward integration of y' = y (closed form e^t)",
			f:    func(t float64, y, dy []float64) { dy[0] = y[0] },
			y0:   []float64{math.E},
			t0:   1, t1: -2,
			exact: func(t float64) []float64 { return []float64{math.Exp(t)} },
			rtol:  1e-9, tol: 1e-7,
		},
		{
			name: "time-dependent y' = cos t · y (closed form e^{sin t})",
			f:    func(t float64, y, dy []float64) { dy[0] = math.Cos(t) * y[0] },
			y0:   []float64{1},
			t0:   0, t1: 10,
			exact: func(t float64) []float64 { return []float64{math.Exp(math.Sin(t))} },
			rtol:  1e-9, tol: 1e-7,
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			y := append([]float64(nil), tc.y0...)
			s := NewSolver(len(y))
			res, err := s.Integrate(tc.f, tc.t0, tc.t1, y, nil, Options{RelTol: tc.rtol, AbsTolAll: tc.rtol * 1e-3})
			if err != nil {
				t.Fatalf("got error %v, want none", err)
			}
			if res.T != tc.t1 {
				t.Errorf("got end time %g, want %g", res.T, tc.t1)
			}
			want := tc.exact(tc.t1)
			for i := range y {
				if !scalar.EqualWithinAbsOrRel(y[i], want[i], tc.tol, tc.tol) {
					t.Errorf("component %d: got %.12g, want %.12g", i, y[i], want[i])
				}
			}
		})
	}
}

// TestArenstorf integrates the restricted three-body Arenstorf orbit, whose solution is periodic with
// period T = 17.0652165601579625588917206249 (Hairer, Nørsett & Wanner, Solving ODEs I, 2nd ed. 1993,
// §II.0, eq. (0.1)): after one period the state returns to the initial value.
func TestArenstorf(t *testing.T) {
	const mu = 0.012277471
	const period = 17.0652165601579625588917206249
	mu1 := 1 - mu
	f := func(t float64, y, dy []float64) {
		d1 := math.Pow((y[0]+mu)*(y[0]+mu)+y[1]*y[1], 1.5)
		d2 := math.Pow((y[0]-mu1)*(y[0]-mu1)+y[1]*y[1], 1.5)
		dy[0] = y[2]
		dy[1] = y[3]
		dy[2] = y[0] + 2*y[3] - mu1*(y[0]+mu)/d1 - mu*(y[0]-mu1)/d2
		dy[3] = y[1] - 2*y[2] - mu1*y[1]/d1 - mu*y[1]/d2
	}
	y0 := []float64{0.994, 0, 0, -2.00158510637908252240537862224}
	y := append([]float64(nil), y0...)
	s := NewSolver(4)
	res, err := s.Integrate(f, 0, period, y, nil, Options{RelTol: 1e-10, AbsTolAll: 1e-12})
	if err != nil {
		t.Fatalf("got error %v, want none", err)
	}
	// Tolerance: the orbit passes close to the smaller body, where errors are amplified; Hairer et al.
	// show DOPRI5 end-point errors of about 1e-5 at tolerance 1e-10 (their Fig. II.4.2), so 1e-4 absolute.
	for i := range y {
		if !scalar.EqualWithinAbs(y[i], y0[i], 1e-4) {
			t.Errorf("component %d after one period: got %.9g, want %.9g", i, y[i], y0[i])
		}
	}
	if res.Steps < 50 || res.Steps > 5000 {
		t.Errorf("got %d steps, want between 50 and 5000 (Hairer et al. report a few hundred)", res.Steps)
	}
}

// TestTolerance checks that the global error of y' = −y falls as the tolerance is tightened
// (tolerance proportionality, Hairer et al. 1993, §II.4).
func TestTolerance(t *testing.T) {
	var prev float64 = math.Inf(1)
	for _, rtol := range []float64{1e-4, 1e-6, 1e-8, 1e-10} {
		t.Run(fmt.Sprintf("rtol %g", rtol), func(t *testing.T) {
			y := []float64{1}
			_, err := NewSolver(1).Integrate(func(t float64, y, dy []float64) { dy[0] = -y[0] }, 0, 10, y, nil,
				Options{RelTol: rtol, AbsTolAll: rtol * 1e-4})
			if err != nil {
				t.Fatalf("got error %v", err)
			}
			e := math.Abs(y[0]-math.Exp(-10)) / math.Exp(-10)
			if e >= prev {
				t.Errorf("rtol %g: got error %g, want below the error %g at the looser tolerance", rtol, e, prev)
			}
			// Bound: a global error within 100·rtol (linear accumulation over ~tens of steps).
			if e > 100*rtol {
				t.Errorf("rtol %g: got relative error %g, want ≤ %g", rtol, e, 100*rtol)
			}
			prev = e
		})
	}
}

// TestEvents locates zero crossings whose times are known in closed form.
func TestEvents(t *testing.T) {
	const g = 9.80665
	fall := func(t float64, y, dy []float64) { dy[0] = y[1]; dy[1] = -g }
	osc := func(t float64, y, dy []float64) { dy[0] = y[1]; dy[1] = -y[0] }
	tests := []struct {
		name   string
		f      System
		y0     []float64
		ev     []Event
		wantT  float64
		wantEv int
	}{
		{
			name: "free fall from 2 m hits the floor at √(2h/g)",
			f:    fall, y0: []float64{2, 0},
			ev:    []Event{{G: func(t float64, y []float64) float64 { return y[0] }, Dir: -1}},
			wantT: math.Sqrt(2 * 2 / g), wantEv: 0,
		},
		{
			name: "cos t falls through zero at π/2; rising event ignored",
			f:    osc, y0: []float64{1, 0},
			ev: []Event{
				{G: func(t float64, y []float64) float64 { return y[0] }, Dir: +1},
				{G: func(t float64, y []float64) float64 { return y[0] }, Dir: -1},
			},
			wantT: math.Pi / 2, wantEv: 1,
		},
		{
			name: "rising crossing of cos t at 3π/2",
			f:    osc, y0: []float64{1, 0},
			ev:    []Event{{G: func(t float64, y []float64) float64 { return y[0] }, Dir: +1}},
			wantT: 3 * math.Pi / 2, wantEv: 0,
		},
		{
			name: "earliest of two events wins: sin t = 0.5 at π/6 before cos t = 0",
			f:    osc, y0: []float64{1, 0},
			ev: []Event{
				{G: func(t float64, y []float64) float64 { return y[0] }, Dir: 0},
				{G: func(t float64, y []float64) float64 { return -y[1] - 0.5 }, Dir: 0},
			},
			wantT: math.Pi / 6, wantEv: 1,
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			y := append([]float64(nil), tc.y0...)
			res, err := NewSolver(len(y)).Integrate(tc.f, 0, 10, y, tc.ev, Options{RelTol: 1e-9, AbsTolAll: 1e-12})
			if err != nil {
				t.Fatalf("got error %v", err)
			}
			if res.Event != tc.wantEv {
				t.Fatalf("got event %d, want %d", res.Event, tc.wantEv)
			}
			// Tolerance: the crossing is located on the 4th-order dense output to 1e-12 s and the state
			// is recomputed by a full step; 1e-8 relative covers the integration tolerance.
			if !scalar.EqualWithinRel(res.T, tc.wantT, 1e-8) {
				t.Errorf("got event time %.12g, want %.12g", res.T, tc.wantT)
			}
			if g := tc.ev[res.Event].G(res.T, y); math.Abs(g) > 1e-7 {
				t.Errorf("got event function %g at the event, want ≈ 0", g)
			}
		})
	}
}

// TestBounds checks that every bound ends the run with its error rather than running on.
func TestBounds(t *testing.T) {
	osc := func(t float64, y, dy []float64) { dy[0] = y[1]; dy[1] = -y[0] }
	blowup := func(t float64, y, dy []float64) { dy[0] = y[0] * y[0] } // y = 1/(1 − t): singular at t = 1
	slowOsc := func(t float64, y, dy []float64) {
		for i := 0; i < 2000; i++ {
			_ = math.Sqrt(float64(i))
		}
		dy[0] = y[1]
		dy[1] = -y[0]
	}
	tests := []struct {
		name string
		f    System
		y0   []float64
		t1   float64
		opt  Options
		want error
	}{
		{"step limit", osc, []float64{1, 0}, 1e4, Options{RelTol: 1e-10, MaxSteps: 100}, ErrMaxSteps},
		{"minimum step at a singularity", blowup, []float64{1}, 2, Options{RelTol: 1e-8, MinStep: 1e-10}, ErrMinStep},
		{"deadline", slowOsc, []float64{1, 0}, 1e6, Options{RelTol: 1e-12, MaxSteps: 1 << 30, Deadline: time.Now().Add(20 * time.Millisecond)}, ErrDeadline},
		{"non-finite start", osc, []float64{math.NaN(), 0}, 1, Options{}, ErrNonFinite},
		{"empty interval", osc, []float64{1, 0}, 0, Options{}, ErrInput},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			start := time.Now()
			_, err := NewSolver(len(tc.y0)).Integrate(tc.f, 0, tc.t1, tc.y0, nil, tc.opt)
			if !errors.Is(err, tc.want) {
				t.Fatalf("got error %v, want %v", err, tc.want)
			}
			if d := time.Since(start); d > 5*time.Second {
				t.Errorf("got %v to fail, want a prompt error", d)
			}
		})
	}
}

// TestObserve checks that the observer sees every accepted step and can stop the run.
func TestObserve(t *testing.T) {
	y := []float64{1}
	var n int
	var last float64
	res, err := NewSolver(1).Integrate(func(t float64, y, dy []float64) { dy[0] = -y[0] }, 0, 10, y, nil, Options{
		Observe: func(t float64, y []float64) bool {
			n++
			if t <= last {
				panic("time did not advance")
			}
			last = t
			return t > 1
		},
	})
	if err != nil {
		t.Fatalf("got error %v", err)
	}
	if !res.Stopped || res.T <= 1 || res.T > 10 {
		t.Errorf("got stopped %v at t = %g, want stopped just after t = 1", res.Stopped, res.T)
	}
	if n != res.Steps {
		t.Errorf("got %d observer calls, want one per accepted step (%d)", n, res.Steps)
	}
}

// TestNonTerminalEvents records every extremum of cos t (zeros of its derivative −sin t) at t = kπ
// without stopping the integration.
func TestNonTerminalEvents(t *testing.T) {
	var hits []float64
	var vals []float64
	y := []float64{1, 0}
	ev := []Event{{G: func(t float64, y []float64) float64 { return y[1] }, Dir: 0,
		OnCross: func(t float64, y []float64) { hits = append(hits, t); vals = append(vals, y[0]) }}}
	res, err := NewSolver(2).Integrate(func(t float64, y, dy []float64) { dy[0] = y[1]; dy[1] = -y[0] }, 0, 10, y, ev,
		Options{RelTol: 1e-10, AbsTolAll: 1e-12})
	if err != nil {
		t.Fatalf("got error %v", err)
	}
	if res.T != 10 || res.Event != -1 {
		t.Errorf("got end %g, event %d, want 10, −1", res.T, res.Event)
	}
	if len(hits) != 3 {
		t.Fatalf("got %d extrema %v, want 3 (π, 2π, 3π)", len(hits), hits)
	}
	for k, h := range hits {
		want := float64(k+1) * math.Pi
		// Tolerance: located on the order-4 dense output at tolerance 1e-10; 1e-8 relative.
		if !scalar.EqualWithinRel(h, want, 1e-8) {
			t.Errorf("extremum %d: got t = %.12g, want %.12g", k, h, want)
		}
		if wantV := math.Cos(want); !scalar.EqualWithinAbs(vals[k], wantV, 1e-8) {
			t.Errorf("extremum %d: got y = %.12g, want %.12g", k, vals[k], wantV)
		}
	}
}
