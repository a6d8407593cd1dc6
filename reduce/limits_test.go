package reduce

import (
	"strings"
	"testing"

	"gtpack.example/gtpack/ingest"
)

func TestVerdictILACG8(t *testing.T) {
	// ILAC-G8:09/2019 section 4.2 (simple acceptance, w = 0) and 4.2.2 (guarded acceptance,
	// w = U) for a lower limit, as restated in method.md section 7. Margins and U are binary
	// fractions so the boundary cases are exact.
	cases := []struct {
		rule      string
		margin, u float64
		want      Verdict
	}{
		{"simple", 0.5, 0.25, VerdictPass},
		{"simple", 0, 0.25, VerdictPass}, // x exactly at the limit: pass under simple acceptance
		{"simple", -0.125, 0.25, VerdictFail},
		{"guarded", 0.5, 0.25, VerdictPass},
		{"guarded", 0.25, 0.25, VerdictPass}, // x - U exactly at the limit: pass
		{"guarded", 0.125, 0.25, VerdictConditionalPass},
		{"guarded", 0, 0.25, VerdictConditionalPass}, // x exactly at the limit: conditional pass
		{"guarded", 0, 0, VerdictPass},               // no uncertainty: x at the limit passes
		{"guarded", -0.125, 0.25, VerdictConditionalFail},
		{"guarded", -0.25, 0.25, VerdictConditionalFail}, // x + U exactly at the limit: not yet a fail
		{"guarded", -0.5, 0.25, VerdictFail},
	}
	for _, c := range cases {
		if got := Judge(c.rule, c.margin, c.u); got != c.want {
			t.Errorf("Judge(%s, margin %g, U %g) = %s, want %s", c.rule, c.margin, c.u, got, c.want)
		}
	}
	// Ordering pass < conditional-pass < conditional-fail < fail (ILAC-G8 decision outcomes).
	if WorseVerdict(VerdictConditionalPass, VerdictConditionalFail) != VerdictConditionalFail ||
		WorseVerdict(VerdictFail, VerdictPass) != VerdictFail ||
		WorseVerdict(VerdictFail, VerdictIncomplete) != VerdictIncomplete {
		t.Error("verdict order is wrong")
	}
}

func TestScanLaw(t *testing.T) {
	// method.md section 8: 10*n*log10(cos theta). n = 1.3, theta = 60 deg:
	// 13*log10(0.5) = -3.913390 dB (by hand).
	near(t, "n 1.3 at 60 deg", ScanLawDB(1.3, 60), -3.9133900, 1e-6)
	near(t, "boresight", ScanLawDB(1.3, 0), 0, 0)
	if v := ScanLawDB(1, 90); v == v {
		t.Errorf("theta 90 deg gives %g, want NaN", v)
	}
}

func fp(v float64) *float64 { return &v }

func lp(f, v float64) ingest.LimitPoint { return ingest.LimitPoint{FrequencyHz: f, Value: v} }

// limitBeam is a beam with G/T and gain rising 0.1 dB per point on 10.0..11.0 GHz (11 points).
func limitBeam(id string, theta, gt0, u float64) Beam {
	b := Beam{ID: id, ThetaDeg: theta}
	for i := 0; i <= 10; i++ {
		b.FrequencyHz = append(b.FrequencyHz, 10e9+float64(i)*0.1e9)
		b.GTdBPerK = append(b.GTdBPerK, gt0+0.1*float64(i))
		b.GTExpandedUncertaintyDB = append(b.GTExpandedUncertaintyDB, u)
		b.GainDBi = append(b.GainDBi, 30)
		b.GainExpandedUncertaintyDB = append(b.GainExpandedUncertaintyDB, u)
	}
	return b
}

