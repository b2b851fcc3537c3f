package quantity

import "math"

// Finite returns x, or the nearest finite stand-in for Inf and 0 for NaN,
// so that a document never prints a non-finite number (FORMAT.md §6). The
// analyses keep their figures finite; this is the last guard before output.
func Finite(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return 0
	case math.IsInf(x, 1):
		return math.MaxFloat64
	case math.IsInf(x, -1):
		return -math.MaxFloat64
	}
	return x
}
