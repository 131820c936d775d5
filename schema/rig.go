package schema

// This file is the typed rig model: the contract between the loader and every later stage.
//
// Conventions (binding for the loader, the JSON Schema and every consumer):
//   - Every physical value is a *float64 in SI base units (F, V, A, Ω, H, s, m, kg, J, W, Hz, T, K, A²s, A/s,
//     m/s, rad). nil means "not stated in the rig file"; consumers must never read nil as zero or as safe.
//   - Temperatures are stored in kelvin (°C inputs are converted: θ[K] = θ[°C] + 273.15).
//   - Fractions (tolerances, regulation, "%") are stored as plain fractions: "10 %" is 0.10.
//   - Mass is stored in kilograms (the unit parser accepts g, so "12 g" is 0.012).
//   - The struct tag `unit:"..."` states the dimension the field takes; the loader and the JSON Schema are
//     generated from or checked against these tags. `yaml:"..." json:"...,omitempty"` is the key in the rig file.
//   - Enumerations are strings; the accepted values are listed in each field's `enum:"a|b|c"` tag.
//   - Counts are *int; booleans are *bool (nil = not stated).

// Rig is one rig description, in SI units, with the source positions of every value.
type Rig struct {
	Rig          Info          `yaml:"rig" json:"rig,omitempty"`
	Supply       *Supply       `yaml:"supply" json:"supply,omitempty"`
	Bank         Bank          `yaml:"bank" json:"bank,omitempty"`
	Bleeder      *Bleeder      `yaml:"bleeder" json:"bleeder,omitempty"` // nil: the rig states no bleeder
	Dump         *Dump         `yaml:"dump" json:"dump,omitempty"`       // nil: no automatic dump circuit
	Switch       *Switch       `yaml:"switch" json:"switch,omitempty"`
	Coil         *Coil         `yaml:"coil" json:"coil,omitempty"`
	Wiring       *Wiring       `yaml:"wiring" json:"wiring,omitempty"`
	Projectile   *Projectile   `yaml:"projectile" json:"projectile,omitempty"`
	Room         *Room         `yaml:"room" json:"room,omitempty"`
	Controls     *Controls     `yaml:"controls" json:"controls,omitempty"`
	Measurements *Measurements `yaml:"measurements" json:"measurements,omitempty"`

	// Source is where the rig came from; filled by the loader, not read from YAML.
	Source Source `yaml:"-" json:"-"`
}

// Source records the file a rig was read from and the position of every value in it.
type Source struct {
	File string // file name as given on the command line, "-" or "<stdin>" for standard input
	Raw  []byte // the bytes as read, for the report's appendix and the fingerprint
	// Pos maps a dotted field path ("bank.capacitance", "supply.transformers[0].secondary_voltage")
	// to the position of its value (for a section, the position of its key).
	Pos map[string]Pos
}

// Pos is a 1-based line and column in a source file.
type Pos struct {
	Line, Column int
}

// Info identifies the rig and its setting.
type Info struct {
	Name     string `yaml:"name" json:"name,omitempty"`         // required
	Owner    string `yaml:"owner" json:"owner,omitempty"`       // person responsible for the rig
	Location string `yaml:"location" json:"location,omitempty"` // room or bench
	Purpose  string `yaml:"purpose" json:"purpose,omitempty"`
	Revision string `yaml:"revision" json:"revision,omitempty"` // required; a review is valid for one revision only
	Kind     string `yaml:"kind" json:"kind,omitempty" enum:"disc-thrower|ring-jumper|magnetizer|cd-welder|flash-bank|coil-accelerator|other"`
	// AudienceDistance is the distance from the rig to the nearest onlooker, m.
	AudienceDistance *float64 `yaml:"audience_distance" json:"audience_distance,omitempty" unit:"m"`
}

