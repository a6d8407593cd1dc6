package reduce

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"gtpack.example/gtpack/ingest"
)

// The synthetic unit below is built from the physical model of method.md sections 3 and 4
// (invented demo numbers): reference gain G_ref(f) = 20 + 0.5 (f/GHz - 10) dBi, range loss
// RL(f) = 50 + 0.8 (f/GHz - 10) dB, AUT passive gain G_p(theta) = 30 + 12 log10(cos theta) dBi,
// receiver gain 40 dB, receiver noise temperature 150 K, ambient 22.8 degC = 295.95 K. Then
// G_aut = G_p + 40, S21_aut = G_aut - RL, N_out = k (T_amb + T_e) G_rx and NF_sys = N_rel - S21_aut,
// and the true G/T is G_p - 10 log10(445.95 K).

const (
	synthTeK      = 150.0
	synthAmbientC = 22.8
	synthRxGainDB = 40.0
)

func synthRefGain(f float64) float64   { return 20 + 0.5*(f/1e9-10) }
func synthRangeLoss(f float64) float64 { return 50 + 0.8*(f/1e9-10) }
func synthPassive(theta float64) float64 {
	return 30 + 12*math.Log10(math.Cos(theta*math.Pi/180))
}
func synthTrueGT(theta float64) float64 {
	return synthPassive(theta) - 10*math.Log10(synthAmbientC+CelsiusOffsetK+synthTeK)
}

func grid(lo, hi float64, n int) []float64 {
	g := make([]float64, n)
	for i := range g {
		g[i] = lo + (hi-lo)*float64(i)/float64(n-1)
	}
	return g
}

type synthOptions struct {
	points     int
	thetas     []float64
	tableLoGHz float64 // first row of the reference table
	noNoise    map[string]bool
	noiseGrid  map[string][]float64 // noise frequencies per beam id
	bothForms  bool
}

