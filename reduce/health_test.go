package reduce

import (
	"fmt"
	"math"
	"reflect"
	"testing"
	"time"

	"gtpack.example/gtpack/ingest"
)

// The range check of a run: the range loss at the grid point nearest the
// centre of the range-loss grid, its drift there, and whether the run used
// its reference past the due date.
func TestRangeCheckOf(t *testing.T) {
	run := &ingest.Run{Dir: "runs/U1/a", Station: "chamber-2", Reference: "horn-r7",
		Started: time.Date(2027, 3, 1, 9, 0, 0, 0, time.UTC)}
	ref := &ingest.Reference{Due: time.Date(2027, 2, 10, 0, 0, 0, 0, time.UTC)}
	rl := &RangeLoss{FrequencyHz: []float64{10e9, 11e9, 12e9, 13.5e9}, RangeLossDB: []float64{50, 51, 52, 53},
		DriftDB: []float64{0.01, 0.02, 0.03, 0.04}}
	c := RangeCheckOf(run, &ingest.Station{DriftToleranceDB: 0.25}, ref, rl)
	// Centre (10 + 13.5)/2 = 11.75 GHz: 12 GHz is nearer than 11.
	if c == nil || c.FrequencyHz != 12e9 || c.RangeLossDB != 52 || c.DriftDB == nil || *c.DriftDB != 0.03 || !c.PastDue || !c.ReferenceDue.Equal(mustDate("2027-02-10")) || c.DriftToleranceDB != 0.25 {
		t.Errorf("range check %+v", c)
	}
	run.Started = time.Date(2027, 2, 9, 9, 0, 0, 0, time.UTC)
	rl.DriftDB = nil
	if c := RangeCheckOf(run, &ingest.Station{DriftToleranceDB: 0.25}, ref, rl); c.PastDue || c.DriftDB != nil {
		t.Errorf("before the due date, one measurement: %+v", c)
	}
	if RangeCheckOf(run, nil, ref, nil) != nil {
		t.Error("a range check without a range loss")
	}
}

// A range chart (method.md sections 10 and 12), worked by hand: twenty
// baseline runs alternating 50.0 and 50.1 dB give a centre of 50.05 dB and
// a mean moving range of 0.1 dB, so limits 50.05 -/+ 0.266 = 49.784 and
// 50.316 dB (2.66 = 3/1.128, Shewhart individuals chart, general
// knowledge). From run 21 on the range loss steps up by 0.4 dB (a moved
// feed): every later run is beyond the upper limit and listed, and the
// limits stay those of the baseline.
func TestRangeChartsPlantedStep(t *testing.T) {
	checks := map[string][]RangeCheck{}
	for i := 0; i < 26; i++ {
		v := 50.0 + 0.1*float64(i%2)
		if i >= 20 {
			v += 0.4
		}
		serial := fmt.Sprintf("U%02d", i+1)
		checks[serial] = append(checks[serial], RangeCheck{Run: "runs/" + serial, Station: "chamber-2", Reference: "horn-r7",
			Started: time.Date(2027, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, i), FrequencyHz: 11.7e9, RangeLossDB: v})
	}
	// Another pair, with too few runs to call any out of control.
	checks["G1"] = []RangeCheck{{Run: "runs/G1/a", Station: "chamber-2", Reference: "horn-s1", Started: mustTime("2027-01-05T00:00:00Z"), RangeLossDB: 40},
		{Run: "runs/G1/b", Station: "chamber-2", Reference: "horn-s1", Started: mustTime("2027-01-06T00:00:00Z"), RangeLossDB: 45}}
	charts := RangeCharts(checks)
	if len(charts) != 2 || charts[0].Reference != "horn-r7" || charts[1].Reference != "horn-s1" {
		t.Fatalf("charts %+v", charts)
	}
	c := charts[0]
	if c.Baseline != 20 || math.Abs(c.CentreDB-50.05) > 1e-9 || math.Abs(c.UCLDB-50.316) > 1e-9 || math.Abs(c.LCLDB-49.784) > 1e-9 {
		t.Errorf("limits: baseline %d centre %.6f LCL %.6f UCL %.6f", c.Baseline, c.CentreDB, c.LCLDB, c.UCLDB)
	}
	if want := []int{20, 21, 22, 23, 24, 25}; !reflect.DeepEqual(c.OutOfControl, want) {
		t.Errorf("out of control %v, want %v", c.OutOfControl, want)
	}
	if c.Points[20].Serial != "U21" || c.Points[0].Serial != "U01" {
		t.Errorf("points not in time order: %v ... %v", c.Points[0], c.Points[20])
	}
	if g := charts[1]; !g.TooFew || len(g.OutOfControl) != 0 || len(g.Points) != 2 {
		t.Errorf("two runs: %+v", g)
	}
}