// Supply is the charger: mains, transformers, rectifier, charging resistor.
type Supply struct {
	Kind string `yaml:"kind" json:"kind,omitempty" enum:"mains-rectifier|dc-supply"` // default mains-rectifier

	MainsVoltage   *float64 `yaml:"mains_voltage" json:"mains_voltage,omitempty" unit:"V"`      // RMS line voltage
	MainsFrequency *float64 `yaml:"mains_frequency" json:"mains_frequency,omitempty" unit:"Hz"` // default 50 Hz
	// MainsTolerance is the high-line excursion as a fraction; default 0.10 (+10 %).
	MainsTolerance *float64 `yaml:"mains_tolerance" json:"mains_tolerance,omitempty" unit:"1"`

	Transformers []Transformer `yaml:"transformers" json:"transformers,omitempty"` // empty: rectifier fed straight from the mains
	Secondaries  string        `yaml:"secondaries" json:"secondaries,omitempty" enum:"series|parallel|single"`

	Rectifier string   `yaml:"rectifier" json:"rectifier,omitempty" enum:"half-wave|bridge|doubler|multiplier"`
	Stages    *int     `yaml:"stages" json:"stages,omitempty"`                                // multiplier stages (a doubler is one stage)
	DiodeDrop *float64 `yaml:"diode_drop" json:"diode_drop,omitempty" unit:"V"`               // forward drop per diode; default 1 V
	DCVoltage *float64 `yaml:"dc_voltage" json:"dc_voltage,omitempty" unit:"V"`               // for kind dc-supply: its maximum output
	DCCurrent *float64 `yaml:"current_limit" json:"current_limit,omitempty" unit:"A"`         // for kind dc-supply: its current limit
	Regulated *float64 `yaml:"regulated_voltage" json:"regulated_voltage,omitempty" unit:"V"` // a regulated charge voltage, if any

	ChargingResistor *float64 `yaml:"charging_resistor" json:"charging_resistor,omitempty" unit:"Ω"` // nil: none stated
	// ChargingResistorPower is the charging resistor's power rating, W.
	ChargingResistorPower *float64 `yaml:"charging_resistor_power" json:"charging_resistor_power,omitempty" unit:"W"`

	// Isolation is how the charger is separated from the bank before anyone approaches:
	// "interlocked" (opened automatically by the enclosure or firing interlock), "unplugged" (mains plug
	// removed by procedure), "switched" (a manual switch), "stays-connected" (nothing separates it).
	Isolation string `yaml:"isolation" json:"isolation,omitempty" enum:"interlocked|unplugged|switched|stays-connected"`
}

// Transformer is one mains transformer.
type Transformer struct {
	PrimaryVoltage   *float64 `yaml:"primary_voltage" json:"primary_voltage,omitempty" unit:"V"`     // RMS rated primary
	SecondaryVoltage *float64 `yaml:"secondary_voltage" json:"secondary_voltage,omitempty" unit:"V"` // RMS rated secondary at full load
	// Regulation is the no-load rise of the secondary above its rated value, as a fraction (0.08 = 8 %).
	Regulation *float64 `yaml:"regulation" json:"regulation,omitempty" unit:"1"`
	Rating     *float64 `yaml:"rating" json:"rating,omitempty" unit:"VA"` // apparent power rating, VA
	Count      *int     `yaml:"count" json:"count,omitempty"`             // identical units; default 1
}

// Bank is the capacitor bank: identical cells, Series in each string, Parallel strings.
type Bank struct {
	Capacitance          *float64 `yaml:"capacitance" json:"capacitance,omitempty" unit:"F"`                     // per cell, required
	CapacitanceTolerance *float64 `yaml:"capacitance_tolerance" json:"capacitance_tolerance,omitempty" unit:"1"` // ± fraction; default 0.20
	VoltageRating        *float64 `yaml:"voltage_rating" json:"voltage_rating,omitempty" unit:"V"`               // per cell, required
	Dielectric           string   `yaml:"dielectric" json:"dielectric,omitempty" enum:"aluminium-electrolytic|film-polypropylene|film-polyester|paper-oil|ceramic-c0g|ceramic-x7r|tantalum"`
	ESR                  *float64 `yaml:"esr" json:"esr,omitempty" unit:"Ω"`                                 // per cell
	Leakage              *float64 `yaml:"leakage" json:"leakage,omitempty" unit:"A"`                         // per cell, at rated voltage
	PeakCurrent          *float64 `yaml:"peak_current_rating" json:"peak_current_rating,omitempty" unit:"A"` // per cell
	Series               *int     `yaml:"series" json:"series,omitempty"`                                    // default 1
	Parallel             *int     `yaml:"parallel" json:"parallel,omitempty"`                                // default 1
	// LeakageSpread is the fractional spread of leakage between cells (0.5 = one cell leaks 50 % more),
	// used for the voltage-sharing worst case; default by dielectric.
	LeakageSpread *float64   `yaml:"leakage_spread" json:"leakage_spread,omitempty" unit:"1"`
	Balancing     *Balancing `yaml:"balancing" json:"balancing,omitempty"` // nil: series cells without balancing resistors
	// PulseRated states whether the cells are rated for pulse discharge (pulse or "energy discharge"
	// types). Nil: not stated.
	PulseRated *bool `yaml:"pulse_rated" json:"pulse_rated,omitempty"`
}