func synthInput(o synthOptions) Input {
	if o.points == 0 {
		o.points = 101
	}
	if o.thetas == nil {
		o.thetas = []float64{0, 30, 60}
	}
	if o.tableLoGHz == 0 {
		o.tableLoGHz = 10
	}
	f := grid(10.7e9, 12.75e9, o.points)
	ref := &ingest.Reference{File: "references/horn-1.yaml", ID: "horn-1", GainKind: "realized",
		Certificate: "CAL-1", CoverageK: 2,
		Calibrated: time.Date(2026, 2, 10, 0, 0, 0, 0, time.UTC), Due: time.Date(2027, 2, 10, 0, 0, 0, 0, time.UTC)}
	for g := o.tableLoGHz; g <= 13.0001; g += 0.5 {
		ref.Table = append(ref.Table, ingest.ReferencePoint{FrequencyHz: g * 1e9, GainDBi: synthRefGain(g * 1e9),
			ExpandedUncertaintyDB: 0.30, Line: 10 + len(ref.Table)})
	}
	// Pre reads 0.05 dB high, post 0.05 dB low: RL_pre = RL - 0.05, RL_post = RL + 0.05.
	meas := func(name string, offset float64) *ingest.Transmission {
		t := &ingest.Transmission{File: "u1/" + name, FrequencyHz: f}
		for _, x := range f {
			t.ParameterDB = append(t.ParameterDB, synthRefGain(x)-synthRangeLoss(x)+offset)
			t.AntennaMatch = append(t.AntennaMatch, 0.1)
		}
		return t
	}
	run := &ingest.Run{File: "u1/run.yaml", Dir: "u1", Schema: 1, Serial: "SN-1", Product: "P16",
		Station: "range-1", Reference: "horn-1", Started: time.Date(2026, 11, 3, 9, 15, 0, 0, time.UTC),
		Operator: "T", AmbientC: synthAmbientC, RangePre: "u1/ref-pre.s2p", RangePost: "u1/ref-post.s2p"}
	data := &ingest.RunData{RangePre: meas("ref-pre.s2p", 0.05), RangePost: meas("ref-post.s2p", -0.05)}
	kt0 := KT0DBmPerHz()
	for i, th := range o.thetas {
		id := fmt.Sprintf("b%02d", i)
		rb := ingest.Beam{ID: id, ThetaDeg: th, Polarization: "RHCP", Transmission: "u1/" + id + ".s2p", Line: 20 + i}
		tr := &ingest.Transmission{File: rb.Transmission, FrequencyHz: f}
		s21 := func(x float64) float64 { return synthPassive(th) + synthRxGainDB - synthRangeLoss(x) }
		for _, x := range f {
			tr.ParameterDB = append(tr.ParameterDB, s21(x))
			tr.AntennaMatch = append(tr.AntennaMatch, 0.2)
		}
		bd := ingest.BeamData{Transmission: tr}
		nf := f
		if g, ok := o.noiseGrid[id]; ok {
			nf = g
		}
		nDensity := 10*math.Log10(BoltzmannJPerK*(synthAmbientC+CelsiusOffsetK+synthTeK)*1e3) + synthRxGainDB
		if !o.noNoise[id] {
			nd := &ingest.Trace{File: "u1/" + id + "-noise.csv", FrequencyHz: nf}
			for range nf {
				nd.Values = append(nd.Values, nDensity)
			}
			rb.Noise = append(rb.Noise, ingest.NoiseInput{File: nd.File, Quantity: NoiseDensityDBmPerHz, Line: 30 + i})
			bd.Noise = append(bd.Noise, nd)
			if o.bothForms {
				ft := &ingest.Trace{File: "u1/" + id + "-nf.csv", FrequencyHz: nf}
				for _, x := range nf {
					ft.Values = append(ft.Values, nDensity-kt0-s21(x))
				}
				rb.Noise = append(rb.Noise, ingest.NoiseInput{File: ft.File, Quantity: SystemNoiseFigureDB, Line: 40 + i})
				bd.Noise = append(bd.Noise, ft)
			}
		}
		run.Beams = append(run.Beams, rb)
		data.Beams = append(data.Beams, bd)
	}
	st := &ingest.Station{File: "stations/range-1.yaml", ID: "range-1", ReceiverMatch: 0.03,
		DriftToleranceDB: 0.25, MethodToleranceDB: 0.30, Uncertainty: []ingest.UncertaintyTerm{
			{Name: "Noise receiver calibration", AppliesTo: []string{"gt"}, ValueDB: 0.20, Distribution: "normal", CoverageK: 2, Line: 8},
			{Name: "Quiet-zone ripple", AppliesTo: []string{"gain", "gt"}, ValueDB: 0.10, Distribution: "rectangular", Line: 13},
		}}
	spec := &ingest.Spec{File: "specs/P16.yaml", Product: "P16", DecisionRule: "guarded", Limits: []ingest.Limit{
		{Name: "G/T at boresight", Quantity: "gt", Beams: ingest.BeamSelector{MaxThetaDeg: fp(0)},
			BandHz: [2]float64{10.7e9, 12.75e9}, Statistic: "min", Line: 6,
			Points: []ingest.LimitPoint{lp(10.7e9, 2.0), lp(12.75e9, 2.6)}},
		{Name: "G/T scanned", Quantity: "gt", Beams: ingest.BeamSelector{MinThetaDeg: fp(1), MaxThetaDeg: fp(60)},
			BandHz: [2]float64{10.7e9, 12.75e9}, Statistic: "min", ScanExponent: fp(1.2), Line: 14,
			Points: []ingest.LimitPoint{lp(10.7e9, 2.0), lp(12.75e9, 2.6)}},
	}}
	return Input{Run: run, Data: data, Station: st, Reference: ref, Spec: spec}
}

func problemText(u *Unit) string {
	var b strings.Builder
	for _, p := range u.Problems {
		b.WriteString(p.Error() + "\n")
	}
	return b.String()
}

