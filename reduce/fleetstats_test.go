package reduce

import (
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"testing"
	"time"
)

// marginUnits makes one unit per margin, serials U01..., started one day
// apart in the order given, each with one limit "L" on one beam.
func marginUnits(margins []float64) []UnitSummary {
	var us []UnitSummary
	for i, m := range margins {
		v := VerdictPass
		if m < 0 {
			v = VerdictFail
		}
		us = append(us, UnitSummary{
			Serial:  fmt.Sprintf("U%02d", i+1),
			Product: "P",
			Started: mustTime(fmt.Sprintf("2026-11-%02dT09:00:00Z", i+1)),
			Verdict: v,
			Limits:  []LimitResult{{Name: "L", Beam: "b00", WorstMarginDB: m, Verdict: v}},
		})
	}
	return us
}

func TestFleetCpkAndControlChart(t *testing.T) {
	// Margins in test order 1.0, 2.0, 1.5, 3.0, 2.5 (worked by hand):
	//   mean = 10/5 = 2.0; squared deviations 1, 0, 0.25, 1, 0.25 = 2.5;
	//   s = sqrt(2.5/4) = 0.790569 (sample, n-1);
	//   Cpk = (2.0 - 0)/(3*0.790569) = 0.843274 (ISO 22514-2, LSL 0);
	//   moving ranges 1, 0.5, 1.5, 0.5, mean 0.875;
	//   limits 2.0 -/+ 2.66*0.875 = -0.3275, 4.3275 (Shewhart individuals
	//   chart, 2.66 = 3/1.128, general knowledge); no point beyond.
	us := marginUnits([]float64{1.0, 2.0, 1.5, 3.0, 2.5})
	// Serials out of test order: the chart must follow Started.
	us[0].Serial, us[4].Serial = "U05", "U01"
	f := ComputeFleet(us)
	ls := f.Products[0].Limits[0]
	checks := []struct {
		name      string
		got, want float64
	}{
		{"mean", ls.MeanMarginDB, 2.0},
		{"std", ls.StdMarginDB, 0.790569},
		{"Cpk", ls.Cpk, 0.843274},
		{"mean moving range", ls.Chart.MeanMovingRange, 0.875},
		{"centre", ls.Chart.CentreDB, 2.0},
		{"upper", ls.Chart.UpperDB, 4.3275},
		{"lower", ls.Chart.LowerDB, -0.3275},
		{"yield", ls.Yield, 1},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 1e-6 {
			t.Errorf("%s = %.6f, want %.6f", c.name, c.got, c.want)
		}
	}
	if want := []string{"U05", "U02", "U03", "U04", "U01"}; !reflect.DeepEqual(ls.Chart.Serials, want) {
		t.Errorf("chart order %v, want %v", ls.Chart.Serials, want)
	}
	if want := []float64{1.0, 2.0, 1.5, 3.0, 2.5}; !reflect.DeepEqual(ls.Chart.ValuesDB, want) {
		t.Errorf("chart values %v, want %v", ls.Chart.ValuesDB, want)
	}
	if len(ls.Chart.Beyond) != 0 || len(ls.Outliers) != 0 {
		t.Errorf("beyond %v outliers %v, want none", ls.Chart.Beyond, ls.Outliers)
	}

	// Nine margins of 0 then 5 (by hand): mean 0.5, moving ranges eight 0s
	// and one 5, mean 5/9 = 0.555556; upper = 0.5 + 2.66*0.555556 = 1.977778:
	// the last point (index 9) is beyond. The MAD is 0 (nine equal values),
	// so there are no modified-z outliers (Iglewicz and Hoaglin: MAD = 0
	// leaves z undefined).
	ls = ComputeFleet(marginUnits([]float64{0, 0, 0, 0, 0, 0, 0, 0, 0, 5})).Products[0].Limits[0]
	if math.Abs(ls.Chart.UpperDB-1.977778) > 1e-6 || !reflect.DeepEqual(ls.Chart.Beyond, []int{9}) {
		t.Errorf("upper %.6f beyond %v, want 1.977778 [9]", ls.Chart.UpperDB, ls.Chart.Beyond)
	}
	if len(ls.Outliers) != 0 {
		t.Errorf("outliers %v with MAD 0", ls.Outliers)
	}

	// One unit: no spread, Cpk 0 by definition here.
	ls = ComputeFleet(marginUnits([]float64{1.2})).Products[0].Limits[0]
	if ls.Cpk != 0 || ls.StdMarginDB != 0 || ls.MeanMarginDB != 1.2 || ls.Chart.UpperDB != 1.2 {
		t.Errorf("one unit: %+v", ls)
	}
}

