package check

import "testing"

// BenchmarkTankTuningCost checks the shipped 40 m JFET stage with a tuned
// drain transformer (testdata/circuits/cs-tank-40m.toml) in the worst case
// with every rule and with every rule but tank.tuning, in one run, and
// reports the ratio: what judging the tank's loaded resonance (and checking
// its fixes on the whole circuit) adds to a worst-case check.
func BenchmarkTankTuningCost(b *testing.B) {
	ruleCost(b, "../../testdata/circuits/cs-tank-40m.toml", "x-without-tank", "tank.tuning")
}
