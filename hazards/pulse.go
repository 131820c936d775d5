package hazards

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/integrate/quad"

	"chargeward/hazards/em"
)

// LoopModel is the series R-L-C discharge loop as later stages use it. Owner: pulse and coil (issue 4).
type LoopModel struct {
	C        float64 // bank capacitance, F
	V0       float64 // initial bank voltage, V
	R        float64 // total loop resistance except the coil: ESR + wiring + switch, Ω
	L        float64 // loop inductance except the coil: wiring stray + switch, H
	CoilL    float64 // coil inductance, H
	CoilR    float64 // coil resistance at 20 °C, Ω
	Drop     float64 // switch forward drop, V
	Topology string  // "unidirectional", "antiparallel-diode" or "crowbar"
	// CrowbarAt is "coil" or "bank" for a crowbar topology.
	CrowbarAt string

	// BankR is the part of R inside the bank's terminals (the bank ESR), Ω. Only a crowbar at the bank uses
	// it: its diode clamps the bank terminals, so the ESR leaves the current path once the clamp conducts.
	BankR float64
}

// Topologies of the firing switch.
const (
	Unidirectional    = "unidirectional"
	AntiparallelDiode = "antiparallel-diode"
	Crowbar           = "crowbar"
)

// PulseResult is the coil-only discharge of a LoopModel, evaluated in closed form piece by piece.
type PulseResult struct {
	Regime      string  // "underdamped", "critically damped" or "overdamped" (of the full loop from rest)
	Zeta        float64 // damping ratio ζ = (R/2)√(C/L) of the full loop
	PeakCurrent float64 // A, largest coil current
	TimeToPeak  float64 // s
	DiDtMax     float64 // A/s, largest rate of rise, at turn-on: (V0 − Vd)/L
	FirstZero   float64 // s, end of the first current lobe (the first current zero, or End if there is none)
	End         float64 // s, end of the modelled pulse: the last current zero, or all currents below 1e-4 of the peak
	Width       float64 // s, full width of the coil current at half its peak (first lobe)
	VEnd        float64 // V, bank voltage at End (negative: reversed)
	Reversal    float64 // 1, largest reversed bank voltage as a fraction of V0 (0 if the bank never reverses)
	CrowbarTime float64 // s, when the crowbar diode starts to conduct (0 when there is none or it never conducts)
	HalfCycles  int     // current lobes modelled (antiparallel diode: the ring-down; otherwise 1)
	Residual    float64 // J, energy still in the inductances where a decaying current was cut at 1e-4 of the peak

	SwitchI2t    float64 // A²s, ∫ i² dt through the firing switch (forward direction)
	DiodeI2t     float64 // A²s, through the antiparallel or crowbar diode
	CoilI2t      float64 // A²s, through the coil
	BankI2t      float64 // A²s, through the bank (its ESR)
	SwitchCharge float64 // C, ∫ |i| dt through switch and antiparallel diode (forward-drop loss = Vd · charge)
	CoilHeat     float64 // J, CoilR · CoilI2t
	LoopHeat     float64 // J, resistive loss outside the coil (ESR, wiring, switch slope resistance)

	pieces []piece
}

// wave is one closed-form branch current or bank voltage over a piece.
type wave struct {
	kind    waveKind
	seg     rlcSegment // kind rlc
	t0      float64    // start of the piece, s
	a, off  float64    // kind exp: x(t) = (a + off) e^{−(t−t0)/tau} − off
	tau     float64    // kind exp: time constant, s
	constV  float64    // kind constant
	negated bool       // report −x (a branch that carries the loop current backwards)
}

type waveKind int

const (
	wZero waveKind = iota
	wRLCCurrent
	wRLCVoltage
	wExp
	wConst
)

func (w wave) at(t float64) float64 {
	var x float64
	switch w.kind {
	case wRLCCurrent:
		x = w.seg.current(t)
	case wRLCVoltage:
		x = w.seg.voltage(t)
	case wExp:
		// (a + off) e^{−u} − off written as a e^{−u} + off (e^{−u} − 1): no cancellation when off ≫ a.
		u := (t - w.t0) / w.tau
		x = w.a*math.Exp(-u) + w.off*math.Expm1(-u)
	case wConst:
		x = w.constV
	}
	if w.negated {
		return -x
	}
	return x
}

// piece is an interval on which every branch has one closed form.
type piece struct {
	t0, t1         float64
	coil, sw, diod wave // coil, switch (forward) and diode currents, A
	bank           wave // bank current, A (through its ESR)
	v              wave // bank voltage, V
	// rBank is the resistance outside the coil that carries the bank current in this piece, Ω; rSw the one
	// that carries the switch current where it differs from the bank current (crowbar at the bank), Ω.
	rBank, rSw float64
	// diode says how the diode current follows from the others where it is not a wave of its own.
	diode diodeRule
}

// diodeRule derives a clamp diode's current.
type diodeRule int

const (
	diodeWave        diodeRule = iota // the diod wave (antiparallel diode, or none)
	diodeCoilMinusSw                  // crowbar at the coil: the diode carries i_coil − i_bank
	diodeSwMinusBank                  // crowbar at the bank: the diode carries i_loop − i_bank
)

// rlcSegment is one interval of a series R-L-C loop carrying current in one direction. With u = vC − Vd the
// loop obeys d²u/dt² + 2α du/dt + ω0² u = 0 and i = −C du/dt. S(τ) and Cs(τ) are the unified pair of the
// damped solution (q = ω0² − α²): S = sin(√q τ)/√q, Cs = cos(√q τ) for q > 0, the hyperbolic forms for q < 0,
// and their series about q = 0 near critical damping, so one expression covers all three regimes.
type rlcSegment struct {
	t0, l, c, alpha, q, u0, i0, drop float64
}

// esc returns e^{−ατ} S(τ) and e^{−ατ} Cs(τ). The damping factor is folded in before the hyperbolic
// functions are formed, as (e^{(b−α)τ} ∓ e^{−(α+b)τ})/2 with b = √−q < α, so a heavily overdamped loop
// cannot overflow.
func (s rlcSegment) esc(tau float64) (eS, eC float64) {
	x := s.q * tau * tau
	switch {
	case math.Abs(x) < 1e-6:
		// Taylor series of sin(√q τ)/√q and cos(√q τ) in qτ²: the first omitted terms are below 1e-21.
		e := math.Exp(-s.alpha * tau)
		return e * tau * (1 - x/6 + x*x/120), e * (1 - x/2 + x*x/24)
	case s.q > 0:
		w := math.Sqrt(s.q)
		e := math.Exp(-s.alpha * tau)
		return e * math.Sin(w*tau) / w, e * math.Cos(w*tau)
	default:
		b := math.Sqrt(-s.q)
		ep, em := math.Exp((b-s.alpha)*tau), math.Exp(-(s.alpha+b)*tau)
		return (ep - em) / (2 * b), (ep + em) / 2
	}
}

