package quantity

import "testing"

func TestApprox(t *testing.T) {
	for _, c := range []struct {
		v    float64
		u    Unit
		want string
	}{
		{0.06436782245, Volt, "64.4 mV"},
		{4700.4, Ohm, "4.7 kohm"},
		{1.015e7, Hertz, "10.15 MHz"}, // a band edge keeps its digits
		{1.0124969135755427e7, Hertz, "10.125 MHz"},
	} {
		if got := Approx(c.v, c.u); got != c.want {
			t.Errorf("Approx(%g, %v) = %q, want %q", c.v, c.u, got, c.want)
		}
	}
}

func TestFinite(t *testing.T) {
	inf, nan := 1/zero(), zero()/zero()
	for _, c := range []struct{ in, want float64 }{
		{1.5, 1.5}, {-2, -2}, {inf, 1.7976931348623157e308}, {-inf, -1.7976931348623157e308}, {nan, 0},
	} {
		if got := Finite(c.in); got != c.want {
			t.Errorf("Finite(%g) = %g, want %g", c.in, got, c.want)
		}
	}
}

func zero() float64 { return 0 }
