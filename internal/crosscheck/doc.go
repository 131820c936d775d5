// Package crosscheck holds no code of its own: its tests load each demo rig through schema.LoadRig, run
// hazards.Assess and the default rulebook, and compare the key quantities and judgements against closed forms
// computed independently in the tests (Wheeler 1928, ASTM B258, IEC 60949, the series R-L-C response, the
// on-axis field of a loop, ballistics). The rig inputs are written out in the tests as read from the YAML
// files, so a loader, unit or physics defect anywhere in the pipeline shows as a disagreement.
package crosscheck
