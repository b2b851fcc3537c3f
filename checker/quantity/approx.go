package quantity

import "strconv"

// Approx writes v like Format but rounded to three significant figures, for
// messages a person reads ("64.4 mV", "4.7 kohm"); JSON carries the exact value.
// Frequencies keep six: a band edge of 10.15 MHz must not read as 10.2 MHz.
func Approx(v float64, u Unit) string {
	if u == Hertz {
		return Format(Round(v, 6), u)
	}
	return Format(Round(v, 3), u)
}

// Round rounds v to n significant figures through its decimal form.
func Round(v float64, n int) float64 {
	r, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', n, 64), 64)
	if err != nil {
		return v
	}
	return r
}