// Balancing is a resistor across each series cell.
type Balancing struct {
	Resistance    *float64 `yaml:"resistance" json:"resistance,omitempty" unit:"Ω"`
	Tolerance     *float64 `yaml:"tolerance" json:"tolerance,omitempty" unit:"1"` // default 0.05
	PowerRating   *float64 `yaml:"power_rating" json:"power_rating,omitempty" unit:"W"`
	VoltageRating *float64 `yaml:"voltage_rating" json:"voltage_rating,omitempty" unit:"V"` // element voltage rating
}

// Bleeder is the permanent discharge resistance across the whole bank: Count chains in parallel, each of
// ElementsInSeries identical resistors.
type Bleeder struct {
	Resistance       *float64 `yaml:"resistance" json:"resistance,omitempty" unit:"Ω"`        // one element
	ElementsInSeries *int     `yaml:"elements_in_series" json:"elements_in_series,omitempty"` // default 1
	Count            *int     `yaml:"count" json:"count,omitempty"`                           // parallel chains; default 1
	PowerRating      *float64 `yaml:"power_rating" json:"power_rating,omitempty" unit:"W"`
	VoltageRating    *float64 `yaml:"voltage_rating" json:"voltage_rating,omitempty" unit:"V"` // element voltage rating
	Tolerance        *float64 `yaml:"tolerance" json:"tolerance,omitempty" unit:"1"`           // default 0.05
}

// Dump is an automatic (or manual) discharge resistor switched across the bank.
type Dump struct {
	Resistance   *float64 `yaml:"resistance" json:"resistance,omitempty" unit:"Ω"`
	EnergyRating *float64 `yaml:"energy_rating" json:"energy_rating,omitempty" unit:"J"` // pulse energy rating of the resistor
	PowerRating  *float64 `yaml:"power_rating" json:"power_rating,omitempty" unit:"W"`
	// Switching is how the dump engages: "normally-closed-relay" (closes on loss of power or when the
	// enclosure opens), "manual" (a person must operate it), "on-command" (closed by the controller).
	Switching string `yaml:"switching" json:"switching,omitempty" enum:"normally-closed-relay|manual|on-command"`
	FailSafe  *bool  `yaml:"fail_safe" json:"fail_safe,omitempty"` // engages if its own control fails
}

// Switch is the firing switch.
type Switch struct {
	Kind string `yaml:"kind" json:"kind,omitempty" enum:"thyristor|igbt|spark-gap|relay|mosfet|ignitron"`
	// Topology: "unidirectional" (stops at the first current zero), "antiparallel-diode" (rings down),
	// "crowbar" (a diode clamps the coil once the bank voltage reverses).
	Topology   string   `yaml:"topology" json:"topology,omitempty" enum:"unidirectional|antiparallel-diode|crowbar"`
	CrowbarAt  string   `yaml:"crowbar_at" json:"crowbar_at,omitempty" enum:"coil|bank"`     // where the crowbar diode sits; default coil
	Blocking   *float64 `yaml:"blocking_voltage" json:"blocking_voltage,omitempty" unit:"V"` // VDRM/VRRM or the gap's hold-off
	Surge      *float64 `yaml:"surge_current" json:"surge_current,omitempty" unit:"A"`       // ITSM, peak of one half-sine
	SurgePulse *float64 `yaml:"surge_pulse" json:"surge_pulse,omitempty" unit:"s"`           // base of the surge rating; default 10 ms
	I2t        *float64 `yaml:"i2t_rating" json:"i2t_rating,omitempty" unit:"A²s"`
	DiDt       *float64 `yaml:"di_dt_critical" json:"di_dt_critical,omitempty" unit:"A/s"` // (di/dt)cr
	OnResist   *float64 `yaml:"on_resistance" json:"on_resistance,omitempty" unit:"Ω"`     // slope resistance
	Drop       *float64 `yaml:"forward_drop" json:"forward_drop,omitempty" unit:"V"`       // threshold / arc drop
	RemoteFire *bool    `yaml:"remote_fire" json:"remote_fire,omitempty"`                  // fired from a distance (see controls)
}