// current returns the loop current: i = e^{−ατ}[i0 Cs + (u0/L − α i0) S], τ = t − t0.
func (s rlcSegment) current(t float64) float64 {
	eS, eC := s.esc(t - s.t0)
	return s.i0*eC + (s.u0/s.l-s.alpha*s.i0)*eS
}

// voltage returns the capacitor voltage: vC = Vd + e^{−ατ}[u0 Cs + (α u0 − i0/C) S].
func (s rlcSegment) voltage(t float64) float64 {
	eS, eC := s.esc(t - s.t0)
	return s.drop + s.u0*eC + (s.alpha*s.u0-s.i0/s.c)*eS
}

// slowRate returns the slowest decay rate of the segment, 1/s: α when under- or critically damped, and
// α − √(α² − ω0²) = ω0²/(α + √(α² − ω0²)) when overdamped (the second form keeps its digits at large ζ).
func (s rlcSegment) slowRate() float64 {
	if s.q >= 0 {
		return s.alpha
	}
	return 1 / (s.l * s.c) / (s.alpha + math.Sqrt(-s.q))
}

// zeroCsKS returns the first τ > 0 with Cs(τ) − κ S(τ) = 0, and whether there is one. Every event of the pulse
// is of this form: the current peak (κ = α), a current zero (κ = α − u0/(L i0)), the coil voltage reversing
// (κ = α − Rc/Lc). Underdamped: τ = atan2(√q, κ)/√q; critically damped: 1/κ (κ > 0); overdamped:
// atanh(√−q/κ)/√−q (κ > √−q).
func zeroCsKS(kappa, q float64) (float64, bool) {
	switch {
	case q > 0:
		w := math.Sqrt(q)
		return math.Atan2(w, kappa) / w, true
	case q == 0:
		if kappa > 0 {
			return 1 / kappa, true
		}
	default:
		b := math.Sqrt(-q)
		if kappa > b {
			return math.Atanh(b/kappa) / b, true
		}
	}
	return 0, false
}

// newSegment returns the R-L-C segment starting at t0 with loop L, R, C, drop (signed, V), capacitor voltage
// v0 and current i0.
func newSegment(t0, l, r, c, drop, v0, i0 float64) rlcSegment {
	alpha := r / (2 * l)
	return rlcSegment{t0: t0, l: l, c: c, alpha: alpha, q: 1/(l*c) - alpha*alpha, u0: v0 - drop, i0: i0, drop: drop}
}

// segmentZero returns the first current zero after t0 of a segment whose current is positive just after t0
// (forward lobe) and whether there is one.
func segmentZero(s rlcSegment) (float64, bool) {
	if s.i0 == 0 {
		// i ∝ S(τ): zero at π/√q when underdamped, never otherwise.
		if s.q > 0 {
			return s.t0 + math.Pi/math.Sqrt(s.q), true
		}
		return 0, false
	}
	tau, ok := zeroCsKS(s.alpha-s.u0/(s.l*s.i0), s.q)
	return s.t0 + tau, ok
}

// ErrLoop is returned (wrapped) for a loop the pulse model cannot evaluate.
var ErrLoop = errors.New("discharge loop cannot be evaluated")

// tailFraction is where a current that never returns to zero is considered ended: 1e-4 of the peak, when
// its remaining I²t is below 1e-8 of the pulse's.
const tailFraction = 1e-4

// maxHalfCycles bounds the ring-down of an antiparallel-diode loop; at ζ ≥ 0.001 the current has fallen
// below 1e-4 of its peak well before.
const maxHalfCycles = 20000