func TestFleetModifiedZOutliers(t *testing.T) {
	// Iglewicz and Hoaglin (1993), z = 0.6745*(x - median)/MAD, |z| > 3.5.
	// Margins 1.0, 1.2, 0.9, 1.1, 1.0, 4.0, 0.8 (by hand): sorted 0.8 0.9 1.0
	// 1.0 1.1 1.2 4.0, median 1.0; absolute deviations 0 0 0.1 0.1 0.2 0.2 3.0,
	// MAD 0.1. The planted outlier is U06 (4.0): z = 0.6745*3.0/0.1 = 20.235.
	// The next largest, 1.2 and 0.8, have |z| = 0.6745*0.2/0.1 = 1.349 < 3.5.
	ls := ComputeFleet(marginUnits([]float64{1.0, 1.2, 0.9, 1.1, 1.0, 4.0, 0.8})).Products[0].Limits[0]
	if len(ls.Outliers) != 1 {
		t.Fatalf("outliers %v, want U06 only", ls.Outliers)
	}
	o := ls.Outliers[0]
	if o.Serial != "U06" || o.MarginDB != 4.0 || math.Abs(o.ModifiedZ-20.235) > 1e-9 {
		t.Errorf("outlier %+v, want U06 4.0 z 20.235", o)
	}
}

func TestFleetYieldAndVerdicts(t *testing.T) {
	// Yield = (pass + conditional-pass)/judged; incomplete results are not
	// judged. Per unit the worst margin over the limit's beams counts.
	lim := func(beam string, m float64, v Verdict) LimitResult {
		return LimitResult{Name: "G/T", Beam: beam, WorstMarginDB: m, Verdict: v}
	}
	us := []UnitSummary{
		{Serial: "A", Product: "P", Verdict: VerdictPass, Limits: []LimitResult{lim("b00", 1.0, VerdictPass), lim("b30", 0.4, VerdictPass)}},
		{Serial: "B", Product: "P", Verdict: VerdictConditionalPass, Limits: []LimitResult{lim("b00", 0.1, VerdictConditionalPass), lim("b30", 0.9, VerdictPass)}},
		{Serial: "C", Product: "P", Verdict: VerdictConditionalFail, Limits: []LimitResult{lim("b00", -0.1, VerdictConditionalFail)}},
		{Serial: "D", Product: "P", Verdict: VerdictFail, Limits: []LimitResult{lim("b00", 2.0, VerdictPass), lim("b30", -1.0, VerdictFail)}},
		{Serial: "E", Product: "P", Verdict: VerdictIncomplete, Limits: []LimitResult{lim("b00", 0, VerdictIncomplete)}},
		{Serial: "F", Product: "Q", Verdict: VerdictPass, Limits: []LimitResult{lim("b00", 3.0, VerdictPass)}},
	}
	f := ComputeFleet(us)
	if len(f.Products) != 2 || f.Products[0].Product != "P" || f.Products[1].Product != "Q" {
		t.Fatalf("products %+v", f.Products)
	}
	p := f.Products[0]
	wantCounts := map[Verdict]int{VerdictPass: 1, VerdictConditionalPass: 1, VerdictConditionalFail: 1, VerdictFail: 1, VerdictIncomplete: 1}
	if p.Units != 5 || !reflect.DeepEqual(p.VerdictCounts, wantCounts) {
		t.Errorf("units %d counts %v", p.Units, p.VerdictCounts)
	}
	ls := p.Limits[0]
	if ls.Units != 4 || ls.Passed != 2 || ls.Yield != 0.5 {
		t.Errorf("judged %d passed %d yield %g, want 4 2 0.5", ls.Units, ls.Passed, ls.Yield)
	}
	// Worst margins per unit: A 0.4, B 0.1, C -0.1, D -1.0 (sorted by serial
	// as no unit has a start time).
	if want := []float64{0.4, 0.1, -0.1, -1.0}; !reflect.DeepEqual(ls.Chart.ValuesDB, want) {
		t.Errorf("worst margins %v, want %v", ls.Chart.ValuesDB, want)
	}
}