// Coil is the work coil.
type Coil struct {
	Form          string   `yaml:"form" json:"form,omitempty" enum:"flat-spiral|solenoid|measured"`
	Turns         *int     `yaml:"turns" json:"turns,omitempty"`                            // total turns
	Layers        *int     `yaml:"layers" json:"layers,omitempty"`                          // solenoid layers; default 1
	InnerDiameter *float64 `yaml:"inner_diameter" json:"inner_diameter,omitempty" unit:"m"` // spiral inner / solenoid bore
	OuterDiameter *float64 `yaml:"outer_diameter" json:"outer_diameter,omitempty" unit:"m"` // spiral outer (solenoid: optional)
	Length        *float64 `yaml:"length" json:"length,omitempty" unit:"m"`                 // solenoid winding length
	WireGauge     *int     `yaml:"wire_gauge" json:"wire_gauge,omitempty"`                  // AWG number
	WireDiameter  *float64 `yaml:"wire_diameter" json:"wire_diameter,omitempty" unit:"m"`   // bare conductor diameter (overrides gauge)
	Insulation    *float64 `yaml:"insulation_thickness" json:"insulation_thickness,omitempty" unit:"m"`
	Material      string   `yaml:"material" json:"material,omitempty" enum:"copper|aluminium"`
	// InsulationClass is the thermal class limit as a temperature (K); the loader also accepts the IEC 60085
	// letters A (105 °C), E (120 °C), B (130 °C), F (155 °C), H (180 °C).
	InsulationClass *float64 `yaml:"insulation_class" json:"insulation_class,omitempty" unit:"K"`
	Inductance      *float64 `yaml:"measured_inductance" json:"measured_inductance,omitempty" unit:"H"`
	Resistance      *float64 `yaml:"measured_resistance" json:"measured_resistance,omitempty" unit:"Ω"`
	Ambient         *float64 `yaml:"ambient_temperature" json:"ambient_temperature,omitempty" unit:"K"` // default 20 °C
}

// Wiring is the loop between bank, switch and coil.
type Wiring struct {
	Length          *float64 `yaml:"length" json:"length,omitempty" unit:"m"`                // total conductor length, out and back
	CrossSection    *float64 `yaml:"cross_section" json:"cross_section,omitempty" unit:"m²"` // copper section of each conductor
	Separation      *float64 `yaml:"separation" json:"separation,omitempty" unit:"m"`        // centre spacing of the go and return
	StrayInductance *float64 `yaml:"stray_inductance" json:"stray_inductance,omitempty" unit:"H"`
	Resistance      *float64 `yaml:"resistance" json:"resistance,omitempty" unit:"Ω"`
}

// Projectile is the conducting disc, ring or slug driven by the coil.
type Projectile struct {
	Kind          string   `yaml:"kind" json:"kind,omitempty" enum:"disc|ring|slug"`
	Material      string   `yaml:"material" json:"material,omitempty" enum:"aluminium-1100|aluminium-6061|aluminium-1350|copper|brass|steel|other"`
	Resistivity   *float64 `yaml:"resistivity" json:"resistivity,omitempty" unit:"Ω·m"` // overrides the material table
	Density       *float64 `yaml:"density" json:"density,omitempty" unit:"kg/m³"`       // overrides the material table
	OuterDiameter *float64 `yaml:"outer_diameter" json:"outer_diameter,omitempty" unit:"m"`
	InnerDiameter *float64 `yaml:"inner_diameter" json:"inner_diameter,omitempty" unit:"m"` // ring bore; 0 or nil for a disc
	Thickness     *float64 `yaml:"thickness" json:"thickness,omitempty" unit:"m"`           // axial thickness
	Mass          *float64 `yaml:"mass" json:"mass,omitempty" unit:"kg"`                    // measured; overrides geometry × density
	Payload       *float64 `yaml:"payload_mass" json:"payload_mass,omitempty" unit:"kg"`    // carried on the disc
	Gap           *float64 `yaml:"gap" json:"gap,omitempty" unit:"m"`                       // coil surface to disc underside at rest
	Filaments     *int     `yaml:"filaments" json:"filaments,omitempty"`                    // requested radial division; default chosen
}