// RLCPulse returns the closed-form discharge of the series R-L-C loop l from V0 with the coil alone (no
// projectile). With total resistance R, inductance L, capacitance C and a constant switch drop Vd, each
// conduction interval obeys L di/dt + R i + Vd·sgn(i) = vC, C dvC/dt = −i, whose solution from rest with
// α = R/2L, ω0² = 1/LC is
//
//	i(t)  = (V0 − Vd)/L · e^{−αt} S(t),   vC(t) = Vd + (V0 − Vd) e^{−αt} [Cs(t) + α S(t)]
//
// with S = sin(ωd t)/ωd, Cs = cos(ωd t) (underdamped, ωd² = ω0² − α² > 0), S = t, Cs = 1 (critically damped),
// sinh/cosh (overdamped) — the standard series-RLC transient (e.g. J. W. Nilsson & S. A. Riedel, Electric
// Circuits, ch. 8). The topology decides what follows:
//
//   - unidirectional: conduction stops at the first current zero; the bank keeps the reversed voltage.
//   - antiparallel-diode: the diode carries the reverse lobes (same drop Vd assumed); the loop rings down,
//     lobe after lobe, until |vC| ≤ Vd or the current is below 1e-4 of its peak.
//   - crowbar at the coil: an ideal diode across the coil conducts once the coil voltage Lc di/dt + Rc i
//     reaches zero; the coil current then decays as e^{−Rc t/Lc} and the bank loop (stray L, R) finishes its
//     own lobe, reversing the bank only by the stray inductance's energy.
//   - crowbar at the bank: an ideal diode across the bank terminals conducts once vC − BankR·i reaches zero;
//     the loop current then decays through R − BankR + Rc with the switch drop, and the bank's residual
//     BankR·i discharges through its ESR (no reversal).
//
// Integrals (I²t, charge) are 16-point Gauss–Legendre sums over 8 subintervals of each piece (gonum
// integrate/quad nodes), exact to rounding for these analytic pieces. Units: F, V, Ω, H, s, A. Valid for
// C, L > 0, R ≥ 0, 0 ≤ Vd < V0; a crowbar needs a positive resistance in the clamped loop.
func RLCPulse(l LoopModel) (PulseResult, error) {
	lt := l.L + l.CoilL
	rt := l.R + l.CoilR
	if !finite(l.C, l.L, l.CoilL, l.R, l.CoilR, l.V0, l.Drop, l.BankR) {
		return PulseResult{}, fmt.Errorf("%w: non-finite loop value", ErrLoop)
	}
	if !(l.C > 0 && lt > 0 && l.L >= 0 && l.CoilL >= 0 && l.R >= 0 && l.CoilR >= 0 && l.V0 > 0 && l.Drop >= 0 && l.BankR >= 0 && l.BankR <= l.R) {
		return PulseResult{}, fmt.Errorf("%w: need C > 0, L > 0, R ≥ 0, V0 > 0, drop ≥ 0, 0 ≤ BankR ≤ R (C %g F, L %g H, R %g Ω, V0 %g V, drop %g V)", ErrLoop, l.C, lt, rt, l.V0, l.Drop)
	}
	if l.Drop >= l.V0 {
		return PulseResult{}, fmt.Errorf("%w: switch drop %g V is not below the bank voltage %g V", ErrLoop, l.Drop, l.V0)
	}
	first := newSegment(0, lt, rt, l.C, l.Drop, l.V0, 0)
	p := PulseResult{Zeta: first.alpha * math.Sqrt(lt*l.C), HalfCycles: 1}
	switch {
	case math.Abs(p.Zeta-1) <= 1e-9:
		p.Regime = "critically damped"
	case p.Zeta < 1:
		p.Regime = "underdamped"
	default:
		p.Regime = "overdamped"
	}
	tpk, _ := zeroCsKS(first.alpha, first.q) // always exists for a lobe from rest
	if first.q < 0 {
		// overdamped: t = ln((α + b)/(α − b))/(2b) with α − b = ω0²/(α + b), exact at any ζ.
		b := math.Sqrt(-first.q)
		tpk = math.Log((first.alpha+b)*(first.alpha+b)*lt*l.C) / (2 * b)
	}
	p.TimeToPeak = tpk
	p.PeakCurrent = first.current(tpk)
	p.DiDtMax = first.u0 / lt
	zero, hasZero := segmentZero(first)
	tailEnd := func(s rlcSegment) float64 {
		// past the segment's own rise (the first lobe's peak, or ten fast time constants for a segment that
		// starts with current), the slow exponential falls to tailFraction.
		lead := tpk
		if s.t0 > 0 {
			lead = 10 / (s.alpha + math.Sqrt(math.Abs(s.q)))
		}
		return s.t0 + lead + math.Log(1/tailFraction)/s.slowRate()
	}
	fwd := func(s rlcSegment, t0, t1 float64, r float64) piece {
		cur := wave{kind: wRLCCurrent, seg: s}
		return piece{t0: t0, t1: t1, coil: cur, sw: cur, bank: cur, v: wave{kind: wRLCVoltage, seg: s}, rBank: r}
	}
	topo := l.Topology
	if topo == "" {
		topo = Unidirectional
	}
	switch topo {
	case Unidirectional, AntiparallelDiode:
		end := zero
		if !hasZero {
			end = tailEnd(first)
		}
		p.pieces = append(p.pieces, fwd(first, 0, end, l.R))
		p.FirstZero = end
		p.Reversal = math.Max(0, -first.voltage(end)/l.V0)
		if topo == AntiparallelDiode && hasZero {
			p.ringDown(l, lt, rt, end)
		}
	case Crowbar:
		switch l.CrowbarAt {
		case "", "coil":
			if err := p.crowbarCoil(l, first, zero, hasZero, tailEnd); err != nil {
				return PulseResult{}, err
			}
		case "bank":
			if err := p.crowbarBank(l, first, zero, hasZero, tailEnd); err != nil {
				return PulseResult{}, err
			}
		default:
			return PulseResult{}, fmt.Errorf("%w: crowbar position %q (want coil or bank)", ErrLoop, l.CrowbarAt)
		}
	default:
		return PulseResult{}, fmt.Errorf("%w: topology %q (want %s, %s or %s)", ErrLoop, l.Topology, Unidirectional, AntiparallelDiode, Crowbar)
	}
	for i, pc := range p.pieces {
		if !(pc.t1 >= pc.t0) || (i > 0 && pc.t0 < p.pieces[i-1].t0) {
			return PulseResult{}, fmt.Errorf("%w: internal event order (piece %d from %g s to %g s)", ErrLoop, i, pc.t0, pc.t1)
		}
	}
	last := p.pieces[len(p.pieces)-1]
	p.End = last.t1
	p.VEnd = last.v.at(p.End)
	if p.CrowbarTime == 0 || l.CrowbarAt == "bank" {
		i := last.coil.at(p.End)
		p.Residual = 0.5 * lt * i * i
	}
	p.integrate(l)
	p.Width = p.halfWidth()
	if !finite(p.PeakCurrent, p.TimeToPeak, p.DiDtMax, p.End, p.VEnd, p.Reversal, p.SwitchI2t, p.CoilI2t, p.DiodeI2t, p.BankI2t, p.Width) {
		return PulseResult{}, fmt.Errorf("%w: the closed form overflowed (ζ = %g)", ErrLoop, p.Zeta)
	}
	return p, nil
}

// ringDown appends the reverse and later lobes of an antiparallel-diode loop from t, the first current zero.
func (p *PulseResult) ringDown(l LoopModel, lt, rt, t float64) {
	v := p.pieces[0].v.at(t)
	p.Reversal = math.Max(0, -v/l.V0)
	for n := 1; n < maxHalfCycles; n++ {
		sign := 1.0
		if v < 0 {
			sign = -1
		}
		if math.Abs(v) <= l.Drop {
			return // the drop holds the rest of the charge
		}
		// mirror the lobe so that the segment always carries positive current: x = sign·i, w = sign·vC.
		s := newSegment(t, lt, rt, l.C, l.Drop, sign*v, 0)
		t1 := t + math.Pi/math.Sqrt(s.q)
		cur := wave{kind: wRLCCurrent, seg: s, negated: sign < 0}
		pc := piece{t0: t, t1: t1, coil: cur, bank: cur, v: wave{kind: wRLCVoltage, seg: s, negated: sign < 0}, rBank: l.R}
		if sign > 0 {
			pc.sw = cur
		} else {
			pc.diod = cur
		}
		p.pieces = append(p.pieces, pc)
		p.HalfCycles++
		amp := math.Abs(s.current(t + (p.TimeToPeak)))
		t, v = t1, pc.v.at(t1)
		if v < 0 {
			p.Reversal = math.Max(p.Reversal, -v/l.V0)
		}
		if amp < tailFraction*p.PeakCurrent {
			return
		}
	}
}

