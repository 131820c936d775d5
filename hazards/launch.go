package hazards

import (
	"errors"
	"fmt"
	"math"
	"time"

	"gonum.org/v1/gonum/mat"

	"chargeward/hazards/ode"
)

// gravity is standard acceleration of free fall, m/s² (3rd CGPM, 1901; ISO 80000-3:2019, item 3-9.1).
const gravity = 9.80665

// ErrSimulation is returned (wrapped) when the launch simulation cannot finish within its bounds.
var ErrSimulation = errors.New("launch simulation did not finish")

// launchSetup is everything about a launch that does not change from run to run or during a run: the
// coil's filaments and circuit, the projectile's filaments and their fixed inductance matrix, and the
// coil↔filament mutual table. Runs at different bank capacitance and voltage share one setup.
type launchSetup struct {
	coil  []Filament
	rings []annulus
	n     int // projectile filaments

	lc        float64 // inductance of the coil circuit: coil + stray, H
	rc        float64 // resistance of the coil circuit at 20 °C: coil + ESR + wiring + switch, Ω
	rcClamped float64 // the same once a crowbar has clamped the bank (bank ESR out of the path), Ω
	drop      float64 // switch forward drop, V
	topology  string  // Unidirectional, AntiparallelDiode or Crowbar
	crowbarAt string  // "coil" or "bank"
	coilL     float64 // coil alone, H
	coilR     float64 // coil alone at 20 °C, Ω
	lLoop     float64 // loop outside the coil, H
	rLoop     float64 // loop outside the coil (ESR, wiring, switch), Ω
	bankR     float64 // bank ESR, Ω

	mass    float64 // moving mass, projectile plus payload, kg
	ambient float64 // starting temperature of the projectile, K
	mat     Material

	r20  []float64 // filament resistance at 20 °C, Ω
	heat []float64 // filament heat capacity, J/K
	lf   []float64 // filament inductance matrix, H (row-major n × n)
	lfi  []float64 // its inverse
	tab  *mutualTable

	tauMax float64 // slowest time constant of the circuits, s (bounds the simulated time)
}

// launchInput collects the plain values a launch setup is built from.
type launchInput struct {
	coil    *CoilModel
	loop    LoopModel
	mat     Material
	outerR  float64 // projectile outer radius, m
	innerR  float64 // projectile inner radius (ring bore), m; 0 for a disc
	thick   float64 // projectile thickness, m
	gap     float64 // coil face to projectile underside at rest, m
	mass    float64 // projectile mass, kg
	payload float64 // payload mass, kg
	nr, nz  int     // filaments radially and through the thickness
	ambient float64 // K
}