// Room is where the rig is fired.
type Room struct {
	CeilingHeight *float64 `yaml:"ceiling_height" json:"ceiling_height,omitempty" unit:"m"` // above the coil face
	LaunchAxis    string   `yaml:"launch_axis" json:"launch_axis,omitempty" enum:"vertical|horizontal|tilted"`
	Tilt          *float64 `yaml:"tilt" json:"tilt,omitempty" unit:"rad"` // worst-case tilt from vertical; default 5°
	// Guard: "none", "tube" (guide tube or cage around the flight path), "enclosure" (whole rig enclosed).
	Guard string `yaml:"guard" json:"guard,omitempty" enum:"none|tube|enclosure"`
}

// Controls are the organisational and physical safeguards.
type Controls struct {
	Enclosure        string   `yaml:"enclosure" json:"enclosure,omitempty" enum:"none|partial|full"`
	Interlock        *bool    `yaml:"interlock" json:"interlock,omitempty"`                 // opening the enclosure disconnects and dumps
	ChargedIndicator *bool    `yaml:"charged_indicator" json:"charged_indicator,omitempty"` // lamp lit while the bank holds charge
	RemoteFiring     *float64 `yaml:"remote_firing_distance" json:"remote_firing_distance,omitempty" unit:"m"`
	GroundingHook    *bool    `yaml:"grounding_hook" json:"grounding_hook,omitempty"` // shorting stick or grounding hook at hand
	// EyeProtection is the rating of the eye protection worn by everyone in the zone.
	EyeProtection     string   `yaml:"eye_protection" json:"eye_protection,omitempty" enum:"none|spectacles|goggles|faceshield"`
	HearingProtection *bool    `yaml:"hearing_protection" json:"hearing_protection,omitempty"`
	ExclusionZone     *float64 `yaml:"exclusion_zone" json:"exclusion_zone,omitempty" unit:"m"` // radius kept clear during firing
	ImplantWarning    *bool    `yaml:"implant_warning" json:"implant_warning,omitempty"`        // sign asking implant wearers to stay back
	MainsIsolation    string   `yaml:"mains_isolation" json:"mains_isolation,omitempty" enum:"rcd|isolating-transformer|none"`
	KeySwitch         *bool    `yaml:"key_switch" json:"key_switch,omitempty"`
	// Discharge is how the bank is discharged before anyone handles it.
	Discharge         string `yaml:"discharge_method" json:"discharge_method,omitempty" enum:"wait-for-bleeder|dump-resistor|shorting-stick|grounding-hook|touch|screwdriver|none"`
	VerifyBeforeTouch *bool  `yaml:"verify_with_meter" json:"verify_with_meter,omitempty"` // bank voltage measured before touching
	// Supervised says whether a qualified person is present at every firing.
	Supervised *bool `yaml:"supervised" json:"supervised,omitempty"`
}

// Measurements are values measured on the real rig, compared with the predictions.
type Measurements struct {
	ChargeVoltage *float64 `yaml:"charge_voltage" json:"charge_voltage,omitempty" unit:"V"`
	DecayTime     *float64 `yaml:"decay_time" json:"decay_time,omitempty" unit:"s"` // time to fall to DecayTo
	DecayTo       *float64 `yaml:"decay_to" json:"decay_to,omitempty" unit:"V"`     // default: the policy's safe voltage
	LaunchHeight  *float64 `yaml:"launch_height" json:"launch_height,omitempty" unit:"m"`
	Date          string   `yaml:"date" json:"date,omitempty"`
}
