// Package properties holds property tests of the whole pipeline over randomly generated valid rigs
// (internal/riggen): load → assess → evaluate → render. The properties are physical or logical invariants,
// not expected values: nothing non-finite reaches an output, the worst case is never better than the
// nominal value, removing a control or lowering a rating never improves the verdict, and the launch
// model's energy accounts balance.
package properties

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/rand"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"

	"chargeward/hazards"
	"chargeward/internal/riggen"
	"chargeward/report"
	"chargeward/rules"
	"chargeward/schema"
)

// Directions: +1 larger is worse, −1 smaller is worse, 0 descriptive (the quantity's worst case is the
// corner chosen for a related hazard; neither direction is worse in itself, so none is checked).
const (
	larger  = +1
	smaller = -1
	either  = 0
)

// direction says, for every quantity that has a worst case, which way is worse. A quantity with a worst
// case missing here fails the test, so that the table stays complete.
var direction = map[string]int{
	// Stored energy and charge, voltages on the bank and its cells, the shorted-cell energy: more energy
	// or voltage is a larger shock, arc and rating hazard (DESIGN.md §4.2; worst case is +C, high line).
	"bank.capacitance": larger, "bank.charge": larger, "bank.energy": larger, "bank.voltage": larger,
	"bank.cell_voltage_max": larger, "bank.shorted_cell_energy": larger,
	// Margins against a rating: a smaller margin is closer to failure.
	"bank.voltage_margin": smaller, "bank.cell_voltage_margin": smaller,
	// Dissipation, voltage and current in resistors and their fraction of the rating: more stress is worse.
	"balancing.power": larger, "balancing.power_fraction": larger,
	"bleeder.power": larger, "bleeder.power_fraction": larger, "bleeder.total_power": larger,
	"bleeder.element_voltage": larger, "bleeder.element_voltage_fraction": larger,
	"dump.energy": larger, "dump.energy_fraction": larger, "dump.peak_current": larger, "dump.peak_power": larger,
	"supply.charging_loss": larger, "supply.charging_resistor_peak_power": larger,
	"supply.charging_resistor_mean_power": larger, "supply.charging_resistor_power_fraction": larger,
	"supply.inrush_current": larger, "supply.peak_voltage": larger,
	// Discharge: a slower discharge leaves the bank dangerous for longer; recovered voltage is a hazard.
	"discharge.time_constant": larger, "discharge.time_to_safe": larger, "discharge.time_to_safe_single_fault": larger,
	"discharge.absorption_recovery": larger, "dump.time_constant": larger, "dump.time_to_safe": larger,
	// The bleeder's own resistance: its worst case is the corner that makes the discharge slowest.
	"bleeder.resistance": larger,
	// Pulse stress on the switch, the cells and the coil: more current, faster rise, more action integral,
	// more reversal, more energy in the coil are worse; so are their ratios to the ratings.
	"pulse.peak_current": larger, "pulse.di_dt_max": larger, "pulse.i2t": larger, "pulse.diode_i2t": larger,
	"pulse.reversal": larger, "pulse.coil_energy": larger, "pulse.cell_peak_current": larger,
	"pulse.cell_peak_current_ratio": larger, "pulse.cell_reverse_voltage": larger, "pulse.cell_reverse_ratio": larger,
	"switch.di_dt_ratio": larger, "switch.i2t_ratio": larger, "switch.surge_i2t_ratio": larger, "switch.surge_ratio": larger,
	"switch.voltage_ratio": larger, "switch.pulse_to_rating_duration": larger,
	// Less damping rings more (larger reversal); the signed final bank voltage is more negative when more
	// of the charge comes back reversed.
	"pulse.damping_ratio": smaller, "pulse.final_bank_voltage": smaller,
	// Pulse timing is descriptive: the worst corner is taken for the current, and its time to peak, width
	// and duration follow from it.
	"pulse.time_to_peak": either, "pulse.width": either, "pulse.duration": either,
	// Charging time is descriptive: a slower charge is not itself a hazard.
	"supply.charge_time_constant": either, "supply.time_to_95": either,
	// Heating: a larger rise or final temperature is worse; fewer shots before the insulation class is
	// reached is worse.
	"coil.temperature_rise": larger, "coil.final_temperature": larger, "coil.i2t": larger,
	"coil.shots_to_class": smaller, "projectile.temperature_rise": larger,
	// The flying projectile: faster, higher, harder, farther is worse; less time before it strikes the
	// ceiling is worse.
	"launch.speed": larger, "launch.kinetic_energy": larger, "launch.momentum": larger, "launch.height": larger,
	"launch.peak_force": larger, "launch.peak_acceleration": larger, "launch.peak_current_with_projectile": larger,
	"launch.ceiling_impact_speed": larger, "launch.exclusion_radius": larger, "launch.time_to_ceiling": smaller,
	// Field: a stronger field reaches implanted devices farther away.
	"field.peak_flux_density": larger, "field.implant_distance": larger,
}