// bandFleet makes ten passing units of product P with boresight G/T
// base(f) + offset(u), offsets -0.1, -0.05, 0, 0.05, 0.1 twice over.
func bandFleet() []UnitSummary {
	fs := gridHz(11, 12, 0.1) // 11 points
	var us []UnitSummary
	for u := range 10 {
		off := 0.05 * float64(u%5-2)
		tr := &BoresightTrace{Beam: "b00"}
		for _, f := range fs {
			tr.FrequencyHz = append(tr.FrequencyHz, f)
			tr.GTdBPerK = append(tr.GTdBPerK, 3+0.4*(f/1e9-11)+off)
		}
		us = append(us, UnitSummary{
			Serial: fmt.Sprintf("U%02d", u), Product: "P", Verdict: VerdictPass,
			Started:   mustTime(fmt.Sprintf("2026-10-%02dT08:00:00Z", 20-u)),
			Limits:    []LimitResult{{Name: "L", WorstMarginDB: 1 + off, Verdict: VerdictPass}},
			Boresight: tr,
		})
	}
	return us
}

func TestFleetGoldenBandAndWatch(t *testing.T) {
	us := bandFleet()
	// U04 (passing) planted 1 dB low at 11.3, 11.4 and 11.5 GHz; U07 fails
	// and is planted 1 dB low at 11.8 and 11.9 GHz: only U04 is watched.
	for _, k := range []int{3, 4, 5} {
		us[4].Boresight.GTdBPerK[k] -= 1
	}
	us[7].Verdict = VerdictFail
	for _, k := range []int{8, 9} {
		us[7].Boresight.GTdBPerK[k] -= 1
	}
	// U09 on another, narrower grid (interpolation is exact: linear in f).
	tr := us[9].Boresight
	tr.FrequencyHz, tr.GTdBPerK = nil, nil
	for _, f := range gridHz(11.05, 11.95, 0.15) {
		tr.FrequencyHz = append(tr.FrequencyHz, f)
		tr.GTdBPerK = append(tr.GTdBPerK, 3+0.4*(f/1e9-11)+0.1)
	}

	f := ComputeFleet(us)
	p := f.Products[0]
	if p.Band == nil {
		t.Fatal("no band")
	}
	if p.Band.Units != 10 || len(p.Band.FrequencyHz) != 11 {
		t.Errorf("band of %d units at %d frequencies, want 10 at 11", p.Band.Units, len(p.Band.FrequencyHz))
	}
	// At 11.0 GHz (k = 0) only nine units cover (U09 starts at 11.05):
	// offsets -0.1 -0.05 0 0.05 0.1 -0.1 -0.05 0 0.05 around 3.0, by hand
	// median 0, absolute deviations 0 0 .05 .05 .05 .05 .1 .1 .1 -> MAD 0.05,
	// half-width 3*1.4826*0.05 = 0.222390 (band = median -/+ 3*1.4826*MAD).
	//
	// Tolerance 1e-7 dB: the builder keeps the traces as float32
	// differences from the first (here at most 0.2 dB, half an ulp of which
	// is 7.5e-9 dB, IEEE 754 binary32), and the half-width is 4.45 MADs.
	if math.Abs(p.Band.MedianDB[0]-3.0) > 1e-7 || math.Abs(p.Band.HighDB[0]-3.222390) > 1e-7 ||
		math.Abs(p.Band.LowDB[0]-2.777610) > 1e-7 {
		t.Errorf("band at 11 GHz: %g [%g, %g], want 3 [2.777610, 3.222390]",
			p.Band.MedianDB[0], p.Band.LowDB[0], p.Band.HighDB[0])
	}
	// At 11.1 GHz (k = 1) all ten: offsets twice -0.1..0.1, median 0,
	// deviations 0 0 .05 .05 .05 .05 .1 .1 .1 .1 -> MAD 0.05 again.
	if math.Abs(p.Band.MedianDB[1]-3.04) > 1e-7 || math.Abs(p.Band.HighDB[1]-p.Band.MedianDB[1]-0.222390) > 1e-7 {
		t.Errorf("band at 11.1 GHz: %g [%g, %g]", p.Band.MedianDB[1], p.Band.LowDB[1], p.Band.HighDB[1])
	}
	if len(p.Watch) != 1 || p.Watch[0].Serial != "U04" {
		t.Fatalf("watch %+v, want U04 only", p.Watch)
	}
	want := []float64{11.3e9, 11.4e9, 11.5e9}
	got := p.Watch[0].FrequenciesHz
	if len(got) != len(want) {
		t.Fatalf("U04 watched at %v, want %v", got, want)
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1 {
			t.Errorf("U04 watched at %v, want %v", got, want)
		}
	}

	if r := p.Watch[0].RangesHz; len(r) != 1 || math.Abs(r[0][0]-11.3e9) > 1 || math.Abs(r[0][1]-11.5e9) > 1 {
		t.Errorf("U04 watch ranges %v, want one range 11.3 to 11.5 GHz", r)
	}

	// Units out in serial order, one entry per limit name.
	for i, u := range f.Units {
		if u.Serial != fmt.Sprintf("U%02d", i) || len(u.Limits) != 1 || u.Limits[0].Name != "L" {
			t.Errorf("unit %d: %s limits %+v", i, u.Serial, u.Limits)
		}
	}
	if us[0].Boresight == nil {
		t.Error("the input was modified")
	}
}