func TestReduceUnitRecoversModel(t *testing.T) {
	u := ReduceUnit(synthInput(synthOptions{bothForms: true}))
	if len(u.Problems) != 0 {
		t.Fatalf("unexpected problems:\n%s", problemText(u))
	}
	if u.Verdict != VerdictPass || len(u.Limits) != 3 {
		t.Errorf("verdict %s with %d limit results, want pass with 3", u.Verdict, len(u.Limits))
	}
	if len(u.Flags) != 0 {
		t.Errorf("unexpected flags: %+v", u.Flags)
	}
	for _, b := range u.Beams {
		if len(b.FrequencyHz) != 101 || b.GTForm != FormNoiseDensity || b.OtherForm == nil {
			t.Fatalf("beam %s: %d points, form %q, other form %v", b.ID, len(b.FrequencyHz), b.GTForm, b.OtherForm != nil)
		}
		for i, f := range b.FrequencyHz {
			// Gain transfer (method.md section 3) must return the model's G_p + G_rx.
			near(t, b.ID+" gain", b.GainDBi[i], synthPassive(b.ThetaDeg)+synthRxGainDB, 1e-9)
			near(t, b.ID+" range loss", b.RangeLossDB[i], synthRangeLoss(f), 1e-9)
			near(t, b.ID+" drift", b.RangeDriftDB[i], 0.1, 1e-9)
			// method.md section 4: G/T = G_p/(T_A + T_e) with T_A = T_amb, from first principles.
			near(t, b.ID+" G/T", b.GTdBPerK[i], synthTrueGT(b.ThetaDeg), 1e-9)
			near(t, b.ID+" G/T other form", b.OtherForm.GTdBPerK[i], synthTrueGT(b.ThetaDeg), 1e-9)
		}
		// Both forms agree within 0.01 dB when the inputs are consistent (method.md section 4).
		if b.OtherForm.MaxAbsDifferenceDB > 0.01 {
			t.Errorf("%s: forms differ by %g dB", b.ID, b.OtherForm.MaxAbsDifferenceDB)
		}
		// Budgets worked by hand (JCGM 100:2008; method.md section 6), standard uncertainties:
		// G/T: reference 0.30/2 = 0.15; drift 0.05/sqrt3 = 0.028868; reference mismatch
		// |20log10(1 - 0.1*0.03)|/sqrt2 = 0.018453; noise scatter 0 (noise-free traces);
		// ambient |10log10(295.95/290)|/sqrt3 = 0.050924; station 0.2/2 = 0.1 and 0.1/sqrt3 = 0.057735
		// -> U = 2*sqrt(sum of squares) = 0.397997 dB.
		// Gain: 0.15, 0.028868, 0.018453, AUT mismatch |20log10(1 - 0.2*0.03)|/sqrt2 = 0.036962,
		// 0.057735 -> U = 0.336888 dB.
		near(t, b.ID+" G/T U", b.GTExpandedUncertaintyDB[50], 0.3979974, 1e-6)
		near(t, b.ID+" gain U", b.GainExpandedUncertaintyDB[50], 0.3368880, 1e-6)
		if len(b.GTBudget.Terms) != 7 || len(b.GainBudget.Terms) != 5 {
			t.Errorf("%s: %d G/T terms and %d gain terms, want 7 and 5", b.ID, len(b.GTBudget.Terms), len(b.GainBudget.Terms))
		}
	}
	// Summary: the beam with the smallest theta.
	s := u.Summary()
	if s.Boresight == nil || s.Boresight.Beam != "b00" || len(s.Boresight.GTdBPerK) != 101 || s.Verdict != VerdictPass {
		t.Errorf("summary %+v", s)
	}
	// The summary's limits are the unit's, without their limit lines.
	if len(s.Limits) != len(u.Limits) || len(u.Limits) == 0 || len(u.Limits[0].LimitCurve) == 0 {
		t.Fatalf("summary has %d limits, unit %d (first with %d vertices)", len(s.Limits), len(u.Limits), len(u.Limits[0].LimitCurve))
	}
	for i, l := range s.Limits {
		if l.LimitCurve != nil || l.Name != u.Limits[i].Name || l.WorstMarginDB != u.Limits[i].WorstMarginDB {
			t.Errorf("summary limit %d: %+v", i, l)
		}
	}
}

