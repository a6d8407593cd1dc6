package reduce

import (
	"strings"
	"testing"

	"gtpack.example/gtpack/ingest"
)

func handReference(kind string) *ingest.Reference {
	return &ingest.Reference{File: "references/h.yaml", ID: "h", GainKind: kind, CoverageK: 2,
		Table: []ingest.ReferencePoint{
			{FrequencyHz: 10e9, GainDBi: 20.0, ExpandedUncertaintyDB: 0.3, Line: 9},
			{FrequencyHz: 11e9, GainDBi: 21.0, ExpandedUncertaintyDB: 0.5, Line: 10},
			{FrequencyHz: 12e9, GainDBi: 21.4, ExpandedUncertaintyDB: 0.5, Line: 11},
		}}
}

func TestRangeLossHandWorked(t *testing.T) {
	// method.md section 3, worked by hand. Table interpolated linearly on dB:
	// G_ref(10.25, 10.5, 11.5 GHz) = 20.25, 20.5, 21.2 dBi; U = 0.35, 0.4, 0.5 dB.
	// gain_kind "gain": realized = G + 10log10(1 - |Gamma|^2); pre |Gamma| = 0.2 -> -0.177288 dB,
	// post |Gamma| = 0.1 -> -0.043648 dB.
	// Pre on 10.25, 10.5, 11.5 GHz, S21 = -30.0, -30.2, -30.9 dB -> RL_pre = 50.072712, 50.522712, 51.922712.
	// Post on 10, 11, 12 GHz, S21 = -30.1, -30.6, -31.2 -> on the pre grid -30.225, -30.35, -30.9
	// -> RL_post = 50.431352, 50.806352, 52.056352.
	// Mean 50.252032, 50.664532, 51.989532; drift 0.358640, 0.283640, 0.133640.
	pre := &ingest.Transmission{File: "r/pre.s2p", FrequencyHz: []float64{10.25e9, 10.5e9, 11.5e9},
		ParameterDB: []float64{-30.0, -30.2, -30.9}, AntennaMatch: []float64{0.2, 0.2, 0.2}}
	post := &ingest.Transmission{File: "r/post.s2p", FrequencyHz: []float64{10e9, 11e9, 12e9},
		ParameterDB: []float64{-30.1, -30.6, -31.2}, AntennaMatch: []float64{0.1, 0.1, 0.1}}
	rl, probs, flags := ComputeRangeLoss(handReference("gain"), pre, post)
	if len(probs) != 0 || len(flags) != 0 || rl == nil {
		t.Fatalf("problems %v flags %v", probs, flags)
	}
	want := []struct{ pre, post, mean, drift, u float64 }{
		{50.0727123, 50.4313519, 50.2520321, 0.3586396, 0.35},
		{50.5227123, 50.8063519, 50.6645321, 0.2836396, 0.40},
		{51.9227123, 52.0563519, 51.9895321, 0.1336396, 0.50},
	}
	for i, w := range want {
		near(t, "RL pre", rl.PreDB[i], w.pre, 1e-6)
		near(t, "RL post", rl.PostDB[i], w.post, 1e-6)
		near(t, "RL mean", rl.RangeLossDB[i], w.mean, 1e-6)
		near(t, "drift", rl.DriftDB[i], w.drift, 1e-6)
		near(t, "reference U", rl.ReferenceExpandedUDB[i], w.u, 1e-12)
		near(t, "reference |Gamma| (larger of pre and post)", rl.ReferenceMatch[i], 0.2, 1e-12)
	}
	if len(rl.Interpolated) != 2 || !strings.Contains(rl.Interpolated[1], "r/post.s2p from its 3 points onto the 3-point range-loss grid") {
		t.Errorf("interpolated %q", rl.Interpolated)
	}
}

func TestRangeLossRefusals(t *testing.T) {
	cases := []struct {
		name   string
		ref    *ingest.Reference
		pre    *ingest.Transmission
		points int
		want   string
	}{
		{
			// method.md section 3: frequencies outside the table are an error, never an extrapolation.
			name: "outside the table",
			ref:  handReference("realized"),
			pre: &ingest.Transmission{File: "r/pre.s2p", FrequencyHz: []float64{9.8e9, 9.9e9, 10e9, 11e9, 12.5e9},
				ParameterDB: []float64{-30, -30, -30, -30, -30}},
			points: 2,
			want: "r/pre.s2p: frequencies 9.8 GHz to 12.5 GHz (3 points) of 5 measured frequencies lie outside the " +
				"calibration table of reference h (references/h.yaml, 10 GHz to 12 GHz)",
		},
		{
			name:   "gain without a measured match",
			ref:    handReference("gain"),
			pre:    &ingest.Transmission{File: "r/pre.csv", FrequencyHz: []float64{10e9, 11e9}, ParameterDB: []float64{-30, -30}},
			points: 2,
			want:   "r/pre.csv: reference h states gain, not realized gain, but this file has no reflection coefficient",
		},
		{
			name: "table of one row",
			ref: &ingest.Reference{File: "references/h.yaml", ID: "h", Table: []ingest.ReferencePoint{
				{FrequencyHz: 10e9, GainDBi: 20, Line: 9}}},
			pre:    &ingest.Transmission{File: "r/pre.csv", FrequencyHz: []float64{10e9}, ParameterDB: []float64{-30}},
			points: 0,
			want:   "references/h.yaml: reference h: the calibration table needs at least 2 rows",
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rl, probs, _ := ComputeRangeLoss(c.ref, c.pre, nil)
			text := ""
			for _, p := range probs {
				text += p.Error() + "\n"
			}
			if !strings.Contains(text, c.want) {
				t.Errorf("problems lack %q; got:\n%s", c.want, text)
			}
			got := 0
			if rl != nil {
				got = len(rl.RangeLossDB)
			}
			if got != c.points {
				t.Errorf("%d range-loss points, want %d", got, c.points)
			}
		})
	}
	// Realized gain with |Gamma| = 0.2: 10log10(0.96) = -0.177288 dB (by hand); |Gamma| >= 1 is refused.
	near(t, "realized", RealizedGainDBi(20, 0.2), 19.8227123, 1e-6)
	if v := RealizedGainDBi(20, 1); v == v {
		t.Errorf("|Gamma| = 1 gives %g, want NaN", v)
	}
}
