package reduce

import (
	"math"
	"testing"

	"gtpack.example/gtpack/ingest"
)

// lawBeam makes a beam whose G/T follows GT0(f) + 10*n*log10(cos theta)
// and whose gain follows G0(f) + 10*nGain*log10(cos theta), on the grid
// fs; GT0 and G0 are linear in frequency so that piecewise-linear
// interpolation onto another grid is exact.
func lawBeam(id, pol string, thetaDeg, n, nGain float64, fs []float64) Beam {
	b := Beam{ID: id, ThetaDeg: thetaDeg, Polarization: pol, FrequencyHz: fs}
	x := 10 * math.Log10(math.Cos(thetaDeg*math.Pi/180))
	for _, f := range fs {
		ghz := f / 1e9
		b.GTdBPerK = append(b.GTdBPerK, 2+0.3*(ghz-10.7)+n*x)
		b.GainDBi = append(b.GainDBi, 31+0.5*(ghz-10.7)+nGain*x)
	}
	return b
}

func gridHz(fromGHz, toGHz, stepGHz float64) []float64 {
	var out []float64
	for k := 0; ; k++ {
		f := fromGHz + float64(k)*stepGHz
		if f > toGHz+1e-9 {
			return out
		}
		out = append(out, f*1e9)
	}
}

func TestScanExponentRecovered(t *testing.T) {
	// A cos^n law with n = 1.3 (general knowledge / method.md section 8): the
	// least-squares n = sum(x*y)/sum(x^2) returns n exactly when every point
	// lies on the law. The gain follows n = 1.0 to check the gain fit.
	bore := gridHz(10.7, 12.7, 0.25)
	other := gridHz(10.8, 12.6, 0.1) // a different grid, narrower span
	beams := []Beam{
		lawBeam("b30", "RHCP", 30, 1.3, 1.0, other),
		lawBeam("b00", "RHCP", 0, 1.3, 1.0, bore),
		lawBeam("b60", "RHCP", 60, 1.3, 1.0, bore),
		lawBeam("b15", "RHCP", -15, 1.3, 1.0, bore),
		lawBeam("b45", "RHCP", 45, 1.3, 1.0, bore),
	}
	n15 := 1.5
	limits := []ingest.Limit{{Name: "boresight"}, {Name: "scanned", ScanExponent: &n15}}
	s := ScanBehaviour(beams, limits)
	if s == nil {
		t.Fatal("nil scan")
	}
	// Common span [10.8, 12.6] GHz on the boresight grid: 10.95 ... 12.45.
	wantF := gridHz(10.95, 12.45, 0.25)
	if len(s.FrequencyHz) != len(wantF) {
		t.Fatalf("grid %v, want %v", s.FrequencyHz, wantF)
	}
	for j := range wantF {
		if math.Abs(s.FrequencyHz[j]-wantF[j]) > 1e-3 {
			t.Errorf("grid[%d] = %g, want %g", j, s.FrequencyHz[j], wantF[j])
		}
		if math.Abs(s.ExponentN[j]-1.3) > 1e-9 {
			t.Errorf("n at %g Hz = %.12f, want 1.3", s.FrequencyHz[j], s.ExponentN[j])
		}
		if math.Abs(s.GainExponentN[j]-1.0) > 1e-9 {
			t.Errorf("gain n at %g Hz = %.12f, want 1.0", s.FrequencyHz[j], s.GainExponentN[j])
		}
	}
	if math.Abs(s.MeanExponentN-1.3) > 1e-9 || math.Abs(s.MeanGainExponentN-1.0) > 1e-9 {
		t.Errorf("mean n = %g, gain %g; want 1.3, 1.0", s.MeanExponentN, s.MeanGainExponentN)
	}
	if s.BoresightBeam != "b00" || s.Polarization != "RHCP" {
		t.Errorf("boresight %q pol %q", s.BoresightBeam, s.Polarization)
	}
	wantOrder := []string{"b15", "b30", "b45", "b60"}
	if len(s.Beams) != len(wantOrder) {
		t.Fatalf("%d scanned beams, want %d", len(s.Beams), len(wantOrder))
	}
	for i, id := range wantOrder {
		if s.Beams[i].ID != id {
			t.Errorf("beam %d = %s, want %s", i, s.Beams[i].ID, id)
		}
	}
	// At 60 deg, cos = 0.5: 10*1.3*log10(0.5) = 13*(-0.30103) = -3.91339 dB
	// and the spec law 15*log10(0.5) = -4.51545 dB (worked by hand).
	b60 := s.Beams[3]
	for j, v := range b60.ScanLossDB {
		if math.Abs(v-(-3.913390)) > 1e-5 {
			t.Errorf("b60 scan loss[%d] = %.6f, want -3.913390", j, v)
		}
	}
	if b60.LawLossDB == nil || math.Abs(*b60.LawLossDB-(-4.515450)) > 1e-5 {
		t.Errorf("b60 law loss = %v, want -4.515450", b60.LawLossDB)
	}
	if s.LawExponentN == nil || *s.LawExponentN != 1.5 {
		t.Errorf("law exponent %v, want 1.5", s.LawExponentN)
	}
}

