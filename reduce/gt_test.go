package reduce

import (
	"math"
	"testing"

	"gtpack.example/gtpack/ingest"
)

func TestGTForms(t *testing.T) {
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		// method.md section 4, worked check: RL 52.0 dB, NF_sys 38.5 dB -> -11.124 dB/K.
		{"system noise figure form", GTSystemNoiseFigure(52.0, 38.5), -11.124, 5e-4},
		// Hand-worked from first principles (method.md section 4, N_out = k*T_sys*G_rx):
		// G_p = 30 dBi, G_rx = 40 dB, T_sys = 500 K. N_out = 10log10(1.380649e-23*500*1e4*1e3)
		// = -131.609467 dBm/Hz; G_aut = 70 dBi; G/T must equal 30 - 10log10(500) = 3.010300 dB/K.
		{"noise density form", GTNoiseDensity(70, NoiseRelativeFromDensityDB(-131.60946713)), 3.0103, 1e-6},
		// The same point stated in dB above kT0: N_rel = -131.609467 + 173.975187 = 42.365720 dB.
		{"N_rel from dBm/Hz", NoiseRelativeFromDensityDB(-131.60946713), 42.36572006, 1e-7},
		{"noise relative form", GTNoiseDensity(70, 42.36572006), 3.0103, 1e-6},
	}
	for _, c := range cases {
		near(t, c.name, c.got, c.want, c.tol)
	}
}

func TestGTFormsAgreeWhenConsistent(t *testing.T) {
	// method.md section 4: NF_sys = N_out/(k*T0*|S21_sys|^2), so N_rel = NF_sys + S21,dB and
	// both forms give the same G/T. Inputs built from one physical model per row (by hand).
	for _, c := range []struct{ rl, s21, nRel float64 }{
		{52.0, 18.0, 42.3657},
		{48.7, 21.3, 40.1},
		{60.2, 5.5, 36.0},
	} {
		gain := GainDBi(c.s21, c.rl)
		nf := c.nRel - c.s21
		a, b := GTNoiseDensity(gain, c.nRel), GTSystemNoiseFigure(c.rl, nf)
		if math.Abs(a-b) > 0.01 {
			t.Errorf("RL %g S21 %g: noise-density form %.4f and noise-figure form %.4f differ by more than 0.01 dB", c.rl, c.s21, a, b)
		}
	}
}

func TestYFactor(t *testing.T) {
	// Y-factor method (method.md section 2; any microwave text, e.g. Pozar ch. on noise):
	// T_e = (T_hot - Y*T_cold)/(Y - 1). Textbook-style examples worked by hand:
	// a receiver with T_e = 160 K gives Y = (2900+160)/(290+160) = 6.8 with loads 2900 K/290 K;
	// T_e = 75 K with loads 9460 K (ENR about 15 dB) / 290 K gives Y = 9535/365 = 26.1233.
	cases := []struct{ hot, cold, y, want float64 }{
		{2900, 290, 6.8, 160},
		{9460, 290, 9535.0 / 365.0, 75},
		{373, 77, (373.0 + 50) / (77 + 50), 50},
	}
	for _, c := range cases {
		near(t, "YFactorTe", YFactorTe(c.hot, c.cold, c.y), c.want, 1e-9)
	}
	if !math.IsNaN(YFactorTe(290, 290, 1)) {
		t.Error("Y = 1 must give NaN (the loads were not told apart)")
	}
	// NF = 10log10(1 + T_e/T0); 3.0103 dB (a factor of 2) is T_e = 290 K (general knowledge).
	near(t, "NoiseFigureDB(290 K)", NoiseFigureDB(290), 10*math.Log10(2), 1e-12)
	// NF 3 dB -> T_e = 290*(10^0.3 - 1) = 288.626 K (by hand).
	near(t, "NoiseTemperatureK(3 dB)", NoiseTemperatureK(3), 288.626071, 1e-6)
}

func TestAmbientHalfWidth(t *testing.T) {
	// method.md section 4: |10log10(T_amb/290)|; 22.8 degC = 295.95 K -> 0.088204 dB (by hand).
	near(t, "22.8 degC", AmbientHalfWidthDB(22.8+CelsiusOffsetK), 0.0882037, 1e-6)
	near(t, "290 K", AmbientHalfWidthDB(290), 0, 1e-15)
	// Symmetric in the sense of magnitude: 270 K -> |10log10(270/290)| = 0.31034 dB (by hand).
	near(t, "270 K", AmbientHalfWidthDB(270), 0.3103423, 1e-6)
}

// The G/T a reduced unit carries is exactly what the named functions of
// method.md section 4 give for its own gain, range loss and noise: the
// reduction calls them, there is no other copy of the formula.
func TestReducedGTIsTheNamedFormula(t *testing.T) {
	a, err := ingest.Open("../sample-archive")
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, u := range a.Units {
		r := u.Acceptance()
		data, probs := a.Load(r)
		res := ReduceUnit(Input{Run: r, Data: data, Station: a.Stations[r.Station], Reference: a.References[r.Reference],
			Spec: a.Specs[r.Product], Problems: probs})
		for _, b := range res.Beams {
			if b.GTForm != FormNoiseDensity || len(b.NoiseRelativeKT0DB) != len(b.GTdBPerK) {
				continue
			}
			for i, gt := range b.GTdBPerK {
				if want := GTNoiseDensity(b.GainDBi[i], b.NoiseRelativeKT0DB[i]); gt != want {
					t.Fatalf("%s %s point %d: G/T %v, GTNoiseDensity gives %v", u.Serial, b.ID, i, gt, want)
				}
				checked++
			}
		}
	}
	if checked < 1000 {
		t.Fatalf("only %d points checked", checked)
	}
}