// generated is one generated rig through the pipeline.
type generated struct {
	name string
	src  string
	rig  *schema.Rig
	a    *hazards.Assessment
	rv   *rules.Review
}

// judge runs assess and evaluate as the check command does: against the policy's targets, and again
// with the targets of the bank's voltage class when they differ.
func judge(rig *schema.Rig, set *rules.Set) (*hazards.Assessment, *rules.Review, error) {
	rv, err := set.Judge(rig)
	if err != nil {
		return nil, nil, err
	}
	return rv.Assessment, rv, nil
}

func generate(t *testing.T, seed int64, n int) []generated {
	t.Helper()
	set, err := rules.Default()
	if err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewSource(seed))
	var out []generated
	for i := range n {
		g := generated{name: fmt.Sprintf("gen-%d-%d.yaml", seed, i), src: riggen.Rig(r, riggen.Options{Launch: i%3 != 2, Extras: i%2 == 1})}
		g.rig, err = schema.LoadRig(g.name, []byte(g.src))
		if err != nil {
			t.Fatalf("%s: the generator made a rig the loader refuses: %v\n%s", g.name, err, g.src)
		}
		g.a, g.rv, err = judge(g.rig, set)
		if err != nil {
			t.Fatalf("%s: a valid generated rig failed: %v\n%s", g.name, err, g.src)
		}
		out = append(out, g)
	}
	return out
}

func count(short, long int) int {
	if testing.Short() {
		return short
	}
	return long
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// nonFiniteWord finds "NaN" or "Inf" as a word of s that the rig text itself does not contain.
var nonFiniteWord = regexp.MustCompile(`\b(NaN|[+-]?Inf(inity)?)\b`)

// TestNoNonFiniteOutput checks that no NaN or infinity reaches any output: quantity values, worst cases
// and inputs, curves, finding messages, the text and JSON renderings, and (for a few rigs) the PDF's
// rendering without error; and that every quantity carries its unit, formula and basis.
func TestNoNonFiniteOutput(t *testing.T) {
	opt := report.Options{Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC), Version: "test"}
	for i, g := range generate(t, 1, count(10, 60)) {
		t.Run(g.name, func(t *testing.T) {
			for _, q := range g.a.Quantities {
				if !finite(q.Value) || (q.Worst != nil && !finite(*q.Worst)) {
					t.Errorf("got %s = %v (worst %v), want finite", q.Name, q.Value, q.Worst)
				}
				// DESIGN.md §4: every computed quantity carries its unit, formula and basis.
				if q.Unit == "" || q.Formula == "" || q.Basis == "" {
					t.Errorf("got %s with unit %q, formula %q, basis %q; want all three", q.Name, q.Unit, q.Formula, q.Basis)
				}
				for _, in := range q.Inputs {
					if !finite(in.Value) {
						t.Errorf("got input %s of %s = %v, want finite", in.Name, q.Name, in.Value)
					}
				}
			}
			for _, c := range g.a.Curves {
				for k := range c.X {
					if !finite(c.X[k]) || !finite(c.Y[k]) {
						t.Fatalf("got curve %s point %d = (%v, %v), want finite", c.Name, k, c.X[k], c.Y[k])
					}
				}
			}
			for _, f := range g.rv.Findings {
				if strings.Contains(f.Message, "not finite") || nonFiniteWord.MatchString(f.Message) {
					t.Errorf("got finding %s message %q, want finite numbers", f.Rule, f.Message)
				}
			}
			var text, js bytes.Buffer
			if err := report.Text(&text, g.rv, opt); err != nil {
				t.Fatal(err)
			}
			if err := report.JSON(&js, g.rv, opt); err != nil {
				t.Fatal(err)
			}
			if !json.Valid(js.Bytes()) {
				t.Fatal("got invalid JSON")
			}
			for _, out := range []struct{ kind, s string }{{"text", text.String()}, {"JSON", js.String()}} {
				if m := nonFiniteWord.FindString(out.s); m != "" && !strings.Contains(g.src, m) {
					t.Errorf("got %q in the %s output, want finite numbers", m, out.kind)
				}
			}
			if i < count(2, 6) {
				var pdf bytes.Buffer
				if err := report.PDF(&pdf, g.rv, opt); err != nil {
					t.Fatalf("PDF: %v", err)
				}
			}
		})
	}
}