// crowbarCoil builds the pieces of a crowbar diode across the coil.
func (p *PulseResult) crowbarCoil(l LoopModel, first rlcSegment, zero float64, hasZero bool, tailEnd func(rlcSegment) float64) error {
	// Coil voltage Lc i' + Rc i ∝ Lc (Cs − αS) + Rc S: zero where Cs − (α − Rc/Lc) S = 0.
	tc, ok := 0.0, false
	if l.CoilL > 0 {
		tc, ok = zeroCsKS(first.alpha-l.CoilR/l.CoilL, first.q)
	}
	if !ok || (hasZero && tc >= zero) {
		// The clamp never conducts: the loop behaves as unidirectional.
		p.unclamped(l, first, zero, hasZero, tailEnd)
		return nil
	}
	if l.CoilR <= 0 {
		return fmt.Errorf("%w: a crowbar across the coil needs coil resistance > 0", ErrLoop)
	}
	p.CrowbarTime = tc
	ic, vc := first.current(tc), first.voltage(tc)
	cur := wave{kind: wRLCCurrent, seg: first}
	p.pieces = append(p.pieces, piece{t0: 0, t1: tc, coil: cur, sw: cur, bank: cur, v: wave{kind: wRLCVoltage, seg: first}, rBank: l.R})
	// Coil loop: ideal diode, i = ic e^{−(t−tc)Rc/Lc}.
	tauC := l.CoilL / l.CoilR
	coilEnd := tc + tauC*math.Max(0, math.Log(ic/(tailFraction*p.PeakCurrent)))
	coil := wave{kind: wExp, t0: tc, a: ic, tau: tauC}
	// Bank loop: C, stray L, R, drop; it finishes its lobe.
	var bankI, bankV wave
	bankEnd := tc
	vEnd := vc
	switch {
	case l.L > 0:
		s := newSegment(tc, l.L, l.R, l.C, l.Drop, vc, ic)
		if z, ok := segmentZero(s); ok {
			bankEnd = z
		} else {
			bankEnd = tailEnd(s)
		}
		bankI, bankV = wave{kind: wRLCCurrent, seg: s}, wave{kind: wRLCVoltage, seg: s}
		vEnd = s.voltage(bankEnd)
	case l.R > 0:
		// No stray inductance: R-C decay toward Vd, i = (vC − Vd)/R.
		tau := l.R * l.C
		i0 := (vc - l.Drop) / l.R
		if i0 > 0 {
			bankEnd = tc + tau*math.Max(0, math.Log(i0/(tailFraction*p.PeakCurrent)))
			bankI = wave{kind: wExp, t0: tc, a: i0, tau: tau}
			bankV = wave{kind: wExp, t0: tc, a: vc - l.Drop, off: -l.Drop, tau: tau}
			vEnd = bankV.at(bankEnd)
		} else {
			bankV = wave{kind: wConst, constV: vc}
		}
	default:
		bankV = wave{kind: wConst, constV: vc}
	}
	split := math.Min(coilEnd, bankEnd)
	if split > tc {
		p.pieces = append(p.pieces, piece{t0: tc, t1: split, coil: coil, sw: bankI, bank: bankI, v: bankV, rBank: l.R, diode: diodeCoilMinusSw})
	}
	if coilEnd > split {
		p.pieces = append(p.pieces, piece{t0: split, t1: coilEnd, coil: coil, v: wave{kind: wConst, constV: vEnd}, diode: diodeCoilMinusSw})
	} else if bankEnd > split {
		p.pieces = append(p.pieces, piece{t0: split, t1: bankEnd, sw: bankI, bank: bankI, v: bankV, rBank: l.R})
	}
	p.FirstZero = math.Max(coilEnd, bankEnd)
	p.Reversal = math.Max(0, -vEnd/l.V0)
	icEnd := coil.at(coilEnd)
	p.Residual = 0.5 * l.CoilL * icEnd * icEnd
	if l.L > 0 {
		ib := bankI.at(bankEnd)
		p.Residual += 0.5 * l.L * ib * ib
	}
	return nil
}

// unclamped builds the single piece of a crowbarred loop whose clamp never conducts: the first lobe runs
// to its current zero (or to the tail's end) exactly as in a unidirectional loop.
func (p *PulseResult) unclamped(l LoopModel, first rlcSegment, zero float64, hasZero bool, tailEnd func(rlcSegment) float64) {
	end := zero
	if !hasZero {
		end = tailEnd(first)
	}
	cur := wave{kind: wRLCCurrent, seg: first}
	p.pieces = append(p.pieces, piece{t0: 0, t1: end, coil: cur, sw: cur, bank: cur, v: wave{kind: wRLCVoltage, seg: first}, rBank: l.R})
	p.FirstZero = end
	p.Reversal = math.Max(0, -first.voltage(end)/l.V0)
}

