package main

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"
)

// TestBleederCommand checks the bleeder command's exit codes and outputs. Expected figures are worked from the
// request: RMax = 60 s / (1.05 · 1.2 · 1100 µF · ln(680/50)) = 16.59 kΩ for the whole chain, so 8.29 kΩ per
// resistor with two in series, whose largest E12/E24 value is 8.2 kΩ (IEC 60063).
func TestBleederCommand(t *testing.T) {
	tests := []struct {
		name     string
		args     []string
		code     int
		stdout   []string // substrings
		stderr   []string
		jsonEach float64 // for --format json: the element value of the last choice
	}{
		{"text plan", []string{"--capacitance", "1100uF", "--voltage", "680V", "--safe", "50V", "--within", "60s", "--series", "2", "--element-voltage", "350V"},
			0, []string{"Resistors in series  2 (1 per cell × 2 cells)", "16.6 kΩ", "E24    8.2 kΩ", "use 50 W"}, nil, 0},
		{"json plan", []string{"--capacitance", "1100uF", "--voltage", "680V", "--series", "2", "--format", "json"}, 0, nil, nil, 8200},
		{"power bound wins", []string{"--capacitance", "1100uF", "--voltage", "680V", "--series", "2", "--power", "2W"},
			2, []string{"lower bound: power"}, []string{"the power bound wins", "per cell"}, 0},
		{"charger bound wins", []string{"--capacitance", "1100uF", "--voltage", "680V", "--within", "10min", "--charger-current", "20mA"},
			2, nil, []string{"the charger bound wins", "a charger of at least"}, 0},
		{"NEC default above 1000 V", []string{"--capacitance", "50uF", "--voltage", "3kV"}, 0, []string{"within 300 s", "460.28(A)"}, nil, 0},
		{"missing unit", []string{"--capacitance", "1100", "--voltage", "680V"}, 2, nil, []string{"needs its unit"}, 0},
		{"missing voltage", []string{"--capacitance", "1100uF"}, 2, nil, []string{"--capacitance and --voltage are required"}, 0},
		{"below safe", []string{"--capacitance", "1100uF", "--voltage", "40V"}, 2, nil, []string{"not above the safe voltage"}, 0},
		{"stray argument", []string{"--capacitance", "1100uF", "--voltage", "680V", "rig.yaml"}, 2, nil, []string{"unexpected argument"}, 0},
		{"bad format", []string{"--capacitance", "1100uF", "--voltage", "680V", "--format", "xml"}, 2, nil, []string{"want text or json"}, 0},
		{"help", []string{"--help"}, 0, []string{"Usage: chargeward bleeder", "NEC"}, nil, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			code := run(append([]string{"bleeder"}, tc.args...), strings.NewReader(""), &out, &errb)
			if code != tc.code {
				t.Fatalf("got exit %d, want %d; stderr: %s", code, tc.code, errb.String())
			}
			for _, s := range tc.stdout {
				if !strings.Contains(out.String(), s) {
					t.Errorf("stdout: got %q, want it to contain %q", out.String(), s)
				}
			}
			for _, s := range tc.stderr {
				if !strings.Contains(errb.String(), s) {
					t.Errorf("stderr: got %q, want it to contain %q", errb.String(), s)
				}
			}
			if tc.jsonEach > 0 {
				var v struct {
					RMax    float64 `json:"resistance_max"`
					Choices []struct {
						Element    float64 `json:"element"`
						WorstTime  float64 `json:"time_to_safe_worst"`
						TimeToSafe float64 `json:"time_to_safe"`
					} `json:"choices"`
				}
				if err := json.Unmarshal(out.Bytes(), &v); err != nil {
					t.Fatalf("json: %v\n%s", err, out.String())
				}
				if len(v.Choices) == 0 || v.Choices[len(v.Choices)-1].Element != tc.jsonEach || v.Choices[0].WorstTime > 60 {
					t.Errorf("got %+v, want the last choice %g Ω within 60 s", v, tc.jsonEach)
				}
			}
		})
	}
}