func TestReduceUnitMethodFlagAndProjection(t *testing.T) {
	in := synthInput(synthOptions{thetas: []float64{0, 30}, bothForms: true})
	// The noise-figure trace of b01 reads 0.5 dB high: the forms differ by 0.5 dB, above the
	// station's method tolerance of 0.30 dB (archive-format.md, method_tolerance_db).
	nf := in.Data.Beams[1].Noise[1]
	for i := range nf.Values {
		nf.Values[i] += 0.5
	}
	// The noise-figure trace of b00 carries +/-0.4 dB of point-to-point scatter with zero mean:
	// above the tolerance at single points, but no systematic disagreement, so no flag.
	nf0 := in.Data.Beams[0].Noise[1]
	for i := range nf0.Values {
		nf0.Values[i] += 0.4 * float64(1-2*(i%2))
	}
	// A passive gain and an operating antenna temperature make a projection; the ambient term
	// then leaves the G/T budget (method.md section 6: "when no projection is made").
	in.Spec.OperatingAntennaK = fp(50)
	in.Run.Beams[0].PassiveGainDBi = fp(synthPassive(0))
	u := ReduceUnit(in)
	var method []Flag
	for _, f := range u.Flags {
		if f.Kind == "method" {
			method = append(method, f)
		}
	}
	if len(method) != 1 || method[0].Beam != "b01" {
		t.Errorf("method flags %+v, want one for b01", method)
	}
	near(t, "b01 form difference", u.Beams[1].OtherForm.MaxAbsDifferenceDB, 0.5, 1e-9)
	near(t, "b01 difference sign (main - other)", u.Beams[1].OtherForm.DifferenceDB[0], 0.5, 1e-9)
	near(t, "b01 mean difference", u.Beams[1].OtherForm.MeanDifferenceDB, 0.5, 1e-9)
	near(t, "b00 largest single-point difference", u.Beams[0].OtherForm.MaxAbsDifferenceDB, 0.4, 1e-9)
	if m := u.Beams[0].OtherForm.MeanDifferenceDB; math.Abs(m) > 0.01 {
		t.Errorf("b00 mean difference %.4f dB, want about 0 (zero-mean scatter)", m)
	}
	hasAmbient := func(b Budget) bool {
		for _, term := range b.Terms {
			if strings.HasPrefix(term.Name, "Ambient temperature") {
				return true
			}
		}
		return false
	}
	if u.Beams[0].Projection == nil || hasAmbient(u.Beams[0].GTBudget) {
		t.Errorf("b00: projection %v, ambient term present %v; want a projection and no ambient term",
			u.Beams[0].Projection != nil, hasAmbient(u.Beams[0].GTBudget))
	}
	if u.Beams[1].Projection != nil || !hasAmbient(u.Beams[1].GTBudget) {
		t.Error("b01 has no passive gain: no projection, ambient term kept")
	}
}