func TestFleetBandNeedsFiveUnits(t *testing.T) {
	us := bandFleet()[:4]
	us[1].Boresight.GTdBPerK[0] -= 5
	p := ComputeFleet(us).Products[0]
	if p.Band != nil || len(p.Watch) != 0 {
		t.Errorf("four units: band %v watch %v, want none", p.Band, p.Watch)
	}
}

func TestFleetDeterministic(t *testing.T) {
	// The same units in another order give byte-identical JSON.
	us := bandFleet()
	us[4].Boresight.GTdBPerK[2] -= 1
	a, err := json.Marshal(ComputeFleet(us))
	if err != nil {
		t.Fatal(err)
	}
	rev := append([]UnitSummary(nil), us...)
	for i, j := 0, len(rev)-1; i < j; i, j = i+1, j-1 {
		rev[i], rev[j] = rev[j], rev[i]
	}
	b, err := json.Marshal(ComputeFleet(rev))
	if err != nil {
		t.Fatal(err)
	}
	if string(a) != string(b) {
		t.Error("fleet JSON depends on the order of units")
	}
	empty := ComputeFleet(nil)
	if empty.Units == nil || empty.Products == nil || empty.Stations == nil || empty.References == nil || empty.CheckUnits == nil ||
		len(empty.Units)+len(empty.Products)+len(empty.Stations)+len(empty.References)+len(empty.CheckUnits) > 0 {
		t.Errorf("empty fleet: %+v, want empty lists", empty)
	}
}

