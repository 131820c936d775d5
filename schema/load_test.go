package schema

import (
	"io/fs"
	"strings"
	"testing"

	"chargeward"
)

// TestLoadDemoRigs loads every shipped demo rig: each must load without a diagnostic and carry the values
// its file states, converted to SI.
func TestLoadDemoRigs(t *testing.T) {
	names, err := fs.Glob(chargeward.Demos, "testdata/rigs/*.yaml")
	if err != nil || len(names) < 3 {
		t.Fatalf("got %d demo rigs (%v), want at least 3", len(names), err)
	}
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			data, err := fs.ReadFile(chargeward.Demos, name)
			if err != nil {
				t.Fatal(err)
			}
			r, err := LoadRig(name, data)
			if err != nil {
				t.Fatalf("got error %v, want none", err)
			}
			if r.Rig.Name == "" || r.Rig.Revision == "" || r.Bank.Capacitance == nil || r.Bank.VoltageRating == nil {
				t.Errorf("got rig %+v, want name, revision, capacitance and voltage rating set", r.Rig)
			}
			if string(r.Source.Raw) != string(data) || r.Source.File != name {
				t.Errorf("got source %q, want the file's bytes and name", r.Source.File)
			}
			if p := r.Source.Pos["bank.capacitance"]; p.Line == 0 || !strings.Contains(strings.Split(string(data), "\n")[p.Line-1], "capacitance:") {
				t.Errorf("got bank.capacitance at %+v, want the line that states it", p)
			}
		})
	}
}

// TestLoadDiscThrowerValues checks the SI conversion of a few stated values of the disc-thrower demo (the
// expected values are the file's own numbers with the SI prefixes applied, BIPM SI Brochure 9th ed. Table 7).
func TestLoadDiscThrowerValues(t *testing.T) {
	data, err := fs.ReadFile(chargeward.Demos, "testdata/rigs/disc-thrower.yaml")
	if err != nil {
		t.Fatal(err)
	}
	r, err := LoadRig("disc-thrower.yaml", data)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		got  *float64
		want float64
	}{
		{"bank.capacitance 2200 uF", r.Bank.Capacitance, 2200e-6},
		{"bank.esr 45 mΩ", r.Bank.ESR, 45e-3},
		{"bank.capacitance_tolerance 20 %", r.Bank.CapacitanceTolerance, 0.20},
		{"switch.i2t_rating 51 kA²s", r.Switch.I2t, 51e3},
		{"switch.di_dt_critical 150 A/us", r.Switch.DiDt, 150e6},
		{"coil.insulation_class B = 130 °C", r.Coil.InsulationClass, 130 + 273.15},
		{"wiring.cross_section 6 mm²", r.Wiring.CrossSection, 6e-6},
		{"supply.charging_resistor 1 kΩ", r.Supply.ChargingResistor, 1e3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.got == nil {
				t.Fatalf("got nil, want %g", c.want)
			}
			// Exact: the loader applies decimal prefixes by shifting the decimal exponent, so the result is the
			// double nearest the decimal value, as is the Go constant it is compared with.
			if *c.got != c.want {
				t.Errorf("got %.17g, want %.17g", *c.got, c.want)
			}
		})
	}
	if r.Dump != nil {
		t.Errorf("got dump %+v, want nil (the file states none)", r.Dump)
	}
}

func BenchmarkLoadRig(b *testing.B) {
	data, err := fs.ReadFile(chargeward.Demos, "testdata/rigs/disc-thrower.yaml")
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := LoadRig("disc-thrower.yaml", data); err != nil {
			b.Fatal(err)
		}
	}
}