// A check unit (a station's golden unit) is counted in no product's yield
// or capability and gets a chart of its own G/T at band centre; a product
// made of check units only is not listed.
func TestCheckUnitsLeaveTheYield(t *testing.T) {
	gt := func(v float64) *float64 { return &v }
	var us []UnitSummary
	for i := 0; i < 3; i++ {
		us = append(us, UnitSummary{Serial: fmt.Sprintf("U%02d", i+1), Product: "P", Started: mustTime(fmt.Sprintf("2027-01-%02dT09:00:00Z", i+1)), Verdict: VerdictPass,
			Runs: 1, FirstVerdict: VerdictPass, Limits: []LimitResult{{Name: "L", Beam: "b00", WorstMarginDB: 1, Verdict: VerdictPass}}})
	}
	golden := UnitSummary{Serial: "GOLD-01", Product: "P", Started: mustTime("2027-01-20T09:00:00Z"), Verdict: VerdictFail, Runs: 12, FirstVerdict: VerdictFail,
		CheckUnit: true, Limits: []LimitResult{{Name: "L", Beam: "b00", WorstMarginDB: -1, Verdict: VerdictFail}}}
	for k := 0; k < 12; k++ {
		golden.RangeChecks = append(golden.RangeChecks, RangeCheck{Run: fmt.Sprintf("runs/GOLD-01/%02d", k), Station: "chamber-2", Reference: "horn-r7",
			Started: mustTime(fmt.Sprintf("2027-01-%02dT08:00:00Z", k+5)), FrequencyHz: 11.7e9, RangeLossDB: 50, Beam: "b00", GTdBPerK: gt(3.0 + 0.01*float64(k%2))})
	}
	other := UnitSummary{Serial: "GOLD-02", Product: "GOLDEN-ONLY", Started: mustTime("2027-01-21T09:00:00Z"), Verdict: VerdictPass, CheckUnit: true}
	f := ComputeFleet(append(us, golden, other))
	if len(f.Products) != 1 {
		t.Fatalf("products %+v, want P alone", f.Products)
	}
	p := f.Products[0]
	if p.Units != 3 || p.VerdictCounts[VerdictFail] != 0 || p.FinalYield != 1 || p.Limits[0].Units != 3 {
		t.Errorf("the check unit counted in P: %d units, counts %v, yield %v", p.Units, p.VerdictCounts, p.FinalYield)
	}
	marked := 0
	for _, u := range f.Units {
		if u.CheckUnit != (u.Serial == "GOLD-01" || u.Serial == "GOLD-02") {
			t.Errorf("unit %s: check unit %v", u.Serial, u.CheckUnit)
		}
		if u.CheckUnit {
			marked++
		}
	}
	if len(f.Units) != 5 || marked != 2 {
		t.Errorf("%d units, %d marked as check units; want 5 and 2", len(f.Units), marked)
	}
	if len(f.CheckUnits) != 1 || f.CheckUnits[0].Serial != "GOLD-01" || len(f.CheckUnits[0].Points) != 12 || f.CheckUnits[0].TooFew {
		t.Fatalf("check unit charts %+v", f.CheckUnits)
	}
	// Twelve values alternating 3.00 and 3.01: centre 3.005, mean moving
	// range 0.01, limits 3.005 -/+ 0.0266 (hand-worked).
	c := f.CheckUnits[0]
	if math.Abs(c.CentreDB-3.005) > 1e-9 || math.Abs(c.UCLDB-3.0316) > 1e-9 || len(c.OutOfControl) != 0 {
		t.Errorf("check unit chart: centre %v UCL %v out %v", c.CentreDB, c.UCLDB, c.OutOfControl)
	}
}
