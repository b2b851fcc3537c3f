package quantity

import (
	"math"
	"strconv"
)

// Approx writes v like Format but rounded to three significant figures, for
// messages a person reads ("64.4 mV", "4.7 kohm"); JSON carries the exact value.
// Frequencies keep six: a band edge of 10.15 MHz must not read as 10.2 MHz.
func Approx(v float64, u Unit) string {
	n := 3
	if u == Hertz {
		n = 6
	}
	a := math.Abs(v)
	if !(a > 1e-300 && a < 1e300) {
		return Format(Round(v, n), u)
	}
	// For a normal value, the rounded value's shortest digits are the n
	// rounded digits without their trailing zeros (two decimals of at most 15
	// significant figures never read as the same double), so Format(Round(v, n))
	// can be written from the rounded digits without reading them back.
	var buf [64]byte
	return string(appendFormat(buf[:0], v, u, n-1))
}

// Round rounds v to n significant figures through its decimal form.
func Round(v float64, n int) float64 {
	var buf [32]byte
	r, err := strconv.ParseFloat(string(strconv.AppendFloat(buf[:0], v, 'g', n, 64)), 64)
	if err != nil {
		return v
	}
	return r
}
