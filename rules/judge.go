package rules

import (
	"chargeward/hazards"
	"chargeward/schema"
)

// Judge computes a rig's hazards against the policy's targets and evaluates the rulebook over them. The time
// allowed to reach the safe voltage depends on the bank's voltage class (NFPA 70 (NEC) 460.6(A) up to
// 1000 V, 460.28(A) above), which is known only once the bank is computed: a rig whose worst-case bank
// voltage falls in another class than the default targets assume is assessed again with its own targets.
// An error is a physics state the models cannot handle (hazards.Assess) or an evaluation failure.
func (s *Set) Judge(rig *schema.Rig) (*Review, error) {
	t := s.Targets()
	a, err := hazards.Assess(rig, t)
	if err != nil {
		return nil, err
	}
	if q, ok := a.Q("bank.voltage"); ok {
		v := q.Value
		if q.Worst != nil {
			v = *q.Worst
		}
		if t2 := s.TargetsFor(v); t2.TimeAllowed != t.TimeAllowed {
			if a, err = hazards.Assess(rig, t2); err != nil {
				return nil, err
			}
		}
	}
	return s.Evaluate(a)
}
