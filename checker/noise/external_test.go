package noise

import (
	"math"
	"testing"
)

// Fam from the P.372 parameters against the computed table of REFERENCES-2
// §2.4 ([C] from the P.372 parameters, [S]), to its printed 0.1 dB. The
// galactic column is checked through quiet-rural, where it dominates at and
// above 3.6 MHz.
func TestExternalNoiseTable(t *testing.T) {
	rows := []struct {
		f                             float64
		city, res, rural, quiet, galc float64
	}{
		{1.9, 69.1, 64.8, 59.5, 45.6, 45.6},
		{3.6, 61.4, 57.1, 51.8, 37.7, 39.2},
		{7.1, 53.2, 48.9, 43.6, 29.3, 32.4},
		{14.2, 44.9, 40.6, 35.3, 20.6, 25.5},
		{21.2, 40.1, 35.8, 30.5, 15.7, 21.5},
		{28.5, 36.5, 32.2, 26.9, 12.0, 18.5},
		{50.1, 29.7, 25.4, 20.1, 5.0, 12.9},
		{144.3, 17.0, 12.7, 7.4, -8.2, 2.3},
	}
	for _, r := range rows {
		f := r.f * 1e6
		for env, want := range map[string]float64{"city": r.city, "residential": r.res, "rural": r.rural} {
			got, gal, err := External(env, f)
			if err != nil || gal || math.Abs(got-want) > 0.051 {
				t.Errorf("%s at %g MHz: Fam %.2f (galactic %v, %v), want %.1f", env, r.f, got, gal, err, want)
			}
		}
		got, _, err := External("quiet-rural", f)
		if want := math.Max(r.quiet, r.galc); err != nil || math.Abs(got-want) > 0.051 {
			t.Errorf("quiet-rural at %g MHz: %.2f, want the larger of %.1f and galactic %.1f", r.f, got, r.quiet, r.galc)
		}
	}
	if _, _, err := External("residential", 400e6); err == nil {
		t.Error("400 MHz is outside the curves and gave no error")
	}
	if _, _, err := External("suburban", 14e6); err == nil {
		t.Error("an unknown environment gave no error")
	}
}

// The largest NF that costs at most 1 dB of external-noise-limited SNR,
// against REFERENCES-2 §2.4's second table ([C]); fa per column.
func TestAllowedNFTable(t *testing.T) {
	for _, v := range []struct{ famDB, want float64 }{
		{57.1, 51.2}, {40.6, 34.7}, {32.2, 26.3}, {25.4, 19.6}, {12.7, 7.6}, // residential 3.6–144.3 MHz
		{20.6, 14.9}, {12.0, 7.1}, {5.0, 2.6}, {-8.2, 0.2}, // quiet rural 14.2–144.3 MHz
		{25.5, 19.7}, {2.3, 1.6}, // galactic 14.2 and 144.3 MHz
	} {
		fa := math.Pow(10, v.famDB/10)
		if got := AllowedNF(fa, 1); math.Abs(got-v.want) > 0.11 {
			t.Errorf("Fam %.1f dB: allowed NF %.2f dB, want %.1f", v.famDB, got, v.want)
		}
		// Rise is AllowedNF's inverse.
		if r := Rise(fa, math.Pow(10, AllowedNF(fa, 1)/10)); math.Abs(r-1) > 1e-9 {
			t.Errorf("Fam %.1f dB: rise at the allowed NF %.9f dB, want 1", v.famDB, r)
		}
	}
}
