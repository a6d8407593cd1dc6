package reduce

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestRobustScatterRecoversSigma(t *testing.T) {
	// method.md section 5: sigma = 1.4826*MAD(first differences)/sqrt(2) is consistent for
	// white normal noise. Seeded synthetic noise of known sigma, on a slow ripple (which first
	// differences remove) and with a few spikes (which the median ignores).
	for _, c := range []struct {
		sigma  float64
		spikes bool
	}{{0.05, false}, {0.2, false}, {0.1, true}} {
		rng := rand.New(rand.NewPCG(1, uint64(c.sigma*1000)))
		n := 20001
		v := make([]float64, n)
		for i := range v {
			v[i] = -120 + 0.5*math.Sin(float64(i)/800) + c.sigma*rng.NormFloat64()
			if c.spikes && i%500 == 0 {
				v[i] += 5
			}
		}
		got := RobustScatterDB(v)
		// With 20000 differences the estimator's relative standard error is about 1.2 %;
		// 4 % is more than three of those.
		if math.Abs(got/c.sigma-1) > 0.04 {
			t.Errorf("sigma %g (spikes %v): robust scatter %.5f, want within 4 %%", c.sigma, c.spikes, got)
		}
	}
}

func TestRobustScatterSmallAndExact(t *testing.T) {
	// Fewer than three values: no estimate (0), documented.
	near(t, "two values", RobustScatterDB([]float64{1, 2}), 0, 0)
	// A straight line has constant differences: MAD 0, scatter 0 (by hand).
	near(t, "line", RobustScatterDB([]float64{1, 2, 3, 4, 5}), 0, 1e-15)
	// Alternating +-a: differences +-2a, median 0 (even count -> mean of -2a and 2a),
	// MAD = 2a, sigma = 1.4826*2a/sqrt2 (by hand): a = 0.1 -> 0.209672.
	near(t, "alternating", RobustScatterDB([]float64{0.1, -0.1, 0.1, -0.1, 0.1}), 1.4826*0.2/math.Sqrt2, 1e-12)
}

func TestRadiometer(t *testing.T) {
	// Dicke's radiometer equation (method.md section 5): u = 4.343/sqrt(B*tau).
	// B = 1 MHz, tau = 10 ms: B*tau = 1e4, u = 0.04343 dB (by hand).
	near(t, "1 MHz, 10 ms", RadiometerDB(1e6, 0.01), 0.0434294, 1e-7)
	near(t, "not given", RadiometerDB(0, 0.01), 0, 0)
	// Smoothing over n points divides sigma by sqrt(n) (method.md section 5).
	near(t, "smoothed 4", SmoothedScatterDB(0.2, 4), 0.1, 1e-15)
	near(t, "no smoothing", SmoothedScatterDB(0.2, NoSmoothing), 0.2, 0)
}
