package reduce

import (
	"math"
	"testing"
)

func TestDivisor(t *testing.T) {
	// JCGM 100:2008 (GUM) 4.3.3 (normal: U/k), 4.3.7 (rectangular: a/sqrt3), 4.3.9 (triangular: a/sqrt6);
	// U-shaped (arcsine) a/sqrt2 (JCGM 101 / EA-4/02 for mismatch).
	cases := []struct {
		dist string
		k    float64
		want float64
		err  bool
	}{
		{"normal", 2, 2, false},
		{"normal", 1.96, 1.96, false},
		{"rectangular", 0, math.Sqrt(3), false},
		{"u-shaped", 0, math.Sqrt(2), false},
		{"triangular", 0, math.Sqrt(6), false},
		{"Rectangular", 0, math.Sqrt(3), false},
		{"normal", 0, 0, true},
		{"gaussian-ish", 2, 0, true},
	}
	for _, c := range cases {
		got, err := Divisor(c.dist, c.k)
		if (err != nil) != c.err {
			t.Errorf("Divisor(%q, %g): error %v, want error %v", c.dist, c.k, err, c.err)
			continue
		}
		if !c.err {
			near(t, "Divisor("+c.dist+")", got, c.want, 1e-15)
		}
	}
	// Standard uncertainties of the GUM examples: U = 0.30 dB at k = 2 -> 0.15 dB;
	// rectangular a = 0.1 -> 0.057735; U-shaped a = 0.1 -> 0.070711; triangular a = 0.1 -> 0.040825 (by hand).
	for _, c := range []struct {
		dist    string
		k, a, u float64
	}{
		{"normal", 2, 0.30, 0.15},
		{"rectangular", 0, 0.1, 0.0577350},
		{"u-shaped", 0, 0.1, 0.0707107},
		{"triangular", 0, 0.1, 0.0408248},
	} {
		d, _ := Divisor(c.dist, c.k)
		term := NewBudgetTerm("x", "data", c.dist, d, []float64{c.a})
		near(t, "standard "+c.dist, term.StandardDB[0], c.u, 1e-7)
	}
}

func TestMismatchLimits(t *testing.T) {
	// method.md section 6: limits 20log10(1 -/+ |Ga||Gb|). By hand:
	// |Ga| = 0.2, |Gb| = 0.1: 20log10(1.02) = +0.172003, 20log10(0.98) = -0.175478 dB.
	// |Ga| = 0.1, |Gb| = 0.03: 20log10(1.003) = +0.026019, 20log10(0.997) = -0.026096 dB.
	cases := []struct{ a, b, lo, hi float64 }{
		{0.2, 0.1, -0.175478, 0.172003},
		{0.1, 0.03, -0.026096, 0.026019},
		{0, 0.5, 0, 0},
	}
	for _, c := range cases {
		lo, hi := MismatchLimitsDB(c.a, c.b)
		near(t, "low limit", lo, c.lo, 1e-6)
		near(t, "high limit", hi, c.hi, 1e-6)
		// Half-width is the larger magnitude of the two (the low one).
		near(t, "half-width", MismatchHalfWidthDB(c.a, c.b), math.Abs(c.lo), 1e-6)
	}
}

func TestCombineBudget(t *testing.T) {
	// JCGM 100:2008 eq. (10), sensitivities 1: u_c = sqrt(sum u_i^2); U = 2 u_c.
	// Hand-worked: 0.15 (U 0.3, k 2), 0.1/sqrt3, 0.2/sqrt2 -> u_c = sqrt(0.0225 + 0.003333 + 0.02)
	// = 0.214087, U = 0.428174 dB; a zero second point gives 0.
	terms := []BudgetTerm{
		NewBudgetTerm("a", "data", "normal", 2, []float64{0.3, 0}),
		NewBudgetTerm("b", "data", "rectangular", math.Sqrt(3), []float64{0.1, 0}),
		NewBudgetTerm("c", "data", "u-shaped", math.Sqrt2, []float64{0.2, 0}),
	}
	b := CombineBudget(terms, 2, ExpandedCoverageK)
	near(t, "u_c", b.CombinedDB[0], 0.2140872, 1e-6)
	near(t, "U", b.ExpandedDB[0], 0.4281744, 1e-6)
	near(t, "U at zero point", b.ExpandedDB[1], 0, 0)
	if b.CoverageK != 2 || len(b.Terms) != 3 {
		t.Errorf("budget k %g with %d terms, want k 2 with 3 terms", b.CoverageK, len(b.Terms))
	}
}