// BenchmarkComputeFleet is a fleet of 2000 units with 201-point boresight
// traces and three limits each.
func BenchmarkComputeFleet(b *testing.B) {
	fs := gridHz(10.7, 12.7, 0.01)
	var us []UnitSummary
	for u := range 2000 {
		off := 0.01 * float64(u%37-18)
		tr := &BoresightTrace{Beam: "b00"}
		for _, f := range fs {
			tr.FrequencyHz = append(tr.FrequencyHz, f)
			tr.GTdBPerK = append(tr.GTdBPerK, 3+0.4*(f/1e9-11)+off)
		}
		var ls []LimitResult
		for _, name := range []string{"boresight", "scanned", "gain"} {
			ls = append(ls, LimitResult{Name: name, WorstMarginDB: 1 + off, Verdict: VerdictPass})
		}
		us = append(us, UnitSummary{Serial: fmt.Sprintf("S%05d", u), Product: "P", Verdict: VerdictPass,
			Started: mustTime(fmt.Sprintf("2026-%02d-%02dT08:00:00Z", 1+u%12, 1+u%28)), Limits: ls, Boresight: tr})
	}
	for b.Loop() {
		ComputeFleet(us)
	}
}

// On a fine grid the traces and the band are smoothed (1/40 of the grid):
// point-to-point scatter alone puts no unit on the watch list, a shift over
// a stretch of the band does, as one range.
func TestFleetWatchIgnoresPointScatter(t *testing.T) {
	fs := gridHz(10, 12, 0.0025) // 801 points: window 21
	var us []UnitSummary
	for u := range 8 {
		tr := &BoresightTrace{Beam: "b00"}
		for k, f := range fs {
			// Each unit: a small offset and +/-0.3 dB alternating scatter, zero mean.
			scatter := 0.3 * float64(1-2*((k+u)%2))
			tr.FrequencyHz = append(tr.FrequencyHz, f)
			tr.GTdBPerK = append(tr.GTdBPerK, 3+0.02*float64(u%4)+scatter)
		}
		us = append(us, UnitSummary{Serial: fmt.Sprintf("W%02d", u), Product: "P", Verdict: VerdictPass,
			Started: mustTime(fmt.Sprintf("2026-10-%02dT08:00:00Z", 1+u)), Boresight: tr})
	}
	// W05 is 1 dB low from 11.0 to 11.25 GHz (points 400..500).
	for k := 400; k <= 500; k++ {
		us[5].Boresight.GTdBPerK[k] -= 1
	}
	p := ComputeFleet(us).Products[0]
	if p.Band == nil || p.Band.SmoothingPoints != 21 {
		t.Fatalf("band %+v, want one smoothed over 21 points", p.Band)
	}
	if len(p.Watch) != 1 || p.Watch[0].Serial != "W05" || len(p.Watch[0].RangesHz) != 1 {
		t.Fatalf("watch %+v, want W05 alone with one range", p.Watch)
	}
	r := p.Watch[0].RangesHz[0]
	// The smoothed step leaves the band within half a window of its edges.
	if r[0] < 10.97e9 || r[0] > 11.03e9 || r[1] < 11.22e9 || r[1] > 11.28e9 {
		t.Errorf("W05 watched from %.4g to %.4g Hz, want about 11.0 to 11.25 GHz", r[0], r[1])
	}
}

