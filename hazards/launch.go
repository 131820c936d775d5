package hazards

import (
	"errors"
	"fmt"
	"math"
	"time"

	"gonum.org/v1/gonum/mat"

	"chargeward/hazards/em"
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

	Speed       float64 // m/s, upward projectile speed when the electromagnetic push has ended (0 if not rising)
	VEnd        float64 // m/s, vertical velocity then (negative when falling back)
	Rise        float64 // m, height above the start then
	MaxH        float64 // m, greatest height above the start during the push
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
	Phases       int // integrations started (one per event that changed the model)

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
	s        *launchSetup
	c        float64 // bank capacitance, F
	mode     circuitMode
	bankOpen bool // with the coil clamped, the bank loop's switch has opened
	// lobe is the direction of the current lobe in progress (+1 forward through the switch, −1 back
	// through an antiparallel diode): the forward drop opposes it. Holding it fixed within a lobe keeps the
	// model smooth; each current zero is an event that decides the next lobe.
	lobe      float64
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
			ec = vc - rc*ic - s.drop*sm.lobe
			dy[0] = -ic / sm.c
			dy[iE] = rc*ic*ic + s.drop*sm.lobe*ic
		case sm.mode == modeClampBank:
			ec = -rc*ic - s.drop*sm.lobe
			dy[iE] = rc*ic*ic + s.drop*sm.lobe*ic
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

// canRestart reports whether, at a current zero (y[1] = 0), the loop can drive current again against the
// forward drop, and in which direction: the rate of rise a0 computed without the drop must keep its sign
// when the drop opposes a current of that sign. If not, both the switch and the antiparallel diode block
// and the ringing ends with the bank holding what is left.
func (sm *simulator) canRestart(t float64, y []float64) (bool, float64) {
	lobe := sm.lobe
	defer func() { sm.lobe = lobe }()
	sm.lobe = 0
	a0 := sm.coilDiDt(t, y)
	if a0 == 0 {
		return false, 0
	}
	sg := math.Copysign(1, a0)
	sm.lobe = sg
	a := sm.coilDiDt(t, y)
	return a != 0 && math.Signbit(a) == math.Signbit(a0), sg
}

// coilDiDt returns di_c/dt in state y.
func (sm *simulator) coilDiDt(t float64, y []float64) float64 {
	sm.rhs(t, y, sm.dy)
	return sm.dy[1]
}

// ringTail lets the projectile's filament currents decay on their own in closed form and adds the heat to
// each filament: with the coil open, L_f di/dt = −R i, so with u = R^{1/2} i and S = R^{-1/2} L_f R^{-1/2}
// = Q Λ Qᵀ (Λ the modal time constants), u(t) = Q e^{−t/Λ} Qᵀ u0 and the heat in filament k is
//
//	∫ R_k i_k² dt = Σ_ab Q_ka Q_kb c_a c_b τ_a τ_b/(τ_a + τ_b),  c = Qᵀ u0,
//
// which sums to the field energy ½ i0ᵀ L_f i0 (modal decomposition of a linear R-L network; resistances
// held at their present temperatures, the tail's own heating being a small part of the shot's).
func (sm *simulator) ringTail(y []float64) error {
	s := sm.s
	n := s.n
	iF, _, _, iT, _, _ := sm.idx()
	rs := make([]float64, n)
	for k := 0; k < n; k++ {
		rs[k] = math.Sqrt(s.r20[k] * (1 + s.mat.Alpha20*(y[iT+k]-293.15)))
	}
	sym := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			sym.SetSym(i, j, s.lf[i*n+j]/(rs[i]*rs[j]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(sym, true) {
		return fmt.Errorf("%w: the projectile's decay modes did not converge", ErrSimulation)
	}
	tau := eig.Values(nil)
	var q mat.Dense
	eig.VectorsTo(&q)
	c := make([]float64, n)
	for a := 0; a < n; a++ {
		var sum float64
		for k := 0; k < n; k++ {
			sum += q.At(k, a) * rs[k] * y[iF+k]
		}
		c[a] = sum
	}
	for k := 0; k < n; k++ {
		var heat float64
		for a := 0; a < n; a++ {
			qa := q.At(k, a) * c[a]
			for b := 0; b < n; b++ {
				heat += qa * q.At(k, b) * c[b] * tau[a] * tau[b] / (tau[a] + tau[b])
			}
		}
		y[iT+k] += heat / s.heat[k]
		y[iF+k] = 0
	}
	return nil
}

// kineticFraction: a ringing or crowbarred run also ends once the energy still able to act on the
// projectile is below this fraction of its kinetic energy.
const kineticFraction = 1e-3

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
	sm := &simulator{s: s, c: c, resting: true, lobe: 1, m: make([]float64, n), d: make([]float64, n),
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
		r.MaxH = math.Max(r.MaxH, y[iH])
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
		// The remaining energy can add at most itself to the kinetic energy: below 1e-3 of it the speed
		// can change by no more than 5e-4 relative.
		ke := 0.5 * s.mass * y[iV] * y[iV]
		return rest < doneFraction*r.Stored || rest < kineticFraction*ke
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
		evRingZero // a current zero of the ringing (antiparallel-diode) loop
	)
	t, first := 0.0, 0.0
	landings := 0
	pushOver := false
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
		if sm.mode == modeLoop && s.topology == AntiparallelDiode {
			// Every current zero of the ringing loop: it rings on only if the bank can drive the current
			// the other way through the switch or diode drop.
			evs = append(evs, ode.Event{G: func(_ float64, y []float64) float64 { return y[1] }, Dir: 0})
			kinds = append(kinds, evRingZero)
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
		r.Phases++
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
			pushOver = true
		case evClamp:
			if r.SwitchOff < 0 {
				r.SwitchOff = t
			}
			if s.crowbarAt == "bank" {
				// The bank, now behind the diode, discharges through its own ESR with τ = ESR·C (about a
				// microsecond: too stiff to integrate for nothing). What it holds at the clamp, ½ C v² with
				// v = ESR·i, is counted as ESR loss at once.
				sm.mode = modeClampBank
				y[iE] += 0.5 * c * y[0] * y[0]
				y[0] = 0
			} else {
				// The stray inductance's current continues in the bank loop; the coil keeps its own.
				sm.mode = modeClampCoil
				y[iB] = y[1]
			}
		case evRingZero:
			y[1] = 0
			ok, sg := sm.canRestart(t, y)
			sm.lobe = sg
			if !ok {
				sm.mode = modeOpen
				if r.SwitchOff < 0 {
					r.SwitchOff = t
				}
				pushOver = true
			}
		case evBankZero:
			sm.bankOpen = true
			y[iB] = 0
		}
		if pushOver {
			// With no coil current there is no force (F = i_c Σ i_k ∂M_k/∂h): the flight is ballistic
			// from here and the projectile's currents decay on their own, which ringTail settles at once.
			if err := sm.ringTail(y); err != nil {
				return r, err
			}
			break
		}
	}
	r.TEnd = t
	r.VEnd = y[iV]
	r.Speed = math.Max(y[iV], 0)
	r.MaxH = math.Max(r.MaxH, y[iH])
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

// Filament-count defaults and bounds (see chooseFilaments).
const (
	defaultRadialDisc      = 16 // annuli across a solid disc
	defaultRadialRing      = 2  // fewest annuli across a ring's width
	maxRadial              = 48
	maxLayers              = 4
	maxProjectileFilaments = 64
)

// chooseFilaments returns the radial and axial division of a projectile of radial width w and thickness
// thick (m) for skin depth delta (m): for a disc at least 16 annuli and one per skin depth; for a ring
// near-square elements and at least one annulus per skin depth; layers no thicker than half a skin depth
// through the thickness (the current crowds into the face next
// to the coil within about one skin depth, δ = √(ρ/(π f μ0)); e.g. Jackson, Classical Electrodynamics,
// 3rd ed., §5.18). requested (the rig's projectile.filaments) overrides the radial count.
func chooseFilaments(w, thick, delta float64, ring bool, requested int) (nr, nz int) {
	nr = defaultRadialDisc
	nz = 1
	if delta > 0 {
		nz = min(max(int(math.Ceil(2*thick/delta)), 1), maxLayers)
		nr = max(nr, int(math.Ceil(w/delta)))
	}
	if ring {
		// A ring's section is divided into near-square elements: slivers add stiff eddy modes (time
		// constant ∝ μ0 σ × the element's smaller side²) without adding accuracy.
		nr = max(defaultRadialRing, int(math.Round(w/(thick/float64(nz)))))
		if delta > 0 {
			nr = max(nr, int(math.Ceil(w/delta)))
		}
	}
	if requested > 0 {
		nr = requested
	}
	nr = min(max(nr, 2), maxRadial)
	nz = min(max(nz, 1), maxLayers)
	for nr*nz > maxProjectileFilaments && nr > 2 {
		nr--
	}
	return nr, nz
}

// skinDepth returns δ = √(ρ/(π f μ0)), m, for resistivity rho (Ω·m) at frequency f (Hz), non-magnetic
// conductor (Jackson, Classical Electrodynamics, 3rd ed., eq. 5.165).
func skinDepth(rho, f float64) float64 { return math.Sqrt(rho / (math.Pi * f * em.Mu0)) }

// defaultSimulationTimeout is the wall time allowed for the launch simulation when Targets.SimulationTimeout
// is zero. The demo rig needs about 15 ms per run. The step limit (200 000 steps) is the bound that decides
// whether a rig can be simulated, and it does not depend on the machine; the wall time is only a backstop
// against a stalled machine, set well above what the step limit can take (about 10 s on a loaded 2-core
// machine), so that the same rig gets the same answer whatever else the machine is doing.
const defaultSimulationTimeout = 60 * time.Second

// convectionCoefficient is the heat-transfer coefficient assumed for the projectile's cool-down, W/(m²·K):
// natural convection in still air is about 5–25 W/(m²·K) (common practice; e.g. Incropera & DeWitt,
// Fundamentals of Heat and Mass Transfer, Table 1.1, from memory); the low end is taken so that the
// cool-down is not understated. Radiation from bare aluminium or copper (ε ≈ 0.05) is neglected.
const convectionCoefficient = 10

// cooldownFraction: the cool-down time is the time for a shot's temperature rise to fall to this fraction,
// so that shots repeated at that interval settle at most 1/(1 − 0.1) ≈ 1.11 times a single shot's rise.
const cooldownFraction = 0.1

// projectileSpec is the projectile as the launch model reads it from the rig.
type projectileSpec struct {
	kind              string
	mat               Material
	outerR, innerR    float64 // m
	thick             float64 // m
	mass, payload     float64 // kg
	gap               float64 // m
	requested         int
	massStated        bool
	specificHeatKnown bool
}

// readProjectile collects the projectile from the rig, recording a Gap for everything the simulation
// needs and the rig does not state. ok is false when the launch cannot be simulated.
func readProjectile(a *Assessment) (projectileSpec, bool) {
	p := a.Rig.Projectile
	var ps projectileSpec
	ok := true
	ps.kind = p.Kind
	if ps.kind == "" {
		ps.kind = "disc"
		if p.InnerDiameter != nil && *p.InnerDiameter > 0 {
			ps.kind = "ring"
		}
	}
	ps.specificHeatKnown = true
	switch m, found := MaterialByName(p.Material); {
	case p.Material == "steel":
		a.AddGap("projectile.material", "a steel projectile is ferromagnetic: it is pulled by the coil's field as well as pushed by eddy currents, which the eddy-current launch model does not describe; speed, height and heating are not computed")
		return ps, false
	case found:
		ps.mat = m
	case p.Resistivity != nil && *p.Resistivity > 0 && p.Density != nil && *p.Density > 0:
		// Unknown alloy with stated resistivity and density: no temperature coefficient (resistance held at
		// its 20 °C value, which overstates the currents and the speed) and no specific heat.
		ps.mat = Material{Name: p.Material, Alpha20: 0, SpecificHeat: 900, Basis: "resistivity and density as stated in the rig; temperature coefficient taken as zero"}
		ps.specificHeatKnown = false
		a.AddGap("projectile.material", "the projectile's material is not in the materials table: its resistance is held at the stated 20 °C value and its temperature rise is not reported")
	default:
		a.AddGap("projectile.material", "the projectile's material (or its resistivity and density) is not stated, so the launch cannot be simulated")
		ok = false
	}
	if p.Resistivity != nil && *p.Resistivity > 0 {
		ps.mat.Resistivity20 = *p.Resistivity
		ps.mat.ResistivitySpread = 0 // a stated (measured) resistivity replaces the table's spread
		ps.mat.Basis = "resistivity as stated in the rig; " + ps.mat.Basis
	}
	if p.Density != nil && *p.Density > 0 {
		ps.mat.Density = *p.Density
	}
	if p.OuterDiameter != nil && *p.OuterDiameter > 0 {
		ps.outerR = *p.OuterDiameter / 2
	} else {
		a.AddGap("projectile.outer_diameter", "the projectile's diameter is not stated, so the launch cannot be simulated")
		ok = false
	}
	if p.Thickness != nil && *p.Thickness > 0 {
		ps.thick = *p.Thickness
	} else {
		a.AddGap("projectile.thickness", "the projectile's thickness is not stated, so the launch cannot be simulated")
		ok = false
	}
	switch {
	case p.InnerDiameter != nil && *p.InnerDiameter > 0:
		ps.innerR = *p.InnerDiameter / 2
		if ps.outerR > 0 && ps.innerR >= ps.outerR {
			a.AddGap("projectile.inner_diameter", "the ring's bore is not smaller than its outside diameter, so the launch cannot be simulated")
			ok = false
		}
	case ps.kind == "ring":
		a.AddGap("projectile.inner_diameter", "the ring's bore is not stated, so the launch cannot be simulated")
		ok = false
	}
	if p.Gap != nil && *p.Gap >= 0 {
		ps.gap = *p.Gap
	} else {
		a.AddGap("projectile.gap", "the projectile's starting gap is not stated: the launch is computed for the projectile lying directly on the coil face, the worst case")
	}
	if p.Payload != nil && *p.Payload > 0 {
		ps.payload = *p.Payload
	}
	if p.Filaments != nil && *p.Filaments > 0 {
		ps.requested = *p.Filaments
	}
	if !ok {
		return ps, false
	}
	if p.Mass != nil && *p.Mass > 0 {
		ps.mass, ps.massStated = *p.Mass, true
	} else {
		ps.mass = ps.mat.Density * math.Pi * (ps.outerR*ps.outerR - ps.innerR*ps.innerR) * ps.thick
	}
	return ps, true
}

// launchKinds are the rig kinds that throw a projectile: a missing projectile section is a gap for them.
var launchKinds = map[string]bool{"disc-thrower": true, "ring-jumper": true, "coil-accelerator": true}

// division is how the projectile was divided, and why.
type division struct {
	nr, nz      int
	freq, delta float64 // pulse frequency (Hz) and skin depth (m) the division is based on
}

// setupFor builds the launch setup of an assessment's rig: the pulse frequency (a quarter period to the
// coil-only peak of RLCPulse, or the undamped resonance), the skin depth there, the filament division and
// the fixed matrices.
func setupFor(a *Assessment, ps projectileSpec, loop LoopModel, ambient float64) (*launchSetup, division, error) {
	freq := 1 / (2 * math.Pi * math.Sqrt((loop.L+loop.CoilL)*loop.C))
	if pr, err := RLCPulse(loop); err == nil && pr.TimeToPeak > 0 {
		freq = 1 / (4 * pr.TimeToPeak)
	}
	delta := skinDepth(ps.mat.Resistivity20, freq)
	nr, nz := chooseFilaments(ps.outerR-ps.innerR, ps.thick, delta, ps.innerR > 0, ps.requested)
	setup, err := newLaunchSetup(launchInput{coil: a.m.coil, loop: loop, mat: ps.mat, outerR: ps.outerR, innerR: ps.innerR,
		thick: ps.thick, gap: ps.gap, mass: ps.mass, payload: ps.payload, nr: nr, nz: nz, ambient: ambient})
	return setup, division{nr: nr, nz: nz, freq: freq, delta: delta}, err
}

// assessLaunch runs the launch simulation (DESIGN.md §4.6) at the nominal and the worst bank (+C tolerance,
// worst charge voltage) and adds the launch, flight, heating and exclusion quantities.
func assessLaunch(a *Assessment) error {
	r := a.Rig
	if r.Projectile == nil {
		if launchKinds[r.Rig.Kind] {
			a.AddGap("projectile", "the rig throws a projectile but describes none, so its speed, height and heating cannot be computed")
		}
		return nil
	}
	ps, ok := readProjectile(a)
	if ps.requested > maxRadial {
		// chooseFilaments would cap the request silently: the review would not be the one asked for.
		return fmt.Errorf("%w: projectile.filaments requests %d annuli; the model divides a projectile into at most %d", ErrGeometry, ps.requested, maxRadial)
	}
	if a.m.coil == nil {
		a.AddGap("coil", "the coil is not computable, so the launch cannot be simulated")
		ok = false
	} else if len(a.m.coil.Filaments) == 0 {
		// A measured coil (inductance and resistance only) has no winding to couple to the projectile.
		a.AddGap("coil.turns", "the coil is given by its measured inductance and resistance only: without its turns and dimensions the launch cannot be simulated")
		ok = false
	}
	if a.m.loop == nil {
		a.AddGap("switch", "the discharge loop is not computable, so the launch cannot be simulated")
		ok = false
	}
	if !ok {
		return nil
	}
	loop := *a.m.loop
	ambient := a.Targets.ReferenceAmbient
	if r.Coil != nil && r.Coil.Ambient != nil && *r.Coil.Ambient > 0 {
		ambient = *r.Coil.Ambient
	}
	if !(ambient > 0) {
		ambient = 293.15
	}

	setup, div, err := setupFor(a, ps, loop, ambient)
	if err != nil {
		return err
	}
	// A projectile much wider than the coil, divided into a bounded number of annuli, has annuli too wide
	// to carry the eddy currents under the coil: the force falls away with their width (20 turns, 100 mm
	// spiral, 3 mm aluminium disc, 32 annuli: peak force 7.34 kN at 0.5 m diameter, 7.31 kN at 1 m,
	// 6.95 kN at 1.5 m, 5.75 kN at 2 m, 89 N at 3 m). Annuli no wider than half the coil's outer radius
	// kept it within 5 % there (1.5 m); wider, the model refuses rather than understate the force.
	var coilR float64
	for _, f := range a.m.coil.Filaments {
		coilR = math.Max(coilR, f.R)
	}
	if w := (ps.outerR - ps.innerR) / float64(div.nr); coilR > 0 && w > coilR/2 {
		return fmt.Errorf("%w: the projectile (projectile.outer_diameter %.4g m) is too wide for the model: its %d annuli are %.3g mm wide, more than half the coil's outer radius (%.3g mm)",
			ErrGeometry, 2*ps.outerR, div.nr, w*1e3, coilR*1e3)
	}
	timeout := defaultSimulationTimeout
	if a.Targets.SimulationTimeout > 0 {
		timeout = time.Duration(a.Targets.SimulationTimeout * float64(time.Second))
	}
	opt := launchOptions{record: true, deadline: time.Now().Add(timeout)}
	nom, err := setup.run(loop.C, loop.V0, opt)
	if err != nil {
		return fmt.Errorf("%w (allowed %v of wall time and %d steps; the rig may need a coarser projectile division)", err, timeout, 200000)
	}
	worst := nom
	hasWorst := false
	// The worst case is the worse of the two shots for each quantity: the speed need not grow with the
	// capacitance (a longer pulse can push a light projectile less efficiently).
	if b := a.m.bank; b != nil && b.CWorst > 0 && b.VWorst > 0 && (b.CWorst != loop.C || b.VWorst != loop.V0) {
		opt.record = false
		w, err := setup.run(b.CWorst, b.VWorst, opt)
		if err != nil {
			return fmt.Errorf("%w (worst-case bank; allowed %v of wall time)", err, timeout)
		}
		worst, hasWorst = worseRun(nom, w), true
	}
	// A material whose resistivity spreads between lots or tempers (6061: about ±10 % with temper) is also
	// shot at the low end of that spread, which carries the larger eddy currents, with the worst bank.
	lowRho := false
	if sp := ps.mat.ResistivitySpread; sp > 0 && sp < 1 {
		low := ps
		low.mat.Resistivity20 *= 1 - sp
		lowSetup, _, err := setupFor(a, low, loop, ambient)
		if err != nil {
			return err
		}
		c, v := loop.C, loop.V0
		if b := a.m.bank; b != nil && b.CWorst > 0 && b.VWorst > 0 {
			c, v = b.CWorst, b.VWorst
		}
		opt.record = false
		w, err := lowSetup.run(c, v, opt)
		if err != nil {
			return fmt.Errorf("%w (worst-case bank at the low end of the projectile's resistivity; allowed %v of wall time)", err, timeout)
		}
		worst, hasWorst, lowRho = worseRun(worst, w), true, true
	}
	return addLaunchQuantities(a, setup, ps, div, nom, worst, hasWorst, lowRho)
}

// worseRun returns, quantity by quantity, the worse of two shots: the faster flight (speed, rise, timing),
// the larger force, current and heating.
func worseRun(a, b launchRun) launchRun {
	w := b
	if a.Speed > b.Speed || (a.Speed == b.Speed && a.MaxH > b.MaxH) {
		w.Speed, w.VEnd, w.Rise, w.MaxH, w.TEnd = a.Speed, a.VEnd, a.Rise, a.MaxH, a.TEnd
	}
	w.PeakForce = math.Max(a.PeakForce, b.PeakForce)
	w.PeakCurrent = math.Max(a.PeakCurrent, b.PeakCurrent)
	w.MaxRise = math.Max(a.MaxRise, b.MaxRise)
	return w
}

// flight is the no-drag ballistic flight after the electromagnetic push.
type flight struct {
	apex          float64 // m above the start
	reaches       bool    // the projectile's top reaches the ceiling
	clearance     float64 // m from the projectile's top at rest to the ceiling
	timeToCeiling float64 // s from firing
	impactSpeed   float64 // m/s at the ceiling
}

// ballistic returns the flight of a projectile leaving height rise (m) at speed v (m/s) at time t0 (s),
// under gravity alone, against a ceiling clearance (m; ≤ 0 when unknown):
// apex = rise + v²/2g; it reaches the ceiling if apex ≥ clearance, at t0 + (v − √(v² − 2g(D − rise)))/g
// with speed √(v² − 2g(D − rise)) (uniformly accelerated motion).
func ballistic(rise, v, t0, clearance float64) flight {
	f := flight{apex: rise + math.Max(v, 0)*math.Max(v, 0)/(2*gravity), clearance: clearance}
	if clearance > 0 && v > 0 && f.apex >= clearance {
		f.reaches = true
		disc := math.Max(v*v-2*gravity*(clearance-rise), 0)
		f.impactSpeed = math.Sqrt(disc)
		f.timeToCeiling = t0 + (v-f.impactSpeed)/gravity
	}
	return f
}

// tiltedRange returns the horizontal distance, m, at which a projectile launched at speed v (m/s), tilted
// by theta (rad) from the vertical, comes back to its launch level: v² sin 2θ / g with no ceiling (uniformly
// accelerated motion); with a ceiling at clearance D that it reaches, it keeps its horizontal speed
// v sin θ while it rises to the ceiling and then falls from rest there (vertical speed lost at the ceiling,
// the longest fall), which is conservative.
func tiltedRange(v, theta, clearance float64) float64 {
	vx, vz := v*math.Sin(theta), v*math.Cos(theta)
	if clearance > 0 && vz*vz/(2*gravity) >= clearance {
		up := (vz - math.Sqrt(vz*vz-2*gravity*clearance)) / gravity
		return vx * (up + math.Sqrt(2*clearance/gravity))
	}
	return v * v * math.Sin(2*theta) / gravity
}

// addLaunchQuantities turns the runs into quantities and curves.
func addLaunchQuantities(a *Assessment, s *launchSetup, ps projectileSpec, div division, nom, worst launchRun, hasWorst, lowRho bool) error {
	r := a.Rig
	m := s.mass
	w := func(v float64) *float64 {
		if hasWorst {
			return Worst(v)
		}
		return nil
	}
	basis := "coupled-circuit current-filament model (coil turns and projectile annuli as coaxial circuits; Maxwell's mutual inductance, " +
		"Treatise §701; self-inductance by the GMD method, Grover 1946 ch. 13) integrated by Dormand–Prince 5(4) (Hairer, Nørsett & Wanner 1993 §II.4); " +
		"checked by energy balance and by its distant-projectile limit, the closed-form R-L-C pulse"
	model := fmt.Sprintf("%d × %d projectile filaments (skin depth %.3g mm at %.4g Hz); coil↔filament mutuals tabulated (cubic Hermite, error < 1e-6); %d integrator steps; "+
		"coil and loop resistance held at 20 °C (the coldest conductors give the largest currents); the projectile's resistance rises with its temperature",
		div.nr, div.nz, div.delta*1e3, div.freq, nom.Steps)
	worstNote := "worst case at +C tolerance and the worst charge voltage"
	if lowRho {
		worstNote += fmt.Sprintf(", and the projectile's resistivity at the low end of its %.0f %% spread", 100*ps.mat.ResistivitySpread)
	}
	if !hasWorst {
		worstNote = "no worst-case bank stated"
	}
	inRun := []Input{
		{"C", "bank.capacitance", nom.C, "F"}, {"V0", "bank.voltage", nom.V0, "V"},
		{"m", "projectile.mass", m, "kg"}, {"gap", "projectile.gap", ps.gap, "m"},
		{"ρ20", "projectile.resistivity", ps.mat.Resistivity20, "Ω·m"},
	}
	massNote := "mass from the geometry and the material's density"
	if ps.massStated {
		massNote = "mass as stated"
	}
	if ps.payload > 0 {
		massNote += fmt.Sprintf(", plus a %.3g kg payload", ps.payload)
	}
	speedW := worst.Speed
	qs := []Quantity{
		{Name: "launch.speed", Value: nom.Speed, Worst: w(speedW), Unit: "m/s",
			Formula: "v at the end of the push: m dv/dt = i_c Σ_k i_k ∂M_k/∂h − m g, with L(h) di/dt = e − v (∂L/∂h) i",
			Inputs:  inRun, Basis: basis, Note: joinLaunchNotes(model, massNote, "no air drag", worstNote)},
		{Name: "launch.kinetic_energy", Value: 0.5 * m * nom.Speed * nom.Speed, Worst: w(0.5 * m * speedW * speedW), Unit: "J",
			Formula: "E = ½ m v²", Inputs: []Input{{"m", "projectile.mass", m, "kg"}, {"v", "launch.speed", nom.Speed, "m/s"}},
			Basis: "kinetic energy of a rigid body in translation", Note: joinLaunchNotes(massNote, worstNote)},
		{Name: "launch.momentum", Value: m * nom.Speed, Worst: w(m * speedW), Unit: "kg·m/s",
			Formula: "p = m v", Inputs: []Input{{"m", "projectile.mass", m, "kg"}, {"v", "launch.speed", nom.Speed, "m/s"}},
			Basis: "momentum of a rigid body in translation", Note: joinLaunchNotes(massNote, worstNote)},
		{Name: "launch.peak_force", Value: nom.PeakForce, Worst: w(worst.PeakForce), Unit: "N",
			Formula: "F = max i_c Σ_k i_k ∂M_k/∂h", Inputs: inRun, Basis: basis, Note: worstNote},
		{Name: "launch.peak_acceleration", Value: nom.PeakForce / m, Worst: w(worst.PeakForce / m), Unit: "m/s²",
			Formula: "a = F_max / m", Inputs: []Input{{"F", "launch.peak_force", nom.PeakForce, "N"}, {"m", "projectile.mass", m, "kg"}},
			Basis: "Newton's second law", Note: joinLaunchNotes(fmt.Sprintf("%.3g g_n", nom.PeakForce/m/gravity), worstNote)},
		{Name: "launch.peak_current_with_projectile", Value: nom.PeakCurrent, Worst: w(worst.PeakCurrent), Unit: "A",
			Formula: "max |i_c(t)| with the projectile's filaments coupled", Inputs: inRun, Basis: basis,
			Note: joinLaunchNotes(fmt.Sprintf("at %.4g ms", nom.TimeToPeak*1e3), worstNote)},
		{Name: "launch.efficiency", Value: nom.Kinetic / nom.Stored, Unit: "1",
			Formula: "η = ½ m v² / ½ C V0²", Inputs: []Input{{"E", "launch.kinetic_energy", nom.Kinetic, "J"}, {"W", "bank.energy", nom.Stored, "J"}},
			Basis: "definition", Note: fmt.Sprintf("energy balance: %.3g J left in the bank, %.3g J lost in the loop, %.3g J heating the projectile, %.3g J still in the fields",
				nom.Bank, nom.LoopLoss, nom.RingLoss, nom.Field)},
	}
	if ps.specificHeatKnown {
		qs = append(qs, Quantity{Name: "projectile.temperature_rise", Value: nom.MaxRise, Worst: w(worst.MaxRise), Unit: "K",
			Formula: "ΔT = max_k ∫ i_k² R_k(T_k) dt / (ρ_m c V_k), R_k = ρ20 [1 + α20 (T_k − 20 °C)] 2π r_k / A_k",
			Inputs:  []Input{{"ρ20", "projectile.resistivity", ps.mat.Resistivity20, "Ω·m"}, {"α20", "projectile.material", ps.mat.Alpha20, "1/K"}, {"c", "projectile.material", ps.mat.SpecificHeat, "J/(kg·K)"}},
			Basis:   basis + "; material: " + ps.mat.Basis,
			Note: joinLaunchNotes(fmt.Sprintf("hottest filament, adiabatic during the pulse; the mean rise of the conductor is %.3g K", nom.MeanRise),
				"the hottest filament's rise grows somewhat with finer division (current crowding at the rim and the face near the coil)", worstNote)})
		area := 2*math.Pi*(ps.outerR*ps.outerR-ps.innerR*ps.innerR) + 2*math.Pi*(ps.outerR+ps.innerR)*ps.thick
		cond := ps.mat.Density * math.Pi * (ps.outerR*ps.outerR - ps.innerR*ps.innerR) * ps.thick
		tau := cond * ps.mat.SpecificHeat / (convectionCoefficient * area)
		qs = append(qs, Quantity{Name: "projectile.cooldown", Value: tau * math.Log(1/cooldownFraction), Unit: "s",
			Formula: "t = τ ln(1/0.1), τ = m c / (h A) (lumped body, Newton cooling)",
			Inputs: []Input{{"m", "projectile.mass", cond, "kg"}, {"c", "projectile.material", ps.mat.SpecificHeat, "J/(kg·K)"},
				{"h", "natural convection", convectionCoefficient, "W/(m²·K)"}, {"A", "projectile surface", area, "m²"}},
			Basis: "Newton's law of cooling for a lumped body (Biot number ≪ 1 for a thin metal part); h for still air is common practice",
			Note:  "time for a shot's temperature rise to fall to 10 %, so that repeated shots settle within 1.11 × one shot's rise; still air, no radiation, the payload not counted"})
	}

	// Flight: height against the ceiling, time to reach it.
	clearance := 0.0
	if r.Room != nil && r.Room.CeilingHeight != nil && *r.Room.CeilingHeight > 0 {
		clearance = *r.Room.CeilingHeight - ps.gap - ps.thick
	} else {
		a.AddGap("room.ceiling_height", "the ceiling height is not stated, so whether and how fast the projectile strikes the ceiling cannot be computed")
	}
	fn := ballistic(nom.Rise, nom.Speed, nom.TEnd, clearance)
	fw := ballistic(worst.Rise, worst.Speed, worst.TEnd, clearance)
	fn.apex, fw.apex = math.Max(fn.apex, nom.MaxH), math.Max(fw.apex, worst.MaxH)
	hNote := "no-drag bound (drag only lowers it)"
	if r.Room != nil && r.Room.LaunchAxis != "" && r.Room.LaunchAxis != "vertical" {
		hNote += "; computed as for a vertical launch, the highest a throw at this speed can go"
	}
	if clearance > 0 {
		if fn.reaches {
			hNote += fmt.Sprintf("; it exceeds the %.3g m clearance to the ceiling, which the projectile strikes", clearance)
		} else {
			hNote += fmt.Sprintf("; below the %.3g m clearance to the ceiling", clearance)
		}
	}
	qs = append(qs, Quantity{Name: "launch.height", Value: fn.apex, Worst: w(fw.apex), Unit: "m",
		Formula: "h = Δh + v²/(2 g), g = 9.80665 m/s²", Inputs: []Input{{"v", "launch.speed", nom.Speed, "m/s"}, {"Δh", "rise during the push", nom.Rise, "m"}},
		Basis: "uniformly accelerated motion under standard gravity (ISO 80000-3)", Note: joinLaunchNotes(hNote, worstNote)})
	if fn.reaches || fw.reaches {
		ceilIn := []Input{{"v", "launch.speed", nom.Speed, "m/s"}, {"D", "room.ceiling_height − gap − thickness", clearance, "m"}}
		tn, vn := fn.timeToCeiling, fn.impactSpeed
		if !fn.reaches { // only the worst case reaches it
			tn, vn = fw.timeToCeiling, fw.impactSpeed
		}
		qs = append(qs,
			Quantity{Name: "launch.time_to_ceiling", Value: tn, Worst: w(fw.timeToCeiling), Unit: "s",
				Formula: "t = t_push + (v − √(v² − 2g(D − Δh)))/g", Inputs: ceilIn,
				Basis: "uniformly accelerated motion, no drag", Note: joinLaunchNotes("from firing; far quicker than anyone can react", worstNote)},
			Quantity{Name: "launch.ceiling_impact_speed", Value: vn, Worst: w(fw.impactSpeed), Unit: "m/s",
				Formula: "v_c = √(v² − 2g(D − Δh))", Inputs: ceilIn,
				Basis: "uniformly accelerated motion, no drag (an upper bound)", Note: worstNote})
	}

	// Exclusion radius for a tilted launch.
	theta, tiltNote := a.Targets.LaunchTilt, "default worst-case tilt of the policy"
	if r.Room != nil && r.Room.Tilt != nil && *r.Room.Tilt >= 0 {
		theta, tiltNote = *r.Room.Tilt, "tilt as stated for the room"
	}
	if r.Room != nil && r.Room.LaunchAxis == "horizontal" {
		theta, tiltNote = math.Pi/4, "horizontal launch axis: the 45° range, the longest of any direction from the launch level"
	}
	if r.Room != nil && r.Room.LaunchAxis == "tilted" && r.Room.Tilt == nil {
		theta, tiltNote = math.Pi/4, "tilted launch axis with no stated tilt: the 45° range, the longest of any direction"
		a.AddGap("room.tilt", "the launch is tilted but its angle is not stated: the exclusion radius is taken for the longest (45°) throw")
	}
	if theta >= 0 {
		rn := tiltedRange(nom.Speed, theta, clearance) + ps.outerR
		rw := tiltedRange(worst.Speed, theta, clearance) + ps.outerR
		exIn := []Input{{"v", "launch.speed", nom.Speed, "m/s"}, {"θ", "room.tilt", theta, "rad"}, {"D", "ceiling clearance", clearance, "m"}}
		if r.Rig.AudienceDistance != nil {
			exIn = append(exIn, Input{"d_aud", "rig.audience_distance", *r.Rig.AudienceDistance, "m"})
		}
		basis, reachNote := "projectile motion without drag (an upper bound on the range)", "landing at the launch level; a bounce or a fall from a bench goes further; no guard counted"
		if fn.reaches || fw.reaches {
			// A dead stop at the ceiling and a straight fall is what the formula assumes; a disc that strikes
			// the ceiling at speed can ricochet anywhere, so the figure is no longer an upper bound.
			basis = "projectile motion without drag, stopped dead by the ceiling and falling straight: not an upper bound, since a ceiling strike can deflect the projectile anywhere in the room"
			reachNote = "the projectile strikes the ceiling; where it goes after the strike is not predictable"
		}
		qs = append(qs, Quantity{Name: "launch.exclusion_radius", Value: rn, Worst: w(rw), Unit: "m",
			Formula: "R = v² sin 2θ / g + r_p; with a ceiling it reaches: R = v sin θ (t_up + √(2D/g)) + r_p",
			Inputs:  exIn, Basis: basis,
			Note: joinLaunchNotes(fmt.Sprintf("%s, %.3g°", tiltNote, theta*180/math.Pi), reachNote, worstNote)})
	}

	// Measured launch height: speed and energy from it, beside the prediction.
	if ms := r.Measurements; ms != nil && ms.LaunchHeight != nil && *ms.LaunchHeight > 0 {
		hm := *ms.LaunchHeight
		vm := math.Sqrt(2 * gravity * hm)
		mIn := []Input{{"h", "measurements.launch_height", hm, "m"}, {"m", "projectile.mass", m, "kg"}}
		qs = append(qs,
			Quantity{Name: "launch.measured_speed", Value: vm, Unit: "m/s", Formula: "v = √(2 g h_measured)", Inputs: mIn,
				Basis: "uniformly accelerated motion, no drag (a lower bound on the true speed)",
				Note:  fmt.Sprintf("predicted %.3g m/s; ratio measured/predicted %.3g", nom.Speed, launchRatio(vm, nom.Speed))},
			Quantity{Name: "launch.measured_energy", Value: m * gravity * hm, Unit: "J", Formula: "E = m g h_measured", Inputs: mIn,
				Basis: "conservation of energy in free flight, no drag",
				Note:  fmt.Sprintf("predicted %.3g J", nom.Kinetic)})
	}
	for _, q := range qs {
		if err := a.Add(q); err != nil {
			return err
		}
	}

	// Curves from the nominal run, the height continued through the free flight to the apex or ceiling.
	a.Curves = append(a.Curves,
		Curve{Name: "launch.current", XLabel: "time (s)", YLabel: "coil current with the projectile (A)", XUnit: "s", YUnit: "A", X: nom.T, Y: nom.I},
		Curve{Name: "launch.bank_voltage", XLabel: "time (s)", YLabel: "bank voltage with the projectile (V)", XUnit: "s", YUnit: "V", X: nom.T, Y: nom.V})
	hx := append([]float64(nil), nom.T...)
	hy := append([]float64(nil), nom.H...)
	if nom.Speed > 0 {
		tStop := nom.Speed / gravity
		if fn.reaches {
			tStop = fn.timeToCeiling - nom.TEnd
		}
		const samples = 64
		for i := 1; i <= samples; i++ {
			dt := tStop * float64(i) / samples
			hx = append(hx, nom.TEnd+dt)
			hy = append(hy, nom.Rise+nom.Speed*dt-0.5*gravity*dt*dt)
		}
	}
	a.Curves = append(a.Curves, Curve{Name: "launch.height", XLabel: "time (s)", YLabel: "projectile height above its start (m)", XUnit: "s", YUnit: "m", X: hx, Y: hy})
	for _, c := range a.Curves[len(a.Curves)-3:] {
		if !finite(c.X...) || !finite(c.Y...) {
			return fmt.Errorf("curve %s: %w", c.Name, ErrNonFinite)
		}
	}
	return nil
}

func launchRatio(a, b float64) float64 {
	if b == 0 {
		return 0
	}
	return a / b
}

// joinLaunchNotes joins the non-empty notes with "; ".
func joinLaunchNotes(n ...string) string {
	var out string
	for _, s := range n {
		if s == "" {
			continue
		}
		if out != "" {
			out += "; "
		}
		out += s
	}
	return out
}