// TestWorstNeverBetter checks every worst case against its nominal value in the direction of the table.
// Tolerance: 1e-9 relative, for worst cases computed through a different but equal expression (the mean
// charging-resistor power at +C has C cancel in W/t and lands one unit in the last place below nominal).
func TestWorstNeverBetter(t *testing.T) {
	const rel = 1e-9
	for _, g := range generate(t, 2, count(10, 60)) {
		for _, q := range g.a.Quantities {
			if q.Worst == nil {
				continue
			}
			d, ok := direction[q.Name]
			if !ok {
				t.Errorf("%s: got quantity %s with a worst case and no direction, want it in the table", g.name, q.Name)
				continue
			}
			w, v := *q.Worst, q.Value
			if scalar.EqualWithinAbsOrRel(w, v, 1e-300, rel) {
				continue
			}
			if (d == larger && w < v) || (d == smaller && w > v) {
				t.Errorf("%s: got %s worst %.6g better than nominal %.6g (worse is %s)", g.name, q.Name, w, v, map[int]string{larger: "larger", smaller: "smaller"}[d])
			}
		}
	}
}

// mutation makes a rig less safe: it removes a control or lowers a rating. It reports false when the rig
// has nothing to change.
type mutation struct {
	name  string
	apply func(r *schema.Rig) bool
}

// removesPart names the mutations that remove a part. Findings about the part itself go with it (a
// bleeder's over-voltage), replaced by one saying it is missing: only the verdict is compared.
var removesPart = map[string]bool{"no bleeder": true, "no dump": true, "no controls section": true}

func falsify(p **bool) bool {
	if *p == nil || !**p {
		return false
	}
	f := false
	*p = &f
	return true
}

func halve(p **float64) bool {
	if *p == nil {
		return false
	}
	v := **p / 2
	*p = &v
	return true
}

var mutations = []mutation{
	{"no interlock", func(r *schema.Rig) bool { return r.Controls != nil && falsify(&r.Controls.Interlock) }},
	{"no charged indicator", func(r *schema.Rig) bool { return r.Controls != nil && falsify(&r.Controls.ChargedIndicator) }},
	{"no grounding hook", func(r *schema.Rig) bool { return r.Controls != nil && falsify(&r.Controls.GroundingHook) }},
	{"no hearing protection", func(r *schema.Rig) bool { return r.Controls != nil && falsify(&r.Controls.HearingProtection) }},
	{"no eye protection", func(r *schema.Rig) bool {
		if r.Controls == nil || r.Controls.EyeProtection == "none" {
			return false
		}
		r.Controls.EyeProtection = "none"
		return true
	}},
	{"no enclosure", func(r *schema.Rig) bool {
		if r.Controls == nil || r.Controls.Enclosure == "none" {
			return false
		}
		r.Controls.Enclosure = "none"
		return true
	}},
	{"discharge by touching", func(r *schema.Rig) bool {
		if r.Controls == nil || r.Controls.Discharge == "touch" {
			return false
		}
		r.Controls.Discharge = "touch"
		return true
	}},
	{"charger stays connected", func(r *schema.Rig) bool {
		if r.Supply == nil || r.Supply.Isolation == "stays-connected" {
			return false
		}
		r.Supply.Isolation = "stays-connected"
		return true
	}},
	{"no bleeder", func(r *schema.Rig) bool { ok := r.Bleeder != nil; r.Bleeder = nil; return ok }},
	{"no dump", func(r *schema.Rig) bool { ok := r.Dump != nil; r.Dump = nil; return ok }},
	{"no controls section", func(r *schema.Rig) bool { ok := r.Controls != nil; r.Controls = nil; return ok }},
	{"bank voltage rating halved", func(r *schema.Rig) bool { return halve(&r.Bank.VoltageRating) }},
	{"bank peak current rating halved", func(r *schema.Rig) bool { return halve(&r.Bank.PeakCurrent) }},
	{"bleeder power rating halved", func(r *schema.Rig) bool { return r.Bleeder != nil && halve(&r.Bleeder.PowerRating) }},
	{"bleeder voltage rating halved", func(r *schema.Rig) bool { return r.Bleeder != nil && halve(&r.Bleeder.VoltageRating) }},
	{"switch blocking voltage halved", func(r *schema.Rig) bool { return r.Switch != nil && halve(&r.Switch.Blocking) }},
	{"switch surge current halved", func(r *schema.Rig) bool { return r.Switch != nil && halve(&r.Switch.Surge) }},
	{"switch I²t rating halved", func(r *schema.Rig) bool { return r.Switch != nil && halve(&r.Switch.I2t) }},
	{"switch di/dt rating halved", func(r *schema.Rig) bool { return r.Switch != nil && halve(&r.Switch.DiDt) }},
	{"dump energy rating halved", func(r *schema.Rig) bool { return r.Dump != nil && halve(&r.Dump.EnergyRating) }},
}