func TestEvaluateLimits(t *testing.T) {
	beams := []Beam{limitBeam("b00", 0, 2.0, 0.25), limitBeam("b01", 60, 0.0, 0.25), limitBeam("b07", 70, 0, 0.25)}
	spec := &ingest.Spec{
		File: "specs/p.yaml", Product: "P", DecisionRule: "guarded",
		Limits: []ingest.Limit{
			// Limit rises from 1.5 at 10 GHz to 2.4 at 11 GHz (0.09 dB per point): margin at point i
			// is 2.0 + 0.1i - 1.5 - 0.09i = 0.5 + 0.01i; in band 10.2..10.8 GHz (points 2..8) the
			// worst is point 2: margin 0.52, limit 1.68 (by hand); U 0.25 -> pass.
			{Name: "GT bore", Quantity: "gt", Beams: ingest.BeamSelector{MaxThetaDeg: fp(0)},
				BandHz: [2]float64{10.2e9, 10.8e9}, Statistic: "min", Line: 7,
				Points: []ingest.LimitPoint{lp(10e9, 1.5), lp(11e9, 2.4)}},
			// Scan law n = 1 at 60 deg: limit 1.0 + 10log10(0.5) = -2.0103 dB; G/T of b01 at point i
			// is 0.1i; mean over points 0..10 is 0.5, mean limit -2.0103 -> margin 2.5103 (by hand).
			{Name: "GT scan mean", Quantity: "gt", Beams: ingest.BeamSelector{IDs: []string{"b01"}},
				BandHz: [2]float64{10e9, 11e9}, Statistic: "mean", ScanExponent: fp(1), Line: 14,
				Points: []ingest.LimitPoint{lp(10e9, 1.0), lp(11e9, 1.0)}},
			// Gain limit 30.125 with U 0.25: margin -0.125 everywhere -> conditional-fail.
			{Name: "Gain", Quantity: "gain", Beams: ingest.BeamSelector{IDs: []string{"b00"}},
				BandHz: [2]float64{10e9, 11e9}, Statistic: "min", Line: 20,
				Points: []ingest.LimitPoint{lp(9e9, 30.125), lp(12e9, 30.125)}},
			// Points that do not cover the band: a problem, not judged.
			{Name: "Short", Quantity: "gt", Beams: ingest.BeamSelector{IDs: []string{"b00"}},
				BandHz: [2]float64{10e9, 11e9}, Statistic: "min", Line: 30,
				Points: []ingest.LimitPoint{lp(10e9, 0), lp(10.5e9, 0)}},
			// Selects nothing.
			{Name: "Nobody", Quantity: "gt", Beams: ingest.BeamSelector{IDs: []string{"b99"}},
				BandHz: [2]float64{10e9, 11e9}, Statistic: "min", Line: 40,
				Points: []ingest.LimitPoint{lp(10e9, 0), lp(11e9, 0)}},
		},
	}
	res, probs := EvaluateLimits(spec, beams)
	if len(res) != 3 {
		t.Fatalf("got %d results, want 3: %+v", len(res), res)
	}
	r := res[0]
	if r.Beam != "b00" || r.Verdict != VerdictPass || r.AtFrequencyHz != 10.2e9 {
		t.Errorf("GT bore: %+v, want b00 pass at 10.2 GHz", r)
	}
	near(t, "GT bore margin", r.WorstMarginDB, 0.52, 1e-9)
	near(t, "GT bore limit", r.LimitDB, 1.68, 1e-9)
	r = res[1]
	near(t, "scan mean value", r.ValueDB, 0.5, 1e-9)
	near(t, "scan mean limit", r.LimitDB, -2.0102999566, 1e-9)
	near(t, "scan mean margin", r.WorstMarginDB, 2.5102999566, 1e-9)
	near(t, "scan mean at band centre", r.AtFrequencyHz, 10.5e9, 0)
	if len(r.LimitCurve) != 2 {
		t.Fatalf("scan mean limit curve %+v, want the two band edges", r.LimitCurve)
	}
	near(t, "limit curve with scan law", r.LimitCurve[1].ValueDB, -2.0102999566, 1e-9)
	if r.Verdict != VerdictPass || r.Statistic != "mean" {
		t.Errorf("scan mean: %+v", r)
	}
	if res[2].Verdict != VerdictConditionalFail {
		t.Errorf("gain: verdict %s, want conditional-fail", res[2].Verdict)
	}
	// The per-frequency limit of b00's G/T limit covers points 2..8 of the band 10.2..10.8 GHz:
	// 1.5 + 0.09i at point i (by hand, from the vertices above).
	if len(beams[0].LimitCurves) == 0 {
		t.Fatal("b00 has no per-frequency limit curves")
	}
	lc := beams[0].LimitCurves[0]
	if lc.Name != "GT bore" || lc.Start != 2 || len(lc.LimitDB) != 7 {
		t.Fatalf("b00 limit curve %+v, want GT bore from point 2 with 7 points", lc)
	}
	for k, v := range lc.LimitDB {
		near(t, "b00 limit on the grid", v, 1.5+0.09*float64(k+2), 1e-9)
	}
	near(t, "gain margin", res[2].WorstMarginDB, -0.125, 1e-12)
	wantProblems := []string{
		`specs/p.yaml:30: limit "Short" not judged: limit points span 10 GHz to 10.5 GHz but the band is 10 GHz to 11 GHz`,
		`specs/p.yaml:40: limit "Nobody" selects no beam`,
		`specs/p.yaml: spec P has no limit for beam b07`,
	}
	all := ""
	for _, p := range probs {
		all += p.Error() + "\n"
	}
	for _, w := range wantProblems {
		if !strings.Contains(all, w) {
			t.Errorf("problems lack %q; got:\n%s", w, all)
		}
	}
	if len(probs) != 3 {
		t.Errorf("got %d problems, want 3:\n%s", len(probs), all)
	}
}

func TestGuardedWorstPointIsTheDecidingOne(t *testing.T) {
	// Under guarded acceptance the point with the smallest margin need not decide the
	// verdict (ILAC-G8 4.2.2): margin -0.3 with U 0.5 is conditional-fail, margin -0.2 with
	// U 0.1 is fail. The result must report the failing point.
	b := Beam{ID: "b00", FrequencyHz: []float64{10e9, 11e9}, GTdBPerK: []float64{-0.3, -0.2},
		GTExpandedUncertaintyDB: []float64{0.5, 0.1}}
	spec := &ingest.Spec{DecisionRule: "guarded", Limits: []ingest.Limit{{Name: "L", Quantity: "gt",
		BandHz: [2]float64{10e9, 11e9}, Statistic: "min", Points: []ingest.LimitPoint{lp(10e9, 0), lp(11e9, 0)}}}}
	res, _ := EvaluateLimits(spec, []Beam{b})
	if len(res) != 1 || res[0].Verdict != VerdictFail || res[0].AtFrequencyHz != 11e9 {
		t.Fatalf("got %+v, want fail at 11 GHz", res)
	}
	near(t, "margin", res[0].WorstMarginDB, -0.2, 1e-12)
}
