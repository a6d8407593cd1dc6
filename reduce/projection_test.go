package reduce

import (
	"math"
	"strings"
	"testing"
)

// chamberBeam makes the chamber G/T of an antenna with passive gain gpDBi,
// receiver noise teK and chamber antenna temperature tAmbK:
// G/T = G_p/(T_amb + T_e) (method.md section 4).
func chamberBeam(gpDBi, tAmbK float64, teK []float64) *Beam {
	b := &Beam{ID: "b00"}
	for i, te := range teK {
		b.FrequencyHz = append(b.FrequencyHz, 11e9+float64(i)*0.5e9)
		b.GTdBPerK = append(b.GTdBPerK, gpDBi-10*math.Log10(tAmbK+te))
	}
	return b
}

func TestProjectRecoversReceiverNoise(t *testing.T) {
	// G_p = 30 dBi (1000), T_amb = 295 K, T_e = 100, 150, 200 K; projected to
	// T_A,op = 50 K: (G/T)_op = 30 - 10*log10(50 + T_e), by hand:
	//   T_e = 100: 30 - 10*log10(150) = 30 - 21.760913 = 8.239087 dB/K
	//   T_e = 150: 30 - 10*log10(200) = 30 - 23.010300 = 6.989700 dB/K
	//   T_e = 200: 30 - 10*log10(250) = 30 - 23.979400 = 6.020600 dB/K
	te := []float64{100, 150, 200}
	want := []float64{8.239087, 6.989700, 6.020600}
	p := Project(chamberBeam(30, 295, te), 30, 295, 50)
	if !p.Usable() {
		t.Fatalf("projection not usable: %+v", p)
	}
	for k := range te {
		if math.Abs(p.ReceiverNoiseK[k]-te[k]) > 1e-9 {
			t.Errorf("T_e[%d] = %.12f, want %g", k, p.ReceiverNoiseK[k], te[k])
		}
		if math.Abs(p.SystemNoiseK[k]-(295+te[k])) > 1e-9 {
			t.Errorf("T_sys[%d] = %.12f, want %g", k, p.SystemNoiseK[k], 295+te[k])
		}
		if math.Abs(p.OperatingGTdBPerK[k]-want[k]) > 1e-6 {
			t.Errorf("(G/T)_op[%d] = %.6f, want %.6f", k, p.OperatingGTdBPerK[k], want[k])
		}
	}
	for _, s := range []string{"30.00 dBi", "295.0 K", "50.0 K", "Derived"} {
		if !strings.Contains(p.Assumptions, s) {
			t.Errorf("assumptions lack %q: %s", s, p.Assumptions)
		}
	}
	// Projecting back to the chamber temperature gives the chamber G/T.
	b := chamberBeam(30, 295, te)
	back := Project(b, 30, 295, 295)
	for k := range te {
		if math.Abs(back.OperatingGTdBPerK[k]-b.GTdBPerK[k]) > 1e-9 {
			t.Errorf("round trip[%d] = %g, want %g", k, back.OperatingGTdBPerK[k], b.GTdBPerK[k])
		}
	}
}

func TestProjectNegativeReceiverNoise(t *testing.T) {
	// The measured G/T belongs to G_p = 30 dBi, but 20 dBi is declared:
	// T_sys = 100/10^(G/T/10) = (295 + T_e)/10, so T_e = T_sys - 295 < 0 at
	// every point (e.g. T_e = 100: T_sys = 39.5 K, T_e = -255.5 K).
	b := chamberBeam(30, 295, []float64{100, 150})
	p := Project(b, 20, 295, 50)
	if p == nil {
		t.Fatal("nil projection")
	}
	if p.Usable() || p.OperatingGTdBPerK != nil {
		t.Errorf("usable with negative T_e: %+v", p)
	}
	if len(p.NegativeReceiverNoiseHz) != 2 || p.NegativeReceiverNoiseHz[0] != 11e9 {
		t.Errorf("negative at %v, want both frequencies", p.NegativeReceiverNoiseHz)
	}
	if math.Abs(p.ReceiverNoiseK[0]-(-255.5)) > 1e-9 {
		t.Errorf("T_e[0] = %g, want -255.5", p.ReceiverNoiseK[0])
	}
	if !strings.Contains(p.Assumptions, "Not projected") {
		t.Errorf("assumptions do not say why: %s", p.Assumptions)
	}
}

func TestProjectUnusableInputs(t *testing.T) {
	good := chamberBeam(30, 295, []float64{100})
	cases := []struct {
		name              string
		b                 *Beam
		gp, tAmb, tOpKelv float64
	}{
		{"nil beam", nil, 30, 295, 50},
		{"no G/T", &Beam{}, 30, 295, 50},
		{"lengths differ", &Beam{FrequencyHz: []float64{1, 2}, GTdBPerK: []float64{1}}, 30, 295, 50},
		{"NaN G/T", &Beam{FrequencyHz: []float64{1}, GTdBPerK: []float64{math.NaN()}}, 30, 295, 50},
		{"NaN gain", good, math.NaN(), 295, 50},
		{"zero chamber temperature", good, 30, 0, 50},
		{"zero operating temperature", good, 30, 295, 0},
		{"infinite operating temperature", good, 30, 295, math.Inf(1)},
	}
	for _, c := range cases {
		if p := Project(c.b, c.gp, c.tAmb, c.tOpKelv); p != nil {
			t.Errorf("%s: got %+v, want nil", c.name, p)
		}
	}
	var nilP *Projection
	if nilP.Usable() {
		t.Error("nil projection usable")
	}
}