func TestReduceUnitFlags(t *testing.T) {
	in := synthInput(synthOptions{thetas: []float64{0}})
	// Post measurement 0.4 dB away from pre: drift above the 0.25 dB tolerance.
	for i := range in.Data.RangePost.ParameterDB {
		in.Data.RangePost.ParameterDB[i] -= 0.3
	}
	in.Reference.Due = time.Date(2026, 11, 2, 0, 0, 0, 0, time.UTC) // a day before the run
	u := ReduceUnit(in)
	kinds := map[FlagKind]bool{}
	for _, f := range u.Flags {
		kinds[f.Kind] = true
	}
	if !kinds["drift"] || !kinds["reference-expired"] || !u.Reference.Expired {
		t.Errorf("flags %+v, want drift and reference-expired", u.Flags)
	}
	near(t, "drift", u.Beams[0].RangeDriftDB[0], 0.4, 1e-9)
	// Reference due on the run's day is not yet expired (a date, not an instant).
	if ReferenceExpired(time.Date(2026, 11, 3, 23, 0, 0, 0, time.UTC), time.Date(2026, 11, 3, 0, 0, 0, 0, time.UTC)) {
		t.Error("a run on the due date must not be expired")
	}
}

func TestReduceUnitBadCases(t *testing.T) {
	cases := []struct {
		name  string
		opts  func(*synthOptions)
		edit  func(*Input)
		want  []string // substrings of the problem text
		check func(t *testing.T, u *Unit)
	}{
		{
			name: "reference table does not cover the band",
			opts: func(o *synthOptions) { o.tableLoGHz = 11.0 },
			want: []string{"u1/ref-pre.s2p: frequencies 10.7 GHz to 10.987 GHz (15 points) of 101 measured frequencies lie outside " +
				"the calibration table of reference horn-1 (references/horn-1.yaml, 11 GHz to 13 GHz)",
				`beam b00 covers 11.0075 GHz to 12.75 GHz, not the whole band`}, // step 20.5 MHz: 15 points below 11 GHz
			check: func(t *testing.T, u *Unit) {
				b := u.Beams[0]
				if len(b.GainDBi) != 86 || b.FrequencyHz[0] < 11e9 {
					t.Errorf("gain on %d points from %g Hz, want 86 from 11.0075 GHz", len(b.GainDBi), b.FrequencyHz[0])
				}
				near(t, "gain still right", b.GainDBi[0], synthPassive(0)+synthRxGainDB, 1e-9)
			},
		},
		{
			name: "noise trace on a different grid",
			opts: func(o *synthOptions) { o.noiseGrid = map[string][]float64{"b01": grid(10.6e9, 12.5e9, 39)} },
			// Grid step 2.05 GHz/100 = 20.5 MHz: points 0..87 (10.7 to 12.4835 GHz) lie inside the noise span.
			want: []string{`limit "G/T scanned": beam b01 covers 10.7 GHz to 12.4835 GHz, not the whole band`},
			check: func(t *testing.T, u *Unit) {
				b := u.Beams[1]
				// The range-loss chain first (reference table), then the noise trace.
				if len(b.FrequencyHz) != 88 || len(b.Interpolated) != 2 ||
					!strings.Contains(b.Interpolated[0], "reference gain and its uncertainty from the 7-point calibration table of references/horn-1.yaml") ||
					!strings.Contains(b.Interpolated[1], "noise of u1/b01-noise.csv: interpolated from 39 points onto the 88-point grid of u1/b01.s2p") {
					t.Errorf("beam b01: %d points, interpolated %q", len(b.FrequencyHz), b.Interpolated)
				}
				near(t, "G/T after interpolation", b.GTdBPerK[87], synthTrueGT(30), 1e-9)
				grid := false
				for _, f := range u.Flags {
					grid = grid || (f.Kind == "grid" && f.Beam == "b01" && strings.Contains(f.Message, "(13 points) of u1/b01.s2p"))
				}
				if !grid {
					t.Errorf("no grid flag for the dropped points: %+v", u.Flags)
				}
				if len(u.Beams[0].GTdBPerK) != 101 {
					t.Error("beam b00 must be untouched")
				}
			},
		},
		{
			name: "beam with no noise file",
			opts: func(o *synthOptions) { o.noNoise = map[string]bool{"b02": true} },
			want: []string{"u1/run.yaml:22: beam b02 has no noise trace: no G/T for this beam",
				`specs/P16.yaml:14: limit "G/T scanned" cannot judge beam b02: the beam has no G/T`},
			check: func(t *testing.T, u *Unit) {
				b := u.Beams[2]
				if b.GTdBPerK != nil || len(b.GainDBi) != 101 || len(b.GainExpandedUncertaintyDB) != 101 {
					t.Errorf("b02: G/T %v, gain %d points", b.GTdBPerK != nil, len(b.GainDBi))
				}
				if len(u.Limits) != 2 {
					t.Errorf("%d limit results, want 2 (b00, b01)", len(u.Limits))
				}
			},
		},
		{
			name: "spec with no limit for a beam",
			opts: func(o *synthOptions) { o.thetas = []float64{0, 30, 70} },
			want: []string{"specs/P16.yaml: spec P16 has no limit for beam b02"},
			check: func(t *testing.T, u *Unit) {
				if len(u.Beams[2].GTdBPerK) != 101 || len(u.Limits) != 2 {
					t.Errorf("b02 must still be reduced and the other limits judged")
				}
			},
		},
		{
			name: "refused transmission and unknown station",
			edit: func(in *Input) {
				in.Data.Beams[0].Transmission = nil
				in.Station = nil
				in.Problems = []*ingest.Problem{ingest.Problemf("u1/b00.s2p", 12, "bad number")}
			},
			want: []string{"u1/b00.s2p:12: bad number", `u1/run.yaml: station "range-1" is unknown or was refused`},
			check: func(t *testing.T, u *Unit) {
				if strings.Count(problemText(u), "u1/b00.s2p") != 1 {
					t.Errorf("the refusal of u1/b00.s2p must be listed once:\n%s", problemText(u))
				}
				if u.Beams[0].GainDBi != nil || len(u.Beams[1].GTdBPerK) != 101 {
					t.Error("b00 has no gain, b01 must be reduced")
				}
			},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			o := synthOptions{}
			if c.opts != nil {
				c.opts(&o)
			}
			in := synthInput(o)
			if c.edit != nil {
				c.edit(&in)
			}
			u := ReduceUnit(in)
			if u.Verdict != VerdictIncomplete {
				t.Errorf("verdict %s, want incomplete", u.Verdict)
			}
			text := problemText(u)
			for _, w := range c.want {
				if !strings.Contains(text, w) {
					t.Errorf("problems lack %q; got:\n%s", w, text)
				}
			}
			c.check(t, u)
		})
	}
}

