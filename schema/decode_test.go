package schema

import (
	"reflect"
	"testing"
)

// policyLike exercises the field kinds a policy or rulebook file needs beyond the rig's.
type policyLike struct {
	Name       string             `yaml:"name"`
	Limit      float64            `yaml:"limit" unit:"V"`
	Ratio      *float64           `yaml:"ratio"`
	Tags       []string           `yaml:"tags" enum:"a|b|c"`
	Thresholds map[string]float64 `yaml:"thresholds" unit:"J"`
	Entries    map[string]entry   `yaml:"entries"`
	Enabled    bool               `yaml:"enabled"`
}

type entry struct {
	Value *float64 `yaml:"value" unit:"s"`
	Basis string   `yaml:"basis"`
}

func TestDecodeGeneralKinds(t *testing.T) {
	src := "name: site\nlimit: 50 V\nratio: 0.25\ntags: [a, c]\nthresholds: {shock: 1 J, burn: 10 kJ}\n" +
		"entries:\n  safe_time:\n    value: 10 s\n    basis: common practice\nenabled: true\n"
	root, ds := ReadYAML("p.yaml", []byte(src))
	if len(ds) > 0 {
		t.Fatal(ds)
	}
	var got policyLike
	pos := map[string]Pos{}
	if ds := Decode("p.yaml", root, &got, DecodeOptions{}, pos); len(ds) > 0 {
		t.Fatalf("got %v, want no diagnostics", ds)
	}
	ratio, ten := 0.25, 10.0
	want := policyLike{Name: "site", Limit: 50, Ratio: &ratio, Tags: []string{"a", "c"},
		Thresholds: map[string]float64{"shock": 1, "burn": 10e3},
		Entries:    map[string]entry{"safe_time": {Value: &ten, Basis: "common practice"}}, Enabled: true}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("got %+v, want %+v", got, want)
	}
	for path, p := range map[string]Pos{"thresholds.burn": {5, 32}, "entries.safe_time.value": {8, 12}, "tags[1]": {4, 11}} {
		if pos[path] != p {
			t.Errorf("got %s at %+v, want %+v", path, pos[path], p)
		}
	}
}

func TestDecodeGeneralKindsErrors(t *testing.T) {
	cases := []struct {
		name, src, code string
		line, col       int
	}{
		{"enum in a list", "tags: [a, d]\n", "FIELD-ENUM", 1, 11},
		{"unit in a map value", "thresholds: {shock: 1 V}\n", "UNIT-DIMENSION", 1, 23},
		{"unit-less number given a unit", "ratio: 2 V\n", "UNIT-DIMENSION", 1, 10},
		{"unknown key in a map entry", "entries: {x: {valeu: 1 s}}\n", "FIELD-UNKNOWN", 1, 15},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			root, ds := ReadYAML("p.yaml", []byte(c.src))
			if len(ds) > 0 {
				t.Fatal(ds)
			}
			var got policyLike
			ds = Decode("p.yaml", root, &got, DecodeOptions{}, nil)
			if len(ds) != 1 || ds[0].Code != c.code || ds[0].Line != c.line || ds[0].Column != c.col {
				t.Errorf("got %v, want one %s at %d:%d", ds, c.code, c.line, c.col)
			}
		})
	}
}

func TestDecodeUnsupportedTargetIsADiagnostic(t *testing.T) {
	root, _ := ReadYAML("p.yaml", []byte("x: 1\n"))
	var notStruct int
	if ds := Decode("p.yaml", root, &notStruct, DecodeOptions{}, nil); len(ds) != 1 || ds[0].Code != "INTERNAL" {
		t.Errorf("got %v, want one INTERNAL diagnostic and no panic", ds)
	}
	var odd struct {
		C complex128 `yaml:"x"`
	}
	if ds := Decode("p.yaml", root, &odd, DecodeOptions{}, nil); len(ds) != 1 || ds[0].Code != "INTERNAL" {
		t.Errorf("got %v, want one INTERNAL diagnostic and no panic", ds)
	}
}
