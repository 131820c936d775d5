package schema

import (
	"bytes"
	"flag"
	"os"
	"testing"
)

var update = flag.Bool("update", false, "rewrite schema/rig.schema.json from the struct tags")

// TestSchemaFileInSync keeps the embedded rig.schema.json identical to the schema generated from the Rig
// struct tags and the field descriptions. Run 'go test ./schema -run TestSchemaFileInSync -update' after
// changing the rig model.
func TestSchemaFileInSync(t *testing.T) {
	got, err := GenerateRigSchema()
	if err != nil {
		t.Fatalf("GenerateRigSchema: %v", err)
	}
	if *update {
		if err := os.WriteFile("rig.schema.json", got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	if !bytes.Equal(got, RigSchemaJSON) {
		t.Errorf("got embedded rig.schema.json out of date, want the generated schema; run go test ./schema -run TestSchemaFileInSync -update")
	}
}
