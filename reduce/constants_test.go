package reduce

import (
	"math"
	"testing"
)

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > tol {
		t.Errorf("%s = %.9g, want %.9g (tolerance %g)", what, got, want, tol)
	}
}

func TestConstants(t *testing.T) {
	// SI Brochure, 9th ed. (BIPM 2019), Table 1: k = 1.380 649 x 10^-23 J/K exactly.
	if BoltzmannJPerK != 1.380649e-23 {
		t.Errorf("k = %g, want exactly 1.380649e-23", BoltzmannJPerK)
	}
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		// k*T0 = 1.380649e-23 * 290 = 4.0038821e-21 W/Hz (exact k times T0, by hand).
		{"kT0 W/Hz", KT0WPerHz(), 4.0038821e-21, 1e-30},
		// 10*log10(4.0038821e-18 mW/Hz) = -173.97519 dBm/Hz (method.md section 2: -173.975).
		{"kT0 dBm/Hz", KT0DBmPerHz(), -173.975187, 1e-6},
		// 10*log10(290) = 24.624 dB (general knowledge; method.md section 2).
		{"10log10(290)", ReferenceTemperatureDBK(), 24.624, 5e-4},
		// 10/ln(10) = 4.343 (the radiometer figure of method.md section 5).
		{"10/ln10", DBPerNeperPower, 4.3429448, 1e-7},
	}
	for _, c := range cases {
		near(t, c.name, c.got, c.want, c.tol)
	}
}