func TestReduceUnitNeverPanics(t *testing.T) {
	inputs := []Input{
		{},
		{Run: &ingest.Run{File: "r.yaml"}},
		{Run: &ingest.Run{File: "r.yaml", Beams: []ingest.Beam{{ID: "b0", Noise: []ingest.NoiseInput{{File: "n.csv", Quantity: "odd"}}}}},
			Data: &ingest.RunData{Beams: []ingest.BeamData{{Noise: []*ingest.Trace{{File: "n.csv", FrequencyHz: []float64{2, 1}, Values: []float64{0, 0}}}}}}},
		{Run: &ingest.Run{File: "r.yaml"}, Reference: &ingest.Reference{Table: []ingest.ReferencePoint{{FrequencyHz: 1}}},
			Data: &ingest.RunData{RangePre: &ingest.Transmission{FrequencyHz: []float64{1, 2}, ParameterDB: []float64{1}}}},
	}
	for i, in := range inputs {
		u := ReduceUnit(in)
		if u == nil || u.Verdict != VerdictIncomplete || len(u.Problems) == 0 {
			t.Errorf("input %d: %+v, want an incomplete unit with problems", i, u)
		}
	}
}

func TestReduceUnitRangeLossOnOtherGrid(t *testing.T) {
	// The reference measurement on its own 201-point grid over 10.5..13 GHz: the range loss is
	// interpolated onto each beam's transmission grid. The model's range loss is linear in
	// frequency, so linear interpolation must return it exactly (method.md section 3).
	in := synthInput(synthOptions{thetas: []float64{0, 30}})
	f := grid(10.5e9, 13e9, 201)
	for _, m := range []*ingest.Transmission{in.Data.RangePre, in.Data.RangePost} {
		off := m.ParameterDB[0] - (synthRefGain(m.FrequencyHz[0]) - synthRangeLoss(m.FrequencyHz[0]))
		m.FrequencyHz, m.ParameterDB, m.AntennaMatch = f, nil, nil
		for _, x := range f {
			m.ParameterDB = append(m.ParameterDB, synthRefGain(x)-synthRangeLoss(x)+off)
			m.AntennaMatch = append(m.AntennaMatch, 0.1)
		}
	}
	u := ReduceUnit(in)
	if len(u.Problems) != 0 {
		t.Fatalf("problems:\n%s", problemText(u))
	}
	b := u.Beams[0]
	found := false
	for _, s := range b.Interpolated {
		found = found || strings.Contains(s,
			"range loss of u1/ref-pre.s2p and u1/ref-post.s2p: interpolated from 201 points onto the 101-point grid of u1/b00.s2p")
	}
	if !found {
		t.Errorf("interpolated %q", b.Interpolated)
	}
	for i, x := range b.FrequencyHz {
		near(t, "range loss", b.RangeLossDB[i], synthRangeLoss(x), 1e-9)
		near(t, "G/T", b.GTdBPerK[i], synthTrueGT(0), 1e-9)
	}
}