// TestFleetBuilderUnitLimits checks the per-name view of a unit's limit
// results against the definitions of FleetUnitLimit, worked by hand: the
// smallest finite margin with its beam, the worst verdict (WorseVerdict:
// pass < conditional-pass < conditional-fail < fail < incomplete), and that
// only judged results with a finite margin enter the statistics.
func TestFleetBuilderUnitLimits(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(-1)
	tests := []struct {
		name       string
		results    []LimitResult
		beam       string
		worst      float64 // NaN: none finite
		verdict    Verdict
		chartValue float64 // NaN: not judged, not on the chart
	}{
		{"one beam", []LimitResult{{Beam: "b00", WorstMarginDB: 0.5, Verdict: VerdictPass}}, "b00", 0.5, VerdictPass, 0.5},
		{"worst of three beams", []LimitResult{
			{Beam: "b01", WorstMarginDB: 0.9, Verdict: VerdictPass},
			{Beam: "b02", WorstMarginDB: 0.2, Verdict: VerdictConditionalPass},
			{Beam: "b03", WorstMarginDB: 0.4, Verdict: VerdictPass}}, "b02", 0.2, VerdictConditionalPass, 0.2},
		{"first beam wins a tie", []LimitResult{
			{Beam: "b04", WorstMarginDB: 0.3, Verdict: VerdictPass},
			{Beam: "b05", WorstMarginDB: 0.3, Verdict: VerdictPass}}, "b04", 0.3, VerdictPass, 0.3},
		{"incomplete shown, not judged", []LimitResult{
			{Beam: "b00", WorstMarginDB: -0.4, Verdict: VerdictIncomplete},
			{Beam: "b01", WorstMarginDB: 0.6, Verdict: VerdictPass}}, "b00", -0.4, VerdictIncomplete, 0.6},
		{"margins not finite", []LimitResult{
			{Beam: "b00", WorstMarginDB: nan, Verdict: VerdictFail},
			{Beam: "b01", WorstMarginDB: inf, Verdict: VerdictFail}}, "", nan, VerdictFail, nan},
	}
	for _, tc := range tests {
		b := NewFleetBuilder()
		for i := range tc.results {
			tc.results[i].Name = "L"
		}
		if err := b.Add(UnitSummary{Serial: "S1", Product: "P", Verdict: VerdictPass, Limits: tc.results}); err != nil {
			t.Fatal(err)
		}
		f := b.Finish()
		got := f.Units[0].Limits
		if len(got) != 1 || got[0].Name != "L" || got[0].Beam != tc.beam || got[0].Verdict != tc.verdict ||
			!(got[0].WorstMarginDB == tc.worst || math.IsNaN(tc.worst) && math.IsNaN(got[0].WorstMarginDB)) {
			t.Errorf("%s: %+v, want beam %q margin %v verdict %s", tc.name, got, tc.beam, tc.worst, tc.verdict)
		}
		chart := f.Products[0].Limits[0].Chart.ValuesDB
		if math.IsNaN(tc.chartValue) && len(chart) != 0 || !math.IsNaN(tc.chartValue) && (len(chart) != 1 || chart[0] != tc.chartValue) {
			t.Errorf("%s: chart values %v, want %v", tc.name, chart, tc.chartValue)
		}
	}
}

// Add keeps the serial order the band's grid depends on.
func TestFleetBuilderRefusesSerialOrder(t *testing.T) {
	b := NewFleetBuilder()
	for _, s := range []string{"A-01", "A-02", "A-02"} {
		if err := b.Add(UnitSummary{Serial: s, Product: "P"}); err != nil {
			t.Fatalf("%s: %v", s, err)
		}
	}
	if err := b.Add(UnitSummary{Serial: "A-01", Product: "P"}); err == nil {
		t.Error("a serial before the previous one was accepted")
	}
	if n := len(b.Finish().Units); n != 3 {
		t.Errorf("%d units after a refused one, want 3", n)
	}
}

