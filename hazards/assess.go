package hazards

import (
	"fmt"

	"chargeward/schema"
)

// stage is one concern of the physics. Stages run in order; each reads the rig and the models earlier stages
// left on the assessment, adds its quantities, curves and gaps, and may leave its own model for later stages.
type stage struct {
	name string
	run  func(a *Assessment) error
}

// stages lists the physics in dependency order. Owners (see DEVELOPERS.md):
//
//	supply, bank, discharge — supply.go, bank.go, discharge.go (electrical physics)
//	coil, pulse             — coil.go, pulse.go (pulse and coil)
//	launch, field           — launch.go, field.go (launch simulation and field)
var stages = []stage{
	{"supply", assessSupply},
	{"bank", assessBank},
	{"discharge", assessDischarge},
	{"coil", assessCoil},
	{"pulse", assessPulse},
	{"launch", assessLaunch},
	{"field", assessField},
}

// Assess computes every quantity for rig against the targets. It returns an error only for a physics state
// the models cannot handle (an impossible geometry, a simulation that does not converge within its bounds);
// information the rig does not state becomes a Gap, never an error and never a safe default.
func Assess(rig *schema.Rig, t Targets) (*Assessment, error) {
	a := &Assessment{Rig: rig, Targets: t}
	for _, s := range stages {
		if err := s.run(a); err != nil {
			return nil, fmt.Errorf("%s: %w", s.name, err)
		}
	}
	return a, nil
}

// Models left by the stages for later stages. Each owner may add fields to its own model type, which is
// declared in the owner's file; the fields below are the contract that later stages rely on.
type models struct {
	bank *BankModel // set by assessBank when the bank is computable
	coil *CoilModel // set by assessCoil when the coil is computable
	loop *LoopModel // set by assessPulse when the discharge loop is computable
}