// newLaunchSetup builds the fixed parts of the model and checks that the whole inductance matrix (coil and
// projectile filaments at rest) is symmetric positive definite.
func newLaunchSetup(in launchInput) (*launchSetup, error) {
	if in.coil == nil || len(in.coil.Filaments) == 0 {
		return nil, fmt.Errorf("%w: the coil has no filaments", ErrGeometry)
	}
	for _, f := range in.coil.Filaments {
		if !(f.R > 0 && f.Z <= 0 && f.Turns > 0) || !finite(f.R, f.Z, f.Turns) {
			return nil, fmt.Errorf("%w: coil filament at r = %g m, z = %g m, %g turns", ErrGeometry, f.R, f.Z, f.Turns)
		}
	}
	lp := in.loop
	if !(lp.C > 0 && lp.L+lp.CoilL > 0 && lp.R+lp.CoilR >= 0 && lp.Drop >= 0) || !finite(lp.C, lp.L, lp.CoilL, lp.R, lp.CoilR, lp.Drop) {
		return nil, fmt.Errorf("%w: loop C %g F, L %g H, R %g Ω", ErrLoop, lp.C, lp.L+lp.CoilL, lp.R+lp.CoilR)
	}
	if !(in.gap >= 0 && in.mass > 0 && in.payload >= 0) || !finite(in.gap, in.mass, in.payload) {
		return nil, fmt.Errorf("%w: gap %g m, mass %g kg, payload %g kg", ErrGeometry, in.gap, in.mass, in.payload)
	}
	if !(in.mat.Resistivity20 > 0 && in.mat.Density > 0 && in.mat.SpecificHeat > 0) {
		return nil, fmt.Errorf("%w: projectile material %q lacks resistivity, density or specific heat", ErrGeometry, in.mat.Name)
	}
	rings, err := discretise(in.outerR, in.innerR, in.thick, in.nr, in.nz)
	if err != nil {
		return nil, err
	}
	lf, ch, err := ringInductance(rings)
	if err != nil {
		return nil, err
	}
	n := len(rings)
	var inv mat.Dense
	var sinv mat.SymDense
	if err := ch.InverseTo(&sinv); err != nil {
		return nil, fmt.Errorf("%w: projectile inductance matrix: %v", ErrGeometry, err)
	}
	inv.CloneFrom(&sinv)
	s := &launchSetup{
		coil: in.coil.Filaments, rings: rings, n: n,
		lc: lp.L + lp.CoilL, rc: lp.R + lp.CoilR, drop: lp.Drop, topology: lp.Topology,
		mass: in.mass + in.payload, ambient: in.ambient, mat: in.mat,
		r20: make([]float64, n), heat: make([]float64, n),
		lf: lf, lfi: inv.RawMatrix().Data,
		tab: newMutualTable(in.coil.Filaments, rings, in.gap),
	}
	s.coilL, s.coilR, s.lLoop, s.rLoop, s.bankR = lp.CoilL, lp.CoilR, lp.L, lp.R, lp.BankR
	s.rcClamped = s.rc - lp.BankR
	if s.topology == "" {
		s.topology = Unidirectional
	}
	s.crowbarAt = lp.CrowbarAt
	if s.crowbarAt == "" {
		s.crowbarAt = "coil"
	}
	switch {
	case s.topology != Unidirectional && s.topology != AntiparallelDiode && s.topology != Crowbar:
		return nil, fmt.Errorf("%w: switch topology %q", ErrLoop, s.topology)
	case s.topology == Crowbar && s.crowbarAt != "coil" && s.crowbarAt != "bank":
		return nil, fmt.Errorf("%w: crowbar position %q (want coil or bank)", ErrLoop, s.crowbarAt)
	case s.topology == Crowbar && s.crowbarAt == "coil" && !(lp.CoilL > 0):
		return nil, fmt.Errorf("%w: a crowbar across the coil needs the coil inductance", ErrLoop)
	case !(lp.BankR >= 0 && lp.BankR <= lp.R):
		return nil, fmt.Errorf("%w: bank ESR %g Ω outside the loop resistance %g Ω", ErrLoop, lp.BankR, lp.R)
	}
	for k, r := range rings {
		area := r.W * r.T
		s.r20[k] = in.mat.Resistivity20 * 2 * math.Pi * r.R / area
		s.heat[k] = in.mat.Density * in.mat.SpecificHeat * 2 * math.Pi * r.R * area
	}

	// Whole matrix at rest: SPD by Cholesky (the Schur complement is checked at every table node too).
	full := mat.NewSymDense(n+1, nil)
	full.SetSym(0, 0, s.lc)
	m0, d0 := make([]float64, n), make([]float64, n)
	s.tab.at(0, m0, d0)
	for i := 0; i < n; i++ {
		full.SetSym(0, i+1, m0[i])
		for j := i; j < n; j++ {
			full.SetSym(i+1, j+1, lf[i*n+j])
		}
	}
	var chf mat.Cholesky
	if !chf.Factorize(full) {
		return nil, fmt.Errorf("%w: the coil inductance %.4g H is too small for its coupling to the projectile "+
			"(inductance matrix not positive definite); check the measured coil inductance", ErrGeometry, s.lc)
	}
	if s.topology == Crowbar && s.crowbarAt == "coil" {
		// Once the crowbar diode clamps the coil, the coil circuit is the coil alone.
		full.SetSym(0, 0, s.coilL)
		if !chf.Factorize(full) {
			return nil, fmt.Errorf("%w: the coil inductance %.4g H is too small for its coupling to the projectile "+
				"(inductance matrix not positive definite); check the measured coil inductance", ErrGeometry, s.coilL)
		}
	}

	// Slowest time constants: the coil circuit's L/R or its R-L-C envelope, and the projectile's slowest
	// eddy-current mode τ = max eig(R^{-1/2} Lf R^{-1/2}) (generalised eigenproblem Lf x = τ R x).
	tau := 0.0
	if s.rc > 0 {
		tau = 2 * s.lc / s.rc
	}
	tau = math.Max(tau, math.Sqrt(s.lc*lp.C))
	sym := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			sym.SetSym(i, j, lf[i*n+j]/math.Sqrt(s.r20[i]*s.r20[j]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(sym, false) {
		return nil, fmt.Errorf("%w: eigenvalues of the projectile circuit did not converge", ErrGeometry)
	}
	vals := eig.Values(nil)
	s.tauMax = math.Max(tau, vals[len(vals)-1])
	return s, nil
}

// launchRun is the outcome of one simulated shot.
type launchRun struct {
	C, V0 float64 // bank capacitance and voltage, F and V

	Speed       float64 // m/s, projectile speed when the electromagnetic push has ended
	Rise        float64 // m, height gained while the current flowed
	TEnd        float64 // s, end of the simulated electrical transient
	TakeOff     float64 // s, first take-off; −1 if the force never exceeded the weight
	PeakForce   float64 // N, largest repulsive force on the projectile
	PeakCurrent float64 // A, largest |coil current| with the projectile present
	TimeToPeak  float64 // s
	SwitchOff   float64 // s, when the switch opened or a crowbar began to conduct; −1 if neither
	MaxRise     float64 // K, largest filament temperature rise
	MeanRise    float64 // K, heat-capacity-weighted mean temperature rise of the modelled filaments

	// Energy accounting, J.
	Stored, Bank, LoopLoss, RingLoss, Kinetic, Potential, Field, Impact float64

	Steps, Evals int

	// Sampled waveforms (only when recorded): time, coil current, bank voltage, height.
	T, I, V, H []float64
}

// circuitMode is the state of the switch and crowbar.
type circuitMode int

const (
	modeLoop      circuitMode = iota // the bank drives the coil through the whole loop
	modeOpen                         // the switch has opened (or the crowbar diode blocked): coil current zero
	modeClampBank                    // a crowbar diode across the bank conducts: coil loop without the bank
	modeClampCoil                    // a crowbar diode across the coil conducts; the bank loop finishes on its own
)

// simulator is one run's mutable state over a setup.
type simulator struct {
	s         *launchSetup
	c         float64 // bank capacitance, F
	mode      circuitMode
	bankShort bool // the bank discharges through its own ESR into a crowbar diode
	bankOpen  bool // with the coil clamped, the bank loop's switch has opened
	resting   bool // the projectile rests on its support
	m, d      []float64
	x, yf, rf []float64
	dy        []float64 // scratch derivative for event functions
}

// State vector: V_C, i_c, i_k (n), h, v, T_k (n), E_loop, i_b (bank-loop current while the coil is clamped).
func (sm *simulator) idx() (iF, iH, iV, iT, iE, iB int) {
	n := sm.s.n
	return 2, 2 + n, 3 + n, 4 + n, 4 + 2*n, 5 + 2*n
}

// coilCircuit returns the inductance and resistance of the circuit the coil current flows in now, and
// whether the bank drives it.
func (sm *simulator) coilCircuit() (l, r float64, driven bool) {
	s := sm.s
	switch sm.mode {
	case modeClampBank:
		return s.lc, s.rcClamped, false
	case modeClampCoil:
		return s.coilL, s.coilR, false
	}
	return s.lc, s.rc, true
}

// rhs is the coupled-circuit model. With flux linkages ψ = L(h) i, the circuit equations are
// d(L i)/dt = e, e_c = v_C − R_c i_c − V_d sgn i_c, e_k = −R_k(T_k) i_k, so
//
//	L di/dt = e − v (∂L/∂h) i,   C dv_C/dt = −i_c,   F = i_c Σ_k i_k ∂M_k/∂h,
//	m dv/dt = F − m g (in flight),   C_k dT_k/dt = i_k² R_k(T_k),   dE_loop/dt = R_c i_c² + V_d |i_c|
//
// (lumped coupled circuits; the force is the derivative of the co-energy ½ iᵀ L i at constant currents,
// e.g. H. A. Haus and J. R. Melcher, Electromagnetic Fields and Energy, Prentice Hall 1989, §11.3). L's
// coil row is eliminated by its Schur complement s = L_c − mᵀ L_f⁻¹ m, with L_f⁻¹ precomputed, so one call
// costs two n × n products. Crowbar phases change the coil circuit as the closed-form pulse does (RLCPulse).
func (sm *simulator) rhs(_ float64, y, dy []float64) {
	s := sm.s
	n := s.n
	iF, iH, iV, iT, iE, iB := sm.idx()
	vc, ic := y[0], y[1]
	h, v := y[iH], y[iV]
	s.tab.at(h, sm.m, sm.d)
	var flux float64 // Σ d_k i_k
	for k := 0; k < n; k++ {
		flux += sm.d[k] * y[iF+k]
	}
	force := ic * flux
	for k := 0; k < n; k++ {
		rk := s.r20[k] * (1 + s.mat.Alpha20*(y[iT+k]-293.15))
		ik := y[iF+k]
		sm.rf[k] = -rk*ik - v*sm.d[k]*ic
		dy[iT+k] = ik * ik * rk / s.heat[k]
	}
	matVec(s.lfi, sm.rf, sm.yf, n)
	dy[0], dy[iE], dy[iB] = 0, 0, 0
	if sm.mode == modeOpen {
		dy[1] = 0
		for k := 0; k < n; k++ {
			dy[iF+k] = sm.yf[k]
		}
	} else {
		lc, rc, driven := sm.coilCircuit()
		var ec float64
		switch {
		case driven:
			ec = vc - rc*ic - s.drop*sign(ic)
			dy[0] = -ic / sm.c
			dy[iE] = rc*ic*ic + s.drop*math.Abs(ic)
		case sm.mode == modeClampBank:
			ec = -rc*ic - s.drop*sign(ic)
			dy[iE] = rc*ic*ic + s.drop*math.Abs(ic)
		default: // clamped coil: ideal diode
			ec = -rc * ic
			dy[iE] = rc * ic * ic
		}
		rcoil := ec - v*flux
		matVec(s.lfi, sm.m, sm.x, n)
		var mx, my float64
		for k := 0; k < n; k++ {
			mx += sm.m[k] * sm.x[k]
			my += sm.m[k] * sm.yf[k]
		}
		ac := (rcoil - my) / (lc - mx)
		dy[1] = ac
		for k := 0; k < n; k++ {
			dy[iF+k] = sm.yf[k] - sm.x[k]*ac
		}
	}
	if sm.bankShort && s.bankR > 0 {
		dy[0] = -vc / (s.bankR * sm.c)
		dy[iE] += vc * vc / s.bankR
	}
	if sm.mode == modeClampCoil && !sm.bankOpen {
		// Bank loop on its own: C, stray L, R, drop (RLCPulse's crowbar-at-coil bank loop).
		ib := y[iB]
		if s.lLoop > 0 {
			dy[iB] = (vc - s.rLoop*ib - s.drop) / s.lLoop
		} else if s.rLoop > 0 {
			ib = math.Max(0, (vc-s.drop)/s.rLoop) // no stray inductance: R-C decay towards the drop
		} else {
			ib = 0
		}
		dy[0] = -ib / sm.c
		dy[iE] += s.rLoop*ib*ib + s.drop*ib
	}
	if sm.resting {
		dy[iH], dy[iV] = 0, 0
	} else {
		dy[iH] = v
		dy[iV] = force/s.mass - gravity
	}
}

// force returns the repulsive force on the projectile, N, in state y.
func (sm *simulator) force(y []float64) float64 {
	iF, iH, _, _, _, _ := sm.idx()
	sm.s.tab.at(y[iH], sm.m, sm.d)
	var flux float64
	for k := 0; k < sm.s.n; k++ {
		flux += sm.d[k] * y[iF+k]
	}
	return y[1] * flux
}

// fieldEnergy returns the magnetic energy ½ iᵀ L i (with the bank loop's stray energy while the coil is
// clamped), J, in state y.
func (sm *simulator) fieldEnergy(y []float64) float64 {
	s := sm.s
	n := s.n
	iF, iH, _, _, _, iB := sm.idx()
	s.tab.at(y[iH], sm.m, sm.d)
	lc, _, _ := sm.coilCircuit()
	ic := y[1]
	w := 0.5 * lc * ic * ic
	if sm.mode == modeClampCoil {
		w += 0.5 * s.lLoop * y[iB] * y[iB]
	}
	for k := 0; k < n; k++ {
		ik := y[iF+k]
		w += ic * sm.m[k] * ik
		row := s.lf[k*n : (k+1)*n]
		var sum float64
		for j := 0; j < n; j++ {
			sum += row[j] * y[iF+j]
		}
		w += 0.5 * ik * sum
	}
	return w
}

// coilDiDt returns di_c/dt in state y.
func (sm *simulator) coilDiDt(t float64, y []float64) float64 {
	sm.rhs(t, y, sm.dy)
	return sm.dy[1]
}

// launchOptions bound one run.
type launchOptions struct {
	record   bool      // keep the sampled waveforms
	deadline time.Time // wall-clock limit; zero: none
	maxSteps int       // integrator steps allowed over the whole run; default 200000
	relTol   float64   // default 1e-7
}

// doneFraction: the run ends once the energy still able to act on the projectile (field energy, and for a
// ringing loop the bank's) is below this fraction of the stored energy; what remains could add at most
// that much energy to the projectile.
const doneFraction = 1e-7

// run simulates one shot from bank capacitance c (F) and voltage v0 (V).
func (s *launchSetup) run(c, v0 float64, o launchOptions) (launchRun, error) {
	r := launchRun{C: c, V0: v0, TakeOff: -1, SwitchOff: -1}
	if !(c > 0 && v0 > 0) || !finite(c, v0) {
		return r, fmt.Errorf("%w: bank %g F at %g V", ErrLoop, c, v0)
	}
	if s.drop >= v0 {
		return r, fmt.Errorf("%w: switch drop %g V is not below the bank voltage %g V", ErrLoop, s.drop, v0)
	}
	n := s.n
	dim := 6 + 2*n
	sm := &simulator{s: s, c: c, resting: true, m: make([]float64, n), d: make([]float64, n),
		x: make([]float64, n), yf: make([]float64, n), rf: make([]float64, n), dy: make([]float64, dim)}
	iF, iH, iV, iT, iE, iB := sm.idx()
	y := make([]float64, dim)
	y[0] = v0
	for k := 0; k < n; k++ {
		y[iT+k] = s.ambient
	}
	r.Stored = 0.5 * c * v0 * v0

	// Absolute tolerances by component scale: the undamped peak V0/√(L/C) bounds every current.
	iScale := v0 / math.Sqrt(s.lc/c)
	atol := make([]float64, dim)
	atol[0] = 1e-7 * v0
	atol[1], atol[iB] = 1e-7*iScale, 1e-7*iScale
	for k := 0; k < n; k++ {
		atol[iF+k] = 1e-7 * iScale
		atol[iT+k] = 1e-7 // K
	}
	atol[iH] = 1e-9 // m
	atol[iV] = 1e-7 // m/s
	atol[iE] = 1e-7 * r.Stored

	tMax := 60 * s.tauMax
	maxSteps := o.maxSteps
	if maxSteps <= 0 {
		maxSteps = 200000
	}
	relTol := o.relTol
	if relTol <= 0 {
		relTol = 1e-7
	}
	solver := ode.NewSolver(dim)
	weight := s.mass * gravity
	record := func(t float64, y []float64) {
		if o.record {
			r.T = append(r.T, t)
			r.I = append(r.I, y[1])
			r.V = append(r.V, y[0])
			r.H = append(r.H, y[iH])
		}
	}
	record(0, y)
	observe := func(t float64, y []float64) bool {
		record(t, y)
		if f := sm.force(y); f > r.PeakForce {
			r.PeakForce = f
		}
		rest := sm.fieldEnergy(y)
		switch {
		case sm.mode == modeLoop && s.topology == AntiparallelDiode:
			rest += 0.5 * c * y[0] * y[0]
		case sm.mode == modeLoop:
			return false // the switch is still closed
		}
		return rest < doneFraction*r.Stored
	}
	// The largest |i_c| is where i_c di_c/dt falls through zero.
	peak := ode.Event{
		G:   func(t float64, y []float64) float64 { return y[1] * sm.coilDiDt(t, y) },
		Dir: -1,
		OnCross: func(t float64, y []float64) {
			if a := math.Abs(y[1]); a > r.PeakCurrent {
				r.PeakCurrent, r.TimeToPeak = a, t
			}
		},
	}

	const (
		evPeak = iota
		evTakeOff
		evLanding
		evCoilZero // coil current falls to zero: the switch (or a crowbar diode) stops conducting
		evClamp    // a crowbar diode starts to conduct
		evBankZero // with the coil clamped, the bank loop's current falls to zero
	)
	t, first := 0.0, 0.0
	landings := 0
	evs := make([]ode.Event, 0, 5)
	kinds := make([]int, 0, 5)
	for t < tMax {
		evs, kinds = append(evs[:0], peak), append(kinds[:0], evPeak)
		if sm.resting {
			evs = append(evs, ode.Event{G: func(_ float64, y []float64) float64 { return sm.force(y) - weight }, Dir: +1})
			kinds = append(kinds, evTakeOff)
		} else {
			evs = append(evs, ode.Event{G: func(_ float64, y []float64) float64 { return y[iH] }, Dir: -1})
			kinds = append(kinds, evLanding)
		}
		if sm.mode != modeOpen && (sm.mode != modeLoop || s.topology != AntiparallelDiode) {
			evs = append(evs, ode.Event{G: func(_ float64, y []float64) float64 { return y[1] }, Dir: -1})
			kinds = append(kinds, evCoilZero)
		}
		if sm.mode == modeLoop && s.topology == Crowbar {
			if s.crowbarAt == "bank" {
				evs = append(evs, ode.Event{G: func(_ float64, y []float64) float64 { return y[0] - s.bankR*y[1] }, Dir: -1})
			} else {
				// Coil terminal voltage v_C − R i − V_d − L_stray di/dt.
				evs = append(evs, ode.Event{G: func(t float64, y []float64) float64 {
					return y[0] - s.rLoop*y[1] - s.drop - s.lLoop*sm.coilDiDt(t, y)
				}, Dir: -1})
			}
			kinds = append(kinds, evClamp)
		}
		if sm.mode == modeClampCoil && !sm.bankOpen && s.lLoop > 0 {
			evs = append(evs, ode.Event{G: func(_ float64, y []float64) float64 { return y[iB] }, Dir: -1})
			kinds = append(kinds, evBankZero)
		}
		res, err := solver.Integrate(sm.rhs, t, tMax, y, evs, ode.Options{
			RelTol: relTol, AbsTol: atol, InitialStep: first, MaxSteps: maxSteps - r.Steps,
			MinStep: 1e-15 * tMax, Deadline: o.deadline, Observe: observe,
		})
		r.Steps += res.Steps + res.Rejected
		r.Evals += res.Evals
		if err != nil {
			return r, fmt.Errorf("%w: %w", ErrSimulation, err)
		}
		t, first = res.T, res.LastStep
		if res.Event < 0 {
			break // finished (observer) or reached tMax
		}
		record(t, y)
		switch kinds[res.Event] {
		case evTakeOff:
			sm.resting = false
			if r.TakeOff < 0 {
				r.TakeOff = t
			}
		case evLanding:
			landings++
			if landings > 1000 {
				return r, fmt.Errorf("%w: the projectile fell back onto the coil more than 1000 times", ErrSimulation)
			}
			r.Impact += 0.5 * s.mass * y[iV] * y[iV]
			y[iH], y[iV] = 0, 0
			sm.resting = sm.force(y) <= weight
		case evCoilZero:
			sm.mode = modeOpen
			y[1] = 0
			if r.SwitchOff < 0 {
				r.SwitchOff = t
			}
		case evClamp:
			if r.SwitchOff < 0 {
				r.SwitchOff = t
			}
			if s.crowbarAt == "bank" {
				sm.mode = modeClampBank
				sm.bankShort = true
			} else {
				// The stray inductance's current continues in the bank loop; the coil keeps its own.
				sm.mode = modeClampCoil
				y[iB] = y[1]
			}
		case evBankZero:
			sm.bankOpen = true
			y[iB] = 0
		}
	}
	r.TEnd = t
	r.Speed = y[iV]
	r.Rise = y[iH]
	r.Bank = 0.5 * c * y[0] * y[0]
	r.LoopLoss = y[iE]
	var hc float64
	for k := 0; k < n; k++ {
		dT := y[iT+k] - s.ambient
		r.RingLoss += s.heat[k] * dT
		r.MaxRise = math.Max(r.MaxRise, dT)
		r.MeanRise += s.heat[k] * dT
		hc += s.heat[k]
	}
	r.MeanRise /= hc
	r.Kinetic = 0.5 * s.mass * y[iV] * y[iV]
	r.Potential = s.mass * gravity * y[iH]
	r.Field = sm.fieldEnergy(y)
	if !finite(r.Speed, r.Rise, r.Bank, r.LoopLoss, r.RingLoss, r.Field, r.PeakCurrent, r.PeakForce, r.MaxRise) {
		return r, fmt.Errorf("%w: %w", ErrSimulation, ErrNonFinite)
	}
	return r, nil
}

// matVec writes out = A x for the row-major n × n matrix a.
func matVec(a, x, out []float64, n int) {
	for i := 0; i < n; i++ {
		row := a[i*n : (i+1)*n]
		var s float64
		for j, v := range row {
			s += v * x[j]
		}
		out[i] = s
	}
}

func sign(x float64) float64 {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// assessLaunch runs the launch simulation (DESIGN.md §4.6). PLACEHOLDER until issue 5 lands.
func assessLaunch(a *Assessment) error { return nil }