// TestFleetBuilderBandPrecision: the band from the builder's float32
// differences against the median computed in float64 from the traces
// themselves. Traces of 41 units, offsets spread over +-1.5 dB around a
// 12 dB/K slope, on the first unit's grid (no interpolation); smoothing is
// 1 point at 41 grid points (41/40 = 1), so the band median at each
// frequency is the plain median of the 41 values (general knowledge).
func TestFleetBuilderBandPrecision(t *testing.T) {
	fs := gridHz(10, 12, 0.05) // 41 points
	var us []UnitSummary
	for u := range 41 {
		off := 1.5 * math.Sin(float64(u)*2.1)
		tr := &BoresightTrace{Beam: "b00"}
		for _, f := range fs {
			tr.FrequencyHz = append(tr.FrequencyHz, f)
			tr.GTdBPerK = append(tr.GTdBPerK, 12+0.37*(f/1e9-10)+off+0.013*math.Cos(f/1e8))
		}
		us = append(us, UnitSummary{Serial: fmt.Sprintf("S%03d", u), Product: "P", Verdict: VerdictPass, Boresight: tr})
	}
	p := ComputeFleet(us).Products[0]
	if p.Band == nil || p.Band.SmoothingPoints != 1 || len(p.Band.MedianDB) != len(fs) {
		t.Fatalf("band %+v", p.Band)
	}
	worst := 0.0
	for k := range fs {
		col := make([]float64, len(us))
		for i, u := range us {
			col[i] = u.Boresight.GTdBPerK[k]
		}
		worst = math.Max(worst, math.Abs(p.Band.MedianDB[k]-fleetMedian(col)))
	}
	// Differences up to 3 dB from the first trace: half an ulp of float32
	// at 2..4 is 1.2e-7 (IEEE 754 binary32); fleet.json writes 1e-6.
	if worst > 2.4e-7 {
		t.Errorf("band median off the float64 median by %.3g dB, want within 2.4e-7", worst)
	}
}

// The golden band's grid holds at most maxBandGridPoints frequencies: a
// product whose traces have 100,001 points (ingest.MaxTracePoints) gets
// every 63rd of them and the last, so the band spans the trace; a grid of
// 1,601 points or fewer is the trace's own.
func TestFleetBandGridBounded(t *testing.T) {
	for _, c := range []struct{ points, want int }{{1601, 1601}, {1602, 802}, {100001, 1589}} {
		fs := make([]float64, c.points)
		for k := range fs {
			fs[k] = 10.7e9 + float64(k)*2.05e9/float64(c.points-1)
		}
		g := bandGrid(fs)
		if len(g) != c.want || g[0] != fs[0] || g[len(g)-1] != fs[len(fs)-1] {
			t.Errorf("%d points: grid of %d from %g to %g, want %d from %g to %g", c.points, len(g), g[0], g[len(g)-1], c.want, fs[0], fs[len(fs)-1])
		}
		for k := 1; k < len(g); k++ {
			if !(g[k] > g[k-1]) {
				t.Fatalf("%d points: grid not increasing at %d", c.points, k)
			}
		}
	}
	us := bandFleet()
	for _, u := range us {
		tr := u.Boresight
		tr.FrequencyHz, tr.GTdBPerK = make([]float64, 100001), make([]float64, 100001)
		for k := range tr.FrequencyHz {
			tr.FrequencyHz[k] = 11e9 + float64(k)*1e4
			tr.GTdBPerK[k] = 3
		}
	}
	p := ComputeFleet(us).Products[0]
	if p.Band == nil || len(p.Band.FrequencyHz) != 1589 || p.Band.FrequencyHz[1588] != 12e9 {
		t.Errorf("band of 100,001-point traces: %v", p.Band)
	}
}

