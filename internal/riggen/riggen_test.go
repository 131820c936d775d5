package riggen

import (
	"math/rand"
	"testing"

	"chargeward/schema"
)

// TestGeneratedRigsLoad checks the generator's contract: every rig it makes is valid input, so property
// tests built on it exercise the physics rather than the loader's error paths.
func TestGeneratedRigsLoad(t *testing.T) {
	r := rand.New(rand.NewSource(1))
	for i := 0; i < 200; i++ {
		src := Rig(r, Options{Launch: i%2 == 0, Extras: i%4 >= 2})
		if _, err := schema.LoadRig("gen.yaml", []byte(src)); err != nil {
			t.Fatalf("rig %d does not load: %v\n%s", i, err, src)
		}
	}
}
