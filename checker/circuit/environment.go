package circuit

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"headroom/checker/circuit/tomlfile"
)

// Environments are the values of [circuit] environment: the man-made noise
// environments of ITU-R P.372 (docs/noise.md), quietest last.
var Environments = []string{"city", "residential", "rural", "quiet-rural"}

// DefaultEnvironment is the environment of a circuit that names none.
const DefaultEnvironment = "residential"

func environmentList() string {
	q := make([]string, len(Environments))
	for i, e := range Environments {
		q[i] = strconv.Quote(e)
	}
	return strings.Join(q, ", ")
}

// parseLevel reads a power level written as a string in dBm ("-10dBm",
// "+3 dBm"). The unit is required: a bare number could be dBW or volts.
func parseLevel(raw any) (float64, error) {
	s, ok := raw.(string)
	if !ok {
		return 0, fmt.Errorf(`expected a level in dBm as a string, as in "-10dBm", got %s`, tomlfile.TypeName(raw))
	}
	num, found := strings.CutSuffix(strings.TrimSpace(s), "dBm")
	if !found {
		return 0, fmt.Errorf(`%q needs its unit dBm, as in "-10dBm"`, s)
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(num), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf(`%q is not a finite level in dBm, as in "-10dBm"`, s)
	}
	if v < -300 || v > 300 {
		return 0, fmt.Errorf("%q is outside -300 to +300 dBm", s)
	}
	return v, nil
}