// First-pass and final yield by month (method.md section 10: first-pass
// yield counts units whose first run passed; the final yield each unit at
// its acceptance run), worked by hand:
//
//	November: U01 pass (1 run), U02 fail, then pass on retest (2 runs),
//	          U03 conditional pass (1 run), U04 incomplete (not judged),
//	          U05 fail (1 run; started 00:30 on 1 December at +01:00,
//	          which is 30 November in UTC): judged 4; first pass U01, U03
//	          = 2/4; final U01, U02, U03 = 3/4; retested 1.
//	December: U06 fail then fail (2 runs): 0/1 and 0/1; retested 1.
//	Overall:  first pass 2/5 = 0.4, final 3/5 = 0.6.
func TestFleetYieldByMonth(t *testing.T) {
	mk := func(serial, started string, first, final Verdict, runs int) UnitSummary {
		return UnitSummary{Serial: serial, Product: "P", Started: mustTime(started), Verdict: final, FirstVerdict: first, Runs: runs,
			Limits: []LimitResult{{Name: "L", Beam: "b00", WorstMarginDB: 1, Verdict: final}}}
	}
	us := []UnitSummary{
		mk("U01", "2026-11-02T09:00:00Z", VerdictPass, VerdictPass, 1),
		mk("U02", "2026-11-10T09:00:00Z", VerdictFail, VerdictPass, 2),
		mk("U03", "2026-11-20T09:00:00Z", VerdictConditionalPass, VerdictConditionalPass, 1),
		mk("U04", "2026-11-30T23:00:00Z", VerdictIncomplete, VerdictIncomplete, 1),
		mk("U05", "2026-12-01T00:30:00+01:00", VerdictFail, VerdictFail, 1), // 2026-11-30 23:30 UTC
		mk("U06", "2026-12-05T09:00:00Z", VerdictFail, VerdictFail, 2),
	}
	p := ComputeFleet(us).Products[0]
	if len(p.Months) != 2 {
		t.Fatalf("months %+v", p.Months)
	}
	nov, dec := p.Months[0], p.Months[1]
	// U05 started 00:30 at +01:00: November in UTC.
	if nov.Month != "2026-11" || nov.Units != 5 || nov.Retested != 1 || nov.VerdictCounts[VerdictIncomplete] != 1 {
		t.Errorf("November: %+v", nov)
	}
	if math.Abs(nov.FirstPassYield-2.0/4) > 1e-12 || math.Abs(nov.FinalYield-3.0/4) > 1e-12 {
		t.Errorf("November yields %v %v, want 2/4 and 3/4 (U05 is November's in UTC)", nov.FirstPassYield, nov.FinalYield)
	}
	if dec.Month != "2026-12" || dec.Units != 1 || dec.FirstPassYield != 0 || dec.FinalYield != 0 || dec.Retested != 1 {
		t.Errorf("December: %+v", dec)
	}
	if math.Abs(p.FirstPassYield-0.4) > 1e-12 || math.Abs(p.FinalYield-0.6) > 1e-12 {
		t.Errorf("overall %v %v, want 0.4 and 0.6", p.FirstPassYield, p.FinalYield)
	}
	for _, u := range ComputeFleet(us).Units {
		if u.Serial == "U02" && (u.Runs != 2 || u.FirstVerdict != VerdictFail) {
			t.Errorf("U02: %+v", u)
		}
	}
}

// Small samples (method.md section 10): below 10 points no point is
// called out of control, below 30 units the capability is indicative.
func TestFleetSmallSamples(t *testing.T) {
	ls := ComputeFleet(marginUnits([]float64{0, 0, 0, 0, 0, 0, 0, 0, 5})).Products[0].Limits[0]
	if !ls.Chart.TooFew || len(ls.Chart.Beyond) != 0 || !ls.Indicative {
		t.Errorf("nine points: too few %v beyond %v indicative %v", ls.Chart.TooFew, ls.Chart.Beyond, ls.Indicative)
	}
	many := make([]float64, 30)
	for i := range many {
		many[i] = 1 + 0.01*float64(i%3)
	}
	ls = ComputeFleet(marginUnits(many)).Products[0].Limits[0]
	if ls.Chart.TooFew || ls.Indicative {
		t.Errorf("thirty units: too few %v indicative %v", ls.Chart.TooFew, ls.Indicative)
	}
}

// mustTime parses an RFC 3339 time of a test.
func mustTime(s string) time.Time {
	t, err := time.Parse(time.RFC3339, s)
	if err != nil {
		panic(err)
	}
	return t
}

// mustDate parses a date YYYY-MM-DD of a test.
func mustDate(s string) time.Time {
	t, err := time.Parse(time.DateOnly, s)
	if err != nil {
		panic(err)
	}
	return t
}