// crowbarBank builds the pieces of a crowbar diode across the bank terminals.
func (p *PulseResult) crowbarBank(l LoopModel, first rlcSegment, zero float64, hasZero bool, tailEnd func(rlcSegment) float64) error {
	// Terminal voltage vT = vC − BankR·i; find its first zero in the first lobe by bisection (it is positive
	// at t = 0 and negative at the current zero when the bank reverses).
	vt := func(t float64) float64 { return first.voltage(t) - l.BankR*first.current(t) }
	if !hasZero || vt(zero) >= 0 {
		p.unclamped(l, first, zero, hasZero, tailEnd)
		return nil
	}
	lo, hi := 0.0, zero
	for i := 0; i < 200 && hi-lo > 1e-15*zero; i++ {
		mid := (lo + hi) / 2
		if vt(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	tc := (lo + hi) / 2
	p.CrowbarTime = tc
	ic, vc := first.current(tc), first.voltage(tc)
	cur := wave{kind: wRLCCurrent, seg: first}
	p.pieces = append(p.pieces, piece{t0: 0, t1: tc, coil: cur, sw: cur, bank: cur, v: wave{kind: wRLCVoltage, seg: first}, rBank: l.R})
	rFree := l.R - l.BankR // wiring and switch, outside the clamp
	rl := rFree + l.CoilR
	if rl <= 0 {
		return fmt.Errorf("%w: a crowbar across the bank needs resistance > 0 in the coil loop", ErrLoop)
	}
	lt := l.L + l.CoilL
	tau := lt / rl
	var end float64
	off := l.Drop / rl
	if l.Drop > 0 {
		end = tc + tau*math.Log(1+ic/off) // i reaches zero: the switch stops conducting
	} else {
		end = tc + tau*math.Max(0, math.Log(ic/(tailFraction*p.PeakCurrent)))
	}
	loopI := wave{kind: wExp, t0: tc, a: ic, off: off, tau: tau}
	var bankI, bankV wave
	if l.BankR > 0 && vc > 0 {
		tb := l.BankR * l.C
		bankV = wave{kind: wExp, t0: tc, a: vc, tau: tb}
		bankI = wave{kind: wExp, t0: tc, a: vc / l.BankR, tau: tb}
	} else {
		bankV = wave{kind: wConst, constV: math.Max(vc, 0)}
	}
	p.pieces = append(p.pieces, piece{t0: tc, t1: end, coil: loopI, sw: loopI, bank: bankI, v: bankV, rBank: l.BankR, rSw: rFree, diode: diodeSwMinusBank})
	p.FirstZero = end
	return nil
}

// glX, glW are the 16-point Gauss–Legendre nodes and weights on [−1, 1] (gonum integrate/quad).
var glX, glW = func() ([]float64, []float64) {
	x, w := make([]float64, 16), make([]float64, 16)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

// integrals are the quantities integrate accumulates over a piece.
type integrals struct{ coil, sw, diode, bank, charge, loss float64 }

func (a integrals) add(b integrals) integrals {
	return integrals{a.coil + b.coil, a.sw + b.sw, a.diode + b.diode, a.bank + b.bank, a.charge + b.charge, a.loss + b.loss}
}

// fastScale returns the shortest time scale of the piece's waves, s (at most the piece's length).
func (pc *piece) fastScale() float64 {
	f := pc.t1 - pc.t0
	for _, w := range []wave{pc.coil, pc.sw, pc.diod, pc.bank, pc.v} {
		switch w.kind {
		case wRLCCurrent, wRLCVoltage:
			f = math.Min(f, 1/(w.seg.alpha+math.Sqrt(math.Abs(w.seg.q))))
		case wExp:
			f = math.Min(f, w.tau)
		}
	}
	return f
}

// gl16 returns the 16-point Gauss–Legendre sums of the integrands of pc over [a, b].
func (pc *piece) gl16(a, b float64) integrals {
	var s integrals
	h := (b - a) / 2
	for j, x := range glX {
		t := a + h*(x+1)
		w := glW[j] * h
		ic, is, id, ib := pc.coil.at(t), pc.sw.at(t), pc.diod.at(t), pc.bank.at(t)
		switch pc.diode {
		case diodeCoilMinusSw:
			id = ic - is
		case diodeSwMinusBank:
			id = is - ib
		}
		s.coil += w * ic * ic
		s.sw += w * is * is
		s.diode += w * id * id
		s.bank += w * ib * ib
		s.charge += w * (math.Abs(is) + math.Abs(pc.diod.at(t)))
		s.loss += w * (ib*ib*pc.rBank + is*is*pc.rSw)
	}
	return s
}

// adapt integrates pc over [a, b] by recursive bisection until the 16-point rule on the halves agrees with
// the whole to tol (A²s) in every integrand.
func (pc *piece) adapt(a, b float64, whole integrals, tol float64, depth int, budget *int) integrals {
	m := (a + b) / 2
	l, r := pc.gl16(a, m), pc.gl16(m, b)
	sum := l.add(r)
	d := math.Max(math.Max(math.Abs(sum.coil-whole.coil), math.Abs(sum.sw-whole.sw)), math.Max(math.Abs(sum.diode-whole.diode), math.Abs(sum.bank-whole.bank)))
	mag := math.Max(math.Max(sum.coil, sum.sw), math.Max(sum.diode, sum.bank))
	// Converged at the absolute tolerance, or at 1e-13 of the interval's own integral (rounding: asking for
	// less would only chase noise), or at the depth limit or the budget.
	*budget--
	if d <= tol || d <= 1e-13*mag || depth >= maxQuadDepth || *budget <= 0 || math.IsNaN(d) {
		return sum
	}
	return pc.adapt(a, m, l, tol/2, depth+1, budget).add(pc.adapt(m, b, r, tol/2, depth+1, budget))
}

// maxQuadDepth bounds the bisection depth of the adaptive quadrature: 2^-24 of an interval is far below
// the shortest time scale that the graded intervals start from.
const maxQuadDepth = 24

// quadBudget bounds the bisections of one pulse's quadrature (each costs two 16-point sums), so that no
// loop can stall the review; the demo loops need a few hundred.
const quadBudget = 200000

// integrate fills the action integrals, the switch charge and the heat. The integrands are analytic on each
// piece; adaptive 16-point Gauss–Legendre (nodes from gonum integrate/quad) converges to 1e-13 of Ipk²·End.
func (p *PulseResult) integrate(l LoopModel) {
	tol := 1e-13 * p.PeakCurrent * p.PeakCurrent * p.End
	budget := quadBudget
	var s integrals
	for i := range p.pieces {
		pc := &p.pieces[i]
		// Grade the piece geometrically from its start at its fastest time scale, so that a rise far
		// shorter than the piece (an overdamped loop's L/R, a bank's ESR·C after a crowbar) is never
		// stepped over by the quadrature nodes.
		a, h := pc.t0, pc.fastScale()
		for a < pc.t1 {
			b := math.Min(a+h, pc.t1)
			if pc.t1-b < h { // do not leave a sliver
				b = pc.t1
			}
			s = s.add(pc.adapt(a, b, pc.gl16(a, b), tol, 0, &budget))
			a, h = b, 2*h
		}
	}
	p.CoilI2t, p.SwitchI2t, p.DiodeI2t, p.BankI2t, p.SwitchCharge, p.LoopHeat = s.coil, s.sw, s.diode, s.bank, s.charge, s.loss
	p.CoilHeat = l.CoilR * p.CoilI2t
}

// halfWidth returns the full width at half maximum of the coil current's first lobe, by bisection on the
// closed form.
func (p *PulseResult) halfWidth() float64 {
	half := p.PeakCurrent / 2
	bisect := func(lo, hi float64, rising bool) float64 {
		for i := 0; i < 200 && hi-lo > 1e-15*p.End; i++ {
			mid := (lo + hi) / 2
			if (p.Current(mid) < half) == rising {
				lo = mid
			} else {
				hi = mid
			}
		}
		return (lo + hi) / 2
	}
	t1 := bisect(0, p.TimeToPeak, true)
	t2 := bisect(p.TimeToPeak, p.FirstZero, false)
	return t2 - t1
}

// find returns the piece holding t, or −1.
func (p PulseResult) find(t float64) int {
	if len(p.pieces) == 0 || t < 0 || t > p.End {
		return -1
	}
	i := sort.Search(len(p.pieces), func(i int) bool { return p.pieces[i].t1 >= t })
	if i == len(p.pieces) {
		return -1
	}
	return i
}

// Current returns the coil current at time t (s), A; zero outside [0, End].
func (p PulseResult) Current(t float64) float64 {
	if i := p.find(t); i >= 0 {
		return p.pieces[i].coil.at(t)
	}
	return 0
}

// SwitchCurrent returns the current through the firing switch in its forward direction at time t, A.
func (p PulseResult) SwitchCurrent(t float64) float64 {
	if i := p.find(t); i >= 0 {
		return p.pieces[i].sw.at(t)
	}
	return 0
}

// BankCurrent returns the current out of the bank at time t, A.
func (p PulseResult) BankCurrent(t float64) float64 {
	if i := p.find(t); i >= 0 {
		return p.pieces[i].bank.at(t)
	}
	return 0
}

// BankVoltage returns the bank (capacitor) voltage at time t (s), V: V0 before 0, VEnd after End.
func (p PulseResult) BankVoltage(t float64) float64 {
	if len(p.pieces) == 0 {
		return 0
	}
	if t < 0 {
		return p.pieces[0].v.at(0)
	}
	if t > p.End {
		return p.VEnd
	}
	return p.pieces[p.find(t)].v.at(t)
}

// Sample returns the waveform at n+1 evenly spaced times over [0, End] (n ≥ 1): times (s), coil current (A)
// and bank voltage (V).
func (p PulseResult) Sample(n int) (t, i, v []float64) {
	if n < 1 {
		n = 1
	}
	t, i, v = make([]float64, n+1), make([]float64, n+1), make([]float64, n+1)
	for k := range t {
		t[k] = p.End * float64(k) / float64(n)
		i[k] = p.Current(t[k])
		v[k] = p.BankVoltage(t[k])
	}
	return t, i, v
}

// finite reports whether every value is finite.
func finite(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// TwoWireInductance returns the low-frequency inductance, H, of a two-wire line of round conductors of
// radius r (m) whose centres are s apart (m), for a total conductor length ℓ (m, out and back, so the line is
// ℓ/2 long):
//
//	L = (μ0/π)(ℓ/2)[acosh(s/2r) + ¼]
//
// the external inductance of parallel round wires (exact for s > 2r, proximity included: D. K. Cheng, Field
// and Wave Electromagnetics, 2nd ed., 1989, §9-2, Table 9-1) plus the internal inductance μ0/8π of each
// conductor at uniform current. End effects of a short line are neglected (they lower L). NaN unless
// s > 2r > 0, ℓ > 0.
func TwoWireInductance(length, r, s float64) float64 {
	if !(r > 0 && s > 2*r && length > 0) {
		return math.NaN()
	}
	return em.Mu0 / math.Pi * length / 2 * (math.Acosh(s/(2*r)) + 0.25)
}

// loopParts is the discharge loop as built from the rig, with the provenance of each part.
type loopParts struct {
	esr, wireR, wireL, swR, drop float64
	topology, crowbarAt          string
	quantities                   []Quantity
}

// buildLoop assembles the series loop from the bank model, wiring and switch, recording a gap for each
// missing part. Missing resistances and inductances are taken as zero, which overstates the peak current
// and the rate of rise (the stress quantities) — the gap says so.
func buildLoop(a *Assessment) loopParts {
	var lp loopParts
	r := a.Rig
	bm := a.m.bank
	lp.esr = bm.ESR
	lp.quantities = append(lp.quantities, Quantity{Name: "loop.bank_esr", Value: lp.esr, Unit: "Ω", Formula: "ESR = S·ESRcell/P (bank.esr)",
		Inputs: []Input{{"ESR", "bank.esr", lp.esr, "Ω"}}, Basis: "series resistances add, parallel ones combine reciprocally",
		Note: "0 when the cells' ESR is not stated"})

	w := r.Wiring
	if w == nil {
		a.AddGap("wiring", "the wiring between bank, switch and coil is not described: its resistance and stray inductance are taken as zero, which overstates the peak current and di/dt")
	} else {
		switch {
		case w.Resistance != nil:
			lp.wireR = *w.Resistance
			lp.quantities = append(lp.quantities, Quantity{Name: "loop.wiring_resistance", Value: lp.wireR, Unit: "Ω", Formula: "stated",
				Inputs: []Input{{"R", "wiring.resistance", lp.wireR, "Ω"}}, Basis: "stated in the rig"})
		case w.Length != nil && w.CrossSection != nil && *w.CrossSection > 0:
			lp.wireR = Copper.Resistivity20 * *w.Length / *w.CrossSection
			lp.quantities = append(lp.quantities, Quantity{Name: "loop.wiring_resistance", Value: lp.wireR, Unit: "Ω", Formula: "R = ρ20 ℓ / A (copper)",
				Inputs: []Input{{"ρ20", "copper", Copper.Resistivity20, "Ω·m"}, {"ℓ", "wiring.length", *w.Length, "m"}, {"A", "wiring.cross_section", *w.CrossSection, "m²"}},
				Basis:  Copper.Basis, Note: "DC resistance of the conductors; joints, lugs and terminals add to it"})
		default:
			a.AddGap("wiring.cross_section", "the wiring's length and cross-section (or its resistance) are not stated: its resistance is taken as zero, which overstates the peak current")
		}
		switch {
		case w.StrayInductance != nil:
			lp.wireL = *w.StrayInductance
			lp.quantities = append(lp.quantities, Quantity{Name: "loop.wiring_inductance", Value: lp.wireL, Unit: "H", Formula: "stated",
				Inputs: []Input{{"L", "wiring.stray_inductance", lp.wireL, "H"}}, Basis: "stated in the rig"})
		case w.Length != nil && w.CrossSection != nil && w.Separation != nil:
			rw := math.Sqrt(*w.CrossSection / math.Pi)
			l := TwoWireInductance(*w.Length, rw, *w.Separation)
			if math.IsNaN(l) {
				a.AddGap("wiring.separation", "the wiring's separation is not larger than the conductor diameter: its stray inductance is taken as zero")
				break
			}
			lp.wireL = l
			lp.quantities = append(lp.quantities, Quantity{Name: "loop.wiring_inductance", Value: l, Unit: "H", Formula: "L = (μ0/π)(ℓ/2)[acosh(s/2r) + ¼], r = √(A/π)",
				Inputs: []Input{{"ℓ", "wiring.length", *w.Length, "m"}, {"A", "wiring.cross_section", *w.CrossSection, "m²"}, {"s", "wiring.separation", *w.Separation, "m"}},
				Basis:  "two-wire line inductance: D. K. Cheng, Field and Wave Electromagnetics, 2nd ed., 1989, Table 9-1, plus the internal inductance μ0/8π per conductor",
				Note:   "go and return run parallel at the stated spacing; the bank's and switch's own inductance are not included"})
		default:
			a.AddGap("wiring.separation", "the wiring's stray inductance (or length, cross-section and separation) is not stated: it is taken as zero, which overstates the peak current and di/dt")
		}
	}

	sw := r.Switch
	lp.topology = Unidirectional
	if sw == nil {
		a.AddGap("switch", "the firing switch is not described: its ratings cannot be checked and a unidirectional switch (the most bank reversal) is assumed")
		return lp
	}
	if sw.Topology != "" {
		lp.topology = sw.Topology
	} else {
		a.AddGap("switch.topology", "the switch topology is not stated: unidirectional is assumed, which leaves the bank reversed")
	}
	lp.crowbarAt = sw.CrowbarAt
	if lp.topology == Crowbar && lp.crowbarAt == "" {
		lp.crowbarAt = "coil"
	}
	if sw.OnResist != nil {
		lp.swR = *sw.OnResist
		lp.quantities = append(lp.quantities, Quantity{Name: "loop.switch_resistance", Value: lp.swR, Unit: "Ω", Formula: "stated",
			Inputs: []Input{{"r_T", "switch.on_resistance", lp.swR, "Ω"}}, Basis: "stated in the rig (slope resistance)"})
	} else {
		a.AddGap("switch.on_resistance", "the switch's on-state resistance is not stated: it is taken as zero, which overstates the peak current")
	}
	if sw.Drop != nil {
		lp.drop = *sw.Drop
		lp.quantities = append(lp.quantities, Quantity{Name: "loop.switch_drop", Value: lp.drop, Unit: "V", Formula: "stated",
			Inputs: []Input{{"V_T0", "switch.forward_drop", lp.drop, "V"}}, Basis: "stated in the rig (threshold or arc voltage)"})
	} else {
		a.AddGap("switch.forward_drop", "the switch's forward drop is not stated: it is taken as zero, which overstates the peak current")
	}
	return lp
}

// loopModel returns the LoopModel of the parts with the bank at capacitance c (F) and voltage v (V).
func (lp loopParts) loopModel(c, v float64, coil *CoilModel) LoopModel {
	l := LoopModel{C: c, V0: v, R: lp.esr + lp.wireR + lp.swR, L: lp.wireL, Drop: lp.drop, Topology: lp.topology, CrowbarAt: lp.crowbarAt, BankR: lp.esr}
	if coil != nil {
		l.CoilL, l.CoilR = coil.L, coil.R20
	}
	return l
}

// assessPulse computes the coil-only pulse (DESIGN.md §4.4): the loop, the waveform at nominal and worst-case
// bank values, the switch and cell stress against their ratings and the coil's heating.
func assessPulse(a *Assessment) error {
	bm := a.m.bank
	if bm == nil || !(bm.C > 0 && bm.V > 0) {
		return nil // the bank stage has recorded why
	}
	if a.m.coil == nil && (a.Rig.Coil != nil || coilRequired(a.Rig.Rig.Kind)) {
		return nil // the coil stage has recorded why
	}
	lp := buildLoop(a)
	nom := lp.loopModel(bm.C, bm.V, a.m.coil)
	cw, vw := math.Max(bm.CWorst, bm.C), math.Max(bm.VWorst, bm.V)
	wst := lp.loopModel(cw, vw, a.m.coil)
	lt, rt := nom.L+nom.CoilL, nom.R+nom.CoilR
	lp.quantities = append(lp.quantities,
		Quantity{Name: "loop.resistance", Value: rt, Unit: "Ω", Formula: "R = ESR + R_wiring + r_T + R_coil,20",
			Inputs: []Input{{"ESR", "loop.bank_esr", lp.esr, "Ω"}, {"R_wiring", "loop.wiring_resistance", lp.wireR, "Ω"}, {"r_T", "loop.switch_resistance", lp.swR, "Ω"}, {"R_coil", "coil.resistance", nom.CoilR, "Ω"}},
			Basis:  "series circuit (Kirchhoff's voltage law)", Note: "at 20 °C: the coldest conductors give the largest current"},
		Quantity{Name: "loop.inductance", Value: lt, Unit: "H", Formula: "L = L_wiring + L_coil",
			Inputs: []Input{{"L_wiring", "loop.wiring_inductance", nom.L, "H"}, {"L_coil", "coil.inductance", nom.CoilL, "H"}},
			Basis:  "series circuit; the mutual inductance between the leads and the coil is neglected"},
	)
	if err := addAll(a, lp.quantities...); err != nil {
		return err
	}
	if !(lt > 0) {
		return pulseBounds(a, nom, wst)
	}
	loop := nom
	a.m.loop = &loop
	pn, err := RLCPulse(nom)
	if err != nil {
		return err
	}
	// The worst case is the envelope over the tolerance corners: C at −tol, nominal and +tol, V at nominal
	// and high line. +C and high line give the largest current and I²t; −C the least damping and the
	// largest reversal.
	cMin := bm.C * (1 - math.Min(math.Max(bm.Tolerance, 0), 0.99))
	var corners []PulseResult
	for _, c := range []float64{cMin, bm.C, cw} {
		for _, v := range []float64{bm.V, vw} {
			p, err := RLCPulse(lp.loopModel(c, v, a.m.coil))
			if err != nil {
				return err
			}
			corners = append(corners, p)
		}
	}
	pw := envelope(corners)
	if err := addPulseQuantities(a, nom, wst, pn, pw); err != nil {
		return err
	}
	n := 400
	if pn.HalfCycles*20 > n {
		n = min(pn.HalfCycles*20, 4000)
	}
	t, i, v := pn.Sample(n)
	a.Curves = append(a.Curves,
		Curve{Name: "pulse.current", XLabel: "time (s)", YLabel: "coil current (A)", XUnit: "s", YUnit: "A", X: t, Y: i},
		Curve{Name: "pulse.bank_voltage", XLabel: "time (s)", YLabel: "bank voltage (V)", XUnit: "s", YUnit: "V", X: t, Y: v})
	if err := assessStress(a, nom, wst, pn, pw); err != nil {
		return err
	}
	return assessCoilHeating(a, nom, pn, pw)
}

// pulseBounds reports bounds on the pulse when the loop inductance is unknown (no coil and no stray
// inductance): at the current peak di/dt = 0, so vC = R i + Vd and i_peak ≤ (V0 − Vd)/R; and the resistive
// loss cannot exceed the stored energy, so I²t ≤ ½CV0²/R.
func pulseBounds(a *Assessment, nom, wst LoopModel) error {
	rt := nom.R + nom.CoilR
	if !(rt > 0) {
		a.AddGap("wiring.stray_inductance", "neither the loop's inductance nor its resistance is known: the pulse cannot be bounded")
		return nil
	}
	a.AddGap("wiring.stray_inductance", "the loop inductance is unknown: the peak current and I²t are upper bounds and di/dt cannot be computed")
	ipk, ipkW := (nom.V0-nom.Drop)/rt, (wst.V0-wst.Drop)/rt
	i2t, i2tW := 0.5*nom.C*nom.V0*nom.V0/rt, 0.5*wst.C*wst.V0*wst.V0/rt
	in := []Input{{"V0", "bank.voltage", nom.V0, "V"}, {"C", "bank.capacitance", nom.C, "F"}, {"R", "loop.resistance", rt, "Ω"}, {"Vd", "loop.switch_drop", nom.Drop, "V"}}
	return addAll(a,
		Quantity{Name: "pulse.peak_current", Value: ipk, Worst: Worst(ipkW), Unit: "A", Formula: "i_peak ≤ (V0 − Vd)/R (upper bound, any loop inductance)",
			Inputs: in, Basis: "series R-L-C circuit: at the peak L di/dt = 0", Note: "upper bound: the loop inductance is unknown; worst case at +C tolerance and high line"},
		Quantity{Name: "pulse.i2t", Value: i2t, Worst: Worst(i2tW), Unit: "A²s", Formula: "I²t ≤ ½CV0²/R (all stored energy into R)",
			Inputs: in, Basis: "conservation of energy", Note: "upper bound: the loop inductance is unknown"},
	)
}

// envelope returns the worst of the corner pulses field by field: the largest currents, integrals, times
// and reversal, the most negative final bank voltage and the smallest damping ratio. It has no waveform.
func envelope(ps []PulseResult) PulseResult {
	e := ps[0]
	e.pieces = nil
	for _, p := range ps[1:] {
		e.Zeta = math.Min(e.Zeta, p.Zeta)
		e.PeakCurrent = math.Max(e.PeakCurrent, p.PeakCurrent)
		e.TimeToPeak = math.Max(e.TimeToPeak, p.TimeToPeak)
		e.DiDtMax = math.Max(e.DiDtMax, p.DiDtMax)
		e.FirstZero = math.Max(e.FirstZero, p.FirstZero)
		e.End = math.Max(e.End, p.End)
		e.Width = math.Max(e.Width, p.Width)
		e.VEnd = math.Min(e.VEnd, p.VEnd)
		e.Reversal = math.Max(e.Reversal, p.Reversal)
		e.SwitchI2t = math.Max(e.SwitchI2t, p.SwitchI2t)
		e.DiodeI2t = math.Max(e.DiodeI2t, p.DiodeI2t)
		e.CoilI2t = math.Max(e.CoilI2t, p.CoilI2t)
		e.BankI2t = math.Max(e.BankI2t, p.BankI2t)
		e.SwitchCharge = math.Max(e.SwitchCharge, p.SwitchCharge)
		e.CoilHeat = math.Max(e.CoilHeat, p.CoilHeat)
		e.LoopHeat = math.Max(e.LoopHeat, p.LoopHeat)
	}
	return e
}

// pulseBasis is the basis of the closed-form pulse quantities.
const pulseBasis = "series R-L-C transient in closed form (e.g. Nilsson & Riedel, Electric Circuits, ch. 8), piecewise by switch topology"

// loopInputs lists the loop values a pulse quantity depends on.
func loopInputs(l LoopModel) []Input {
	return []Input{{"C", "bank.capacitance", l.C, "F"}, {"V0", "bank.voltage", l.V0, "V"}, {"R", "loop.resistance", l.R + l.CoilR, "Ω"},
		{"L", "loop.inductance", l.L + l.CoilL, "H"}, {"Vd", "loop.switch_drop", l.Drop, "V"}}
}

// addPulseQuantities adds the pulse quantities: nominal from pn (loop nom), worst case from pw (loop wst,
// +C tolerance and high-line voltage).
func addPulseQuantities(a *Assessment, nom, wst LoopModel, pn, pw PulseResult) error {
	in := loopInputs(nom)
	corner := fmt.Sprintf("worst case: the worst over C ∈ {−tol, nominal, +tol (%.4g F)} × V0 ∈ {nominal, high line (%.4g V)}; %s, ζ = %.3g; %s switch", wst.C, wst.V0, pn.Regime, pn.Zeta, nom.Topology)
	if nom.Topology == Crowbar {
		corner += " at the " + nom.CrowbarAt
	}
	qs := []Quantity{
		{Name: "pulse.damping_ratio", Value: pn.Zeta, Worst: Worst(pw.Zeta), Unit: "1", Formula: "ζ = (R/2)√(C/L)", Inputs: in, Basis: pulseBasis,
			Note: "ζ < 1 underdamped (the bank reverses), ζ = 1 critically damped, ζ > 1 overdamped; worst case: the least damped corner (−C)"},
		{Name: "pulse.peak_current", Value: pn.PeakCurrent, Worst: Worst(pw.PeakCurrent), Unit: "A",
			Formula: "i(t) = (V0 − Vd)/L · e^{−αt} sin(ωd t)/ωd at tan(ωd t) = ωd/α (sinh/cosh forms when overdamped)", Inputs: in, Basis: pulseBasis, Note: corner},
		{Name: "pulse.time_to_peak", Value: pn.TimeToPeak, Worst: Worst(pw.TimeToPeak), Unit: "s", Formula: "t_peak = atan2(ωd, α)/ωd", Inputs: in, Basis: pulseBasis},
		{Name: "pulse.di_dt_max", Value: pn.DiDtMax, Worst: Worst(pw.DiDtMax), Unit: "A/s", Formula: "di/dt at turn-on = (V0 − Vd)/L", Inputs: in, Basis: pulseBasis,
			Note: "the largest rate of rise is at turn-on, when the whole bank voltage is across the loop inductance"},
		{Name: "pulse.i2t", Value: pn.SwitchI2t, Worst: Worst(pw.SwitchI2t), Unit: "A²s", Formula: "∫ i_switch² dt over the pulse (Gauss–Legendre on the closed form)", Inputs: in, Basis: pulseBasis,
			Note: "through the firing switch in its forward direction; " + corner},
		{Name: "coil.i2t", Value: pn.CoilI2t, Worst: Worst(pw.CoilI2t), Unit: "A²s", Formula: "∫ i_coil² dt over the pulse", Inputs: in, Basis: pulseBasis,
			Note: "includes the current that a crowbar or antiparallel diode keeps in the coil"},
		{Name: "pulse.reversal", Value: pn.Reversal, Worst: Worst(pw.Reversal), Unit: "1", Formula: "−min vC / V0",
			Inputs: in, Basis: pulseBasis, Note: "the largest reversed bank voltage as a fraction of the charge voltage; a unidirectional switch leaves the bank at it"},
		{Name: "pulse.final_bank_voltage", Value: pn.VEnd, Worst: Worst(pw.VEnd), Unit: "V", Formula: "vC at the end of conduction", Inputs: in, Basis: pulseBasis,
			Note: "negative: the bank is left reversed — it still holds charge and energy after the shot"},
		{Name: "pulse.width", Value: pn.Width, Worst: Worst(pw.Width), Unit: "s", Formula: "full width of the coil current at half its peak", Inputs: in, Basis: pulseBasis},
		{Name: "pulse.duration", Value: pn.FirstZero, Worst: Worst(pw.FirstZero), Unit: "s", Formula: "time to the first current zero (or to 1e-4 of the peak when the current decays without one)", Inputs: in, Basis: pulseBasis},
		{Name: "pulse.coil_energy", Value: pn.CoilHeat, Worst: Worst(pw.CoilHeat), Unit: "J", Formula: "R_coil,20 · ∫ i_coil² dt", Inputs: in, Basis: "Joule heating",
			Note: "at 20 °C resistance; the heating quantities use the temperature-dependent form"},
	}
	if nom.Topology == AntiparallelDiode || nom.Topology == Crowbar {
		qs = append(qs, Quantity{Name: "pulse.diode_i2t", Value: pn.DiodeI2t, Worst: Worst(pw.DiodeI2t), Unit: "A²s", Formula: "∫ i_diode² dt", Inputs: in, Basis: pulseBasis,
			Note: "through the antiparallel or crowbar diode, to compare with the diode's I²t rating"})
	}
	return addAll(a, qs...)
}