func TestScanPolarizationGroups(t *testing.T) {
	// Two polarizations, each following its own law: the fit must not mix
	// them. LHCP has more scanned beams, so its group is kept.
	fs := gridHz(11, 12, 0.5)
	beams := []Beam{
		lawBeam("r00", "RHCP", 0, 1.0, 1.0, fs),
		lawBeam("r40", "RHCP", 40, 1.0, 1.0, fs),
		lawBeam("l00", "LHCP", 0, 1.4, 1.0, fs),
		lawBeam("l20", "LHCP", 20, 1.4, 1.0, fs),
		lawBeam("l50", "LHCP", 50, 1.4, 1.0, fs),
	}
	// The LHCP G/T carries an offset of 5 dB against RHCP: mixing the groups
	// would spoil the exponent.
	for _, i := range []int{2, 3, 4} {
		for k := range beams[i].GTdBPerK {
			beams[i].GTdBPerK[k] += 5
		}
	}
	s := ScanBehaviour(beams, nil)
	if s == nil {
		t.Fatal("nil scan")
	}
	if s.Polarization != "LHCP" || s.BoresightBeam != "l00" || len(s.Beams) != 2 {
		t.Fatalf("group %q/%q with %d beams, want LHCP/l00 with 2", s.Polarization, s.BoresightBeam, len(s.Beams))
	}
	for j, n := range s.ExponentN {
		if math.Abs(n-1.4) > 1e-9 {
			t.Errorf("n[%d] = %g, want 1.4", j, n)
		}
	}
	if s.LawExponentN != nil || s.Beams[0].LawLossDB != nil {
		t.Error("law given without a limit with a scan exponent")
	}
}

func TestScanNil(t *testing.T) {
	fs := gridHz(11, 12, 0.5)
	cases := []struct {
		name  string
		beams []Beam
		want  bool // non-nil
	}{
		{"no beams", nil, false},
		{"only boresight", []Beam{lawBeam("a", "", 0, 1, 1, fs)}, false},
		{"no boresight (smallest theta 5 deg)", []Beam{lawBeam("a", "", 5, 1, 1, fs), lawBeam("b", "", 30, 1, 1, fs)}, false},
		{"boresight at 0.8 deg", []Beam{lawBeam("a", "", 0.8, 1, 1, fs), lawBeam("b", "", 30, 1, 1, fs)}, true},
		{"scanned beam at 90 deg is unusable", []Beam{lawBeam("a", "", 0, 1, 1, fs), {ID: "b", ThetaDeg: 90, FrequencyHz: fs, GTdBPerK: []float64{1, 1, 1}}}, false},
		{"spans do not overlap", []Beam{lawBeam("a", "", 0, 1, 1, fs), lawBeam("b", "", 30, 1, 1, gridHz(13, 14, 0.5))}, false},
		{"decreasing grid refused", []Beam{lawBeam("a", "", 0, 1, 1, fs), {ID: "b", ThetaDeg: 30, FrequencyHz: []float64{2, 1}, GTdBPerK: []float64{1, 1}}}, false},
		{"groups differ: boresight RHCP, scanned LHCP", []Beam{lawBeam("a", "RHCP", 0, 1, 1, fs), lawBeam("b", "LHCP", 30, 1, 1, fs)}, false},
	}
	for _, c := range cases {
		got := ScanBehaviour(c.beams, nil)
		if (got != nil) != c.want {
			t.Errorf("%s: got %v, want non-nil %v", c.name, got, c.want)
		}
	}
}
