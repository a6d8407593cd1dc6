package render

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/go-echarts/go-echarts/v2/opts"

	"gtpack.example/gtpack/reduce"
)

// healthFleet is a fleet of 26 units on one range whose range loss steps
// up by 0.4 dB from the 21st run on (a moved feed), one run a week from
// 2027-01-01; the reference is due on 2027-06-01, so the runs from the
// 23rd on (2027-06-04) used it past due.
func healthFleet() *reduce.Fleet {
	var us []reduce.UnitSummary
	day0 := time.Date(2027, 1, 1, 9, 0, 0, 0, time.UTC)
	due := time.Date(2027, 6, 1, 0, 0, 0, 0, time.UTC)
	for i := 0; i < 26; i++ {
		serial := fmt.Sprintf("KP16-%05d", i+1)
		v := 50.0 + 0.1*float64(i%2)
		if i >= 20 {
			v += 0.4
		}
		drift := 0.05
		if i == 7 {
			drift = 0.4
		}
		t := day0.AddDate(0, 0, 7*i)
		started := t
		us = append(us, reduce.UnitSummary{Serial: serial, Product: "KU-PANEL-16", Started: started, Verdict: reduce.VerdictPass,
			RangeChecks: []reduce.RangeCheck{{Run: "runs/" + serial + "/a", Started: started, Station: "range-b", Reference: "horn-0042",
				FrequencyHz: 11.725e9, RangeLossDB: v, DriftDB: &drift, DriftToleranceDB: 0.25,
				ReferenceCertificate: "LAB-26-0211", ReferenceCalibrated: mustDate("2026-02-10"), ReferenceDue: mustDate("2027-06-01"), PastDue: t.After(due)}}})
	}
	gold := reduce.UnitSummary{Serial: "KP16-GOLD-01", Product: "KU-PANEL-16", Started: mustTime("2027-07-01T09:00:00Z"), Verdict: reduce.VerdictPass, CheckUnit: true}
	for k := 0; k < 12; k++ {
		g := 3.0 + 0.01*float64(k%2)
		if k == 11 {
			g = 2.5 // the chain lost half a dB
		}
		gold.RangeChecks = append(gold.RangeChecks, reduce.RangeCheck{Run: fmt.Sprintf("runs/KP16-GOLD-01/%02d", k), Station: "range-b", Reference: "horn-0042",
			Started: day0.AddDate(0, 0, 14*k+3), FrequencyHz: 11.725e9, RangeLossDB: 50.05, Beam: "b00", GTdBPerK: &g})
	}
	return reduce.ComputeFleet(append(us, gold))
}

// health.html lists what the range charts find: the runs beyond the
// control limits (method.md section 12; the limits are reduce's, worked
// by hand in its tests), the run whose drift exceeds the station's
// tolerance, and the runs that used the reference past due, each linked to
// its unit's report.
func TestHealthPage(t *testing.T) {
	f := healthFleet()
	html, err := Health(f)
	if err != nil {
		t.Fatal(err)
	}
	page := string(html)
	out := page[strings.Index(page, "Runs out of control"):strings.Index(page, "Pre/post drift")]
	for i := 21; i <= 26; i++ {
		if !strings.Contains(out, fmt.Sprintf(`<a href="units/KP16-%05d/report.html">KP16-%05d</a>`, i, i)) {
			t.Errorf("run %d is not listed out of control", i)
		}
	}
	if strings.Contains(out, "KP16-00020<") {
		t.Error("a baseline run is listed out of control")
	}
	drift := page[strings.Index(page, "drift exceeds"):strings.Index(page, "Reference antennas")]
	if !strings.Contains(drift, "KP16-00008") || strings.Count(drift, "<tr>") != 2 {
		t.Errorf("drift table: %s", drift)
	}
	refs := page[strings.Index(page, "Reference antennas"):]
	if !strings.Contains(refs, "LAB-26-0211") || !strings.Contains(refs, "KP16-00023</a> (2027-06-04)") || !strings.Contains(refs, "KP16-00026</a> (2027-06-25)") || strings.Contains(refs, "KP16-00022") {
		t.Errorf("references: %s", refs[:min(len(refs), 800)])
	}
	checks := page[strings.Index(page, "<h2>Check units"):strings.Index(page, "<h2>Reference antennas")]
	if !strings.Contains(checks, "Check unit KP16-GOLD-01 on range-b") || !strings.Contains(checks, "runs/KP16-GOLD-01/11 (2.500 dB/K)") {
		t.Errorf("check units: %s", checks)
	}
	if !strings.Contains(page, `http-equiv="Content-Security-Policy"`) || !strings.Contains(page, `href="index.html"`) {
		t.Error("the page lacks its policy or its link to the overview")
	}
}

// health.html in a real browser: its charts draw, nothing is loaded from
// outside and no error is reported.
func TestBrowserHealth(t *testing.T) {
	bctx := browser(t)
	html, err := Health(healthFleet())
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "health.html")
	if err := os.WriteFile(path, html, 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, pl := openPage(t, bctx, path)
	checkPage(t, ctx, pl, []string{"range-0", "range-0-drift", "check-0"})
	shot(t, ctx, "health.png")
}

// An individuals chart draws a dot for each run up to symbolPoints runs,
// and one line beyond that (a year's runs of a station would otherwise be
// an element each in the browser); the runs beyond the control limits
// keep their marks either way.
func TestIndividualsChartSymbols(t *testing.T) {
	day0 := time.Date(2027, 1, 1, 9, 0, 0, 0, time.UTC)
	for _, n := range []int{10, symbolPoints, symbolPoints + 1} {
		var pts []opts.LineData
		for i := 0; i < n; i++ {
			pts = append(pts, timePoint("", day0.Add(time.Duration(i)*time.Hour), 50+0.01*float64(i%3)))
		}
		last := day0.Add(time.Duration(n) * time.Hour)
		ch := individualsChart(opts.YAxis{Type: "value"}, "48", true, "range loss", pts, day0, last, []int{n - 1}, 20, 50, 49.9, 50.1)
		raw, err := json.Marshal(ch.JSON())
		if err != nil {
			t.Fatal(err)
		}
		var got struct {
			Series []struct {
				Name       string `json:"name"`
				ShowSymbol *bool  `json:"showSymbol"`
				Data       []any  `json:"data"`
			} `json:"series"`
		}
		if err := json.Unmarshal(raw, &got); err != nil {
			t.Fatal(err)
		}
		if len(got.Series) == 0 || got.Series[0].ShowSymbol == nil || *got.Series[0].ShowSymbol != (n <= symbolPoints) {
			t.Errorf("%d runs: the runs' series shows symbols %v, want %v", n, got.Series[0].ShowSymbol, n <= symbolPoints)
		}
		if len(got.Series[0].Data) != n {
			t.Errorf("%d runs: the series holds %d points", n, len(got.Series[0].Data))
		}
		beyond := got.Series[len(got.Series)-1]
		if beyond.Name != "beyond the control limits" || len(beyond.Data) != 1 || beyond.ShowSymbol == nil || !*beyond.ShowSymbol {
			t.Errorf("%d runs: the run beyond the limits is not marked: %+v", n, beyond)
		}
	}
}
