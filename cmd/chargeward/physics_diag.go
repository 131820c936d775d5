package main

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"chargeward/schema"
)

// CodePhysics is the diagnostic code of a rig that loads but describes a state the models cannot handle
// (an impossible geometry, a value that overflows a formula, a simulation that does not finish within its
// bounds). Like any bad input it exits 2 and writes nothing.
const CodePhysics = "PHYSICS-MODEL"

// stageSection is where a physics stage's inputs mostly live, for errors that name no field.
var stageSection = map[string]string{
	"supply": "supply", "bank": "bank", "discharge": "bleeder", "coil": "coil", "pulse": "switch",
	"launch": "projectile", "field": "coil",
}

// physicsDiagnostic turns an error of hazards.Assess (or of the evaluation) into a positioned diagnostic:
// at the rig field the message names (the longest dotted path of the rig found in it), else at the section
// of the stage that failed, else at the top of the file.
func physicsDiagnostic(rig *schema.Rig, err error) schema.Diagnostic {
	msg := err.Error()
	d := schema.Diagnostic{Severity: schema.SeverityError, Code: CodePhysics, File: rig.Source.File, Line: 1, Column: 1,
		Summary: "the models cannot handle this rig: " + msg,
		Detail:  "Nothing was written. Check the value marked here and the values it combines with; a state outside the models' range is refused, never guessed."}
	best := ""
	for path := range rig.Source.Pos {
		if len(path) > len(best) && containsPath(msg, path) {
			best = path
		}
	}
	if best == "" {
		stage, _, _ := strings.Cut(msg, ":")
		if sec, ok := stageSection[stage]; ok {
			if _, ok := rig.Source.Pos[sec]; ok {
				best = sec
			}
		}
	}
	if p, ok := rig.Source.Pos[best]; ok && best != "" {
		d.Line, d.Column, d.Path = p.Line, p.Column, best
	}
	return d
}

// containsPath reports whether msg names path as a whole dotted name (not "coil.turns" inside
// "coil.turns_per_layer").
func containsPath(msg, path string) bool {
	for i := 0; ; {
		j := strings.Index(msg[i:], path)
		if j < 0 {
			return false
		}
		j += i
		end := j + len(path)
		before := j == 0 || !isNameByte(msg[j-1])
		after := end == len(msg) || !isNameByte(msg[end]) && !(msg[end] == '.' && end+1 < len(msg) && isNameByte(msg[end+1]))
		if before && after {
			return true
		}
		i = j + 1
	}
}

func isNameByte(c byte) bool {
	return c == '_' || c == '.' || c >= 'a' && c <= 'z' || c >= '0' && c <= '9'
}

// reportPhysics prints the physics diagnostic of a rig with its source line.
func reportPhysics(w io.Writer, name string, rig *schema.Rig, err error) {
	var ds schema.Diagnostics
	if !errors.As(err, &ds) { // rules' evaluation errors come positioned in their rulebook
		ds = schema.Diagnostics{physicsDiagnostic(rig, err)}
	}
	if rerr := ds.Render(w, map[string][]byte{rig.Source.File: rig.Source.Raw}); rerr != nil {
		fmt.Fprintf(w, "%s: %v\n", name, err)
	}
}