// TestVerdictMonotone removes one control or lowers one rating at a time and checks that the verdict
// never improves (NotReady > ReadyWithControls > Ready) and, where no part is removed, that no must-fix
// finding goes away.
func TestVerdictMonotone(t *testing.T) {
	set, err := rules.Default()
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, g := range generate(t, 3, count(6, 30)) {
		mustFix := func(rv *rules.Review) map[string]bool {
			m := map[string]bool{}
			for _, f := range rv.Findings {
				if f.Disposition == rules.MustFix {
					m[f.Rule] = true
				}
			}
			return m
		}
		base := mustFix(g.rv)
		for _, m := range mutations {
			rig, err := schema.LoadRig(g.name, []byte(g.src)) // a fresh copy
			if err != nil {
				t.Fatal(err)
			}
			if !m.apply(rig) {
				continue
			}
			_, rv, err := judge(rig, set)
			if err != nil {
				t.Errorf("%s, %s: got error %v, want a review", g.name, m.name, err)
				continue
			}
			checked++
			if rv.Verdict < g.rv.Verdict {
				t.Errorf("%s, %s: got verdict %s, want no better than %s", g.name, m.name, rv.Verdict, g.rv.Verdict)
			}
			if removesPart[m.name] {
				continue
			}
			after := mustFix(rv)
			for id := range base {
				if !after[id] {
					t.Errorf("%s, %s: must-fix finding %s went away", g.name, m.name, id)
				}
			}
		}
	}
	if checked == 0 {
		t.Fatal("got no mutation applied, want some")
	}
	t.Logf("%d mutated reviews checked", checked)
}

// balanceNote reads the energy accounts the launch stage writes beside launch.efficiency.
var balanceNote = regexp.MustCompile(`energy balance: (\S+) J left in the bank, (\S+) J lost in the loop, (\S+) J heating the projectile, (\S+) J still in the fields`)

// TestLaunchEnergyAccounts checks conservation of energy in what the launch stage reports: the energy
// left in the bank, lost in the loop, heating the projectile, still in the fields and the kinetic energy
// never add up to more than the stored energy, and when the projectile flies what is missing is at most
// its potential energy at the top of its flight (m g h). Tolerance: 0.5 % of the stored energy, the
// launch model's own energy-balance tolerance (hazards TestLaunchEnergyBalance), plus 0.5 % of each
// account, which the note prints to three significant figures.
func TestLaunchEnergyAccounts(t *testing.T) {
	flew := 0
	for _, g := range generate(t, 4, count(8, 40)) {
		eff, ok := g.a.Q("launch.efficiency")
		if !ok {
			continue
		}
		m := balanceNote.FindStringSubmatch(eff.Note)
		if m == nil {
			t.Fatalf("%s: got launch.efficiency note %q, want its energy accounts", g.name, eff.Note)
		}
		var sum, rounding float64
		for _, s := range m[1:] {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || v < -1e-9 {
				t.Fatalf("%s: got account %q, want a non-negative number", g.name, s)
			}
			sum += v
			rounding += 0.005 * math.Abs(v)
		}
		var stored, kinetic float64
		for _, in := range eff.Inputs {
			switch in.Symbol {
			case "W":
				stored = in.Value
			case "E":
				kinetic = in.Value
			}
		}
		if stored <= 0 {
			t.Fatalf("%s: got stored energy %g, want positive", g.name, stored)
		}
		sum += kinetic
		tol := 0.005*stored + rounding
		if sum > stored+tol {
			t.Errorf("%s: got accounts %.6g J against %.6g J stored, want no more than stored (±%.3g J)", g.name, sum, stored, tol)
		}
		v, _ := g.a.Q("launch.speed")
		h, _ := g.a.Q("launch.height")
		if v.Value > 0 {
			flew++
			mass := 2 * kinetic / (v.Value * v.Value)
			if missing := stored - sum; missing > mass*9.80665*h.Value+tol {
				t.Errorf("%s: got %.6g J unaccounted, want at most m g h = %.6g J (±%.3g J)", g.name, missing, mass*9.80665*h.Value, tol)
			}
		}
	}
	if flew == 0 {
		t.Fatal("got no generated projectile that flew, want some")
	}
}