func TestSummaryBoresight(t *testing.T) {
	// Boresight is the beam with the smallest |theta| among the beams with G/T; first on a tie.
	mk := func(id string, theta float64, gt bool) Beam {
		b := Beam{ID: id, ThetaDeg: theta, FrequencyHz: []float64{1, 2}}
		if gt {
			b.GTdBPerK = []float64{3, 4}
		}
		return b
	}
	cases := []struct {
		beams []Beam
		want  string
	}{
		{[]Beam{mk("b1", 30, true), mk("b0", 0, true), mk("b2", 0, true)}, "b0"},
		{[]Beam{mk("b0", 0, false), mk("b1", -10, true), mk("b2", 20, true)}, "b1"},
		{[]Beam{mk("b0", 0, false)}, ""},
	}
	for _, c := range cases {
		u := &Unit{Serial: "S", Verdict: VerdictPass, Beams: c.beams}
		s := u.Summary()
		got := ""
		if s.Boresight != nil {
			got = s.Boresight.Beam
		}
		if got != c.want || s.Serial != "S" || s.Verdict != VerdictPass {
			t.Errorf("boresight %q, want %q (%+v)", got, c.want, s)
		}
	}
}

func TestReduceUnitNoAUTMatch(t *testing.T) {
	// A CSV transmission has no |Gamma| of the AUT: the AUT mismatch term is left out of the
	// gain budget with a flag, and the reduction is otherwise complete.
	in := synthInput(synthOptions{thetas: []float64{0, 30}})
	in.Data.Beams[0].Transmission.AntennaMatch = nil
	u := ReduceUnit(in)
	if len(u.Problems) != 0 || u.Verdict != VerdictPass {
		t.Fatalf("verdict %s, problems:\n%s", u.Verdict, problemText(u))
	}
	flagged := false
	for _, f := range u.Flags {
		flagged = flagged || (f.Kind == "budget" && strings.Contains(f.Message, "beam(s) b00 hold no reflection coefficient of the AUT"))
	}
	if !flagged || len(u.Beams[0].GainBudget.Terms) != 4 || len(u.Beams[1].GainBudget.Terms) != 5 {
		t.Errorf("flags %+v; gain terms %d and %d, want 4 and 5", u.Flags,
			len(u.Beams[0].GainBudget.Terms), len(u.Beams[1].GainBudget.Terms))
	}
}
