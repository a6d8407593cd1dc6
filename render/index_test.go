package render

import (
	"encoding/json"
	"fmt"
	"regexp"
	"strings"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// pageData is the unit data block of an index page as page.js reads it.
type pageData struct {
	Verdicts  []string `json:"verdicts"`
	Products  []string `json:"products"`
	Limits    []string `json:"limits"`
	Issue     bool     `json:"issue"`
	Units     [][]any  `json:"units"`
	Attention [][2]any `json:"attention"`
	Fields    []string `json:"fields"`
}

var unitDataRE = regexp.MustCompile(`<script type="application/json" id="unit-data">([^<]*)</script>`)

func indexDataOf(t *testing.T, page string) pageData {
	t.Helper()
	m := unitDataRE.FindStringSubmatch(page)
	if m == nil {
		t.Fatal("index has no unit data block")
	}
	var d pageData
	if err := json.Unmarshal([]byte(m[1]), &d); err != nil {
		t.Fatalf("unit data: %v", err)
	}
	return d
}

func TestSeverityOrder(t *testing.T) {
	// The documented order: fail, conditional fail, incomplete,
	// conditional pass, pass; an unknown verdict ranks with incomplete.
	want := map[reduce.Verdict]int{reduce.VerdictFail: 0, reduce.VerdictConditionalFail: 1, reduce.VerdictIncomplete: 2,
		reduce.VerdictConditionalPass: 3, reduce.VerdictPass: 4, "odd": 2}
	for v, r := range want {
		if got := severityRank(v); got != r {
			t.Errorf("severityRank(%q) = %d, want %d", v, got, r)
		}
	}
	got := severityCounts(map[reduce.Verdict]int{reduce.VerdictPass: 3, reduce.VerdictFail: 1, reduce.VerdictConditionalPass: 2, "odd": 1})
	var order []string
	for _, c := range got {
		order = append(order, string(c.Verdict))
	}
	if strings.Join(order, ",") != "fail,conditional-pass,pass,odd" {
		t.Errorf("counts in the order %v", order)
	}
}

func TestIndexModel(t *testing.T) {
	f, sums := fixtureFleetAndSummaries(t)
	if _, err := loadPages(); err != nil {
		t.Fatal(err)
	}
	v, err := indexModel(f, fixtureIssueOf(sums))
	if err != nil {
		t.Fatal(err)
	}
	t.Run("needs attention", func(t *testing.T) {
		// The fixture: two FAIL units (KP16-00010, XB4-00001), one
		// incomplete (KP16-00021), one conditional pass (KP16-00015),
		// KP16-00004 on the watch list; the control chart's points beyond
		// its limits (computed by the fixture) follow.
		beyond := map[string]bool{}
		for _, l := range f.Products[0].Limits {
			for _, b := range l.Chart.Beyond {
				beyond[l.Chart.Serials[b]] = true
			}
		}
		var got []string
		ranks := []int{}
		for _, a := range v.Attention {
			got = append(got, a.Serial)
			ranks = append(ranks, a.Rank)
		}
		for i := 1; i < len(ranks); i++ {
			if ranks[i] < ranks[i-1] {
				t.Errorf("attention list not in severity order: %v %v", got, ranks)
			}
		}
		if len(got) < 5 || got[0] != "KP16-00010" || got[1] != "XB4-00001" || got[2] != "KP16-00021" || got[3] != "KP16-00015" {
			t.Fatalf("attention list %v", got)
		}
		// KP16-00010 fails and is beyond the control limits: one row, both reasons.
		if a := v.Attention[0]; !strings.Contains(strings.Join(a.Reasons, ","), reasonFail) || !strings.Contains(a.Why, "below the control limits") {
			t.Errorf("KP16-00010: reasons %v, why %q", a.Reasons, a.Why)
		}
		seen := map[string]bool{}
		for _, a := range v.Attention {
			if seen[a.Serial] {
				t.Errorf("%s listed twice", a.Serial)
			}
			seen[a.Serial] = true
		}
		if !seen["KP16-00004"] {
			t.Error("the unit on the watch list is not listed")
		}
		for s := range beyond {
			if !seen[s] {
				t.Errorf("%s is beyond the control limits and not listed", s)
			}
		}
		for _, a := range v.Attention {
			if a.Serial == "KP16-00004" && !strings.Contains(a.Why, "watch list: 12.1–12.4 GHz, 3 points outside the band, worst -0.42 dB at 12.2 GHz") {
				t.Errorf("watch reason %q", a.Why)
			}
		}
		if len(seen) != 4+1+len(beyond)-countIn(beyond, "KP16-00010", "XB4-00001", "KP16-00021", "KP16-00015", "KP16-00004") {
			t.Errorf("%d units listed: %v", len(seen), got)
		}
	})
	t.Run("exact verdicts in the data", func(t *testing.T) {
		page, err := execute("index.tmpl", v)
		if err != nil {
			t.Fatal(err)
		}
		d := indexDataOf(t, string(page))
		if strings.Join(d.Verdicts[:5], ",") != "fail,conditional-fail,incomplete,conditional-pass,pass" {
			t.Errorf("verdicts %v: the index of a verdict is its severity", d.Verdicts)
		}
		for i, u := range f.Units {
			row := d.Units[i]
			if d.Verdicts[int(row[2].(float64))] != string(u.Verdict) || d.Products[int(row[1].(float64))] != u.Product || row[5] != timeText(u.Started) {
				t.Errorf("row %d %v for %+v", i, row, u)
			}
		}
		if !d.Issue || strings.Join(d.Fields, ",") != strings.Join(unitFields, ",") {
			t.Errorf("issue %v, fields %v", d.Issue, d.Fields)
		}
		// KP16-00010: R1 void by a retest, a draft of R2; first run passed.
		var row []any
		at := -1
		for i, r := range d.Units {
			if r[0] == "KP16-00010" {
				row, at = r, i
			}
		}
		if row == nil || row[6].(float64) != 2 || d.Verdicts[int(row[7].(float64))] != string(reduce.VerdictPass) || row[8] != "void" || row[9] != "EATL-GT-KP16-00010-R2" {
			t.Errorf("KP16-00010 row %v", row)
		}
		if len(d.Attention) != len(v.Attention) || int(d.Attention[0][0].(float64)) != at {
			t.Errorf("attention data %v", d.Attention)
		}
	})
	t.Run("months", func(t *testing.T) {
		if len(v.Months) != 1 || v.Months[0].Product != "KU-PANEL-16" || len(v.Months[0].Months) != 2 || v.Months[0].Chart == nil {
			t.Fatalf("months %+v", v.Months)
		}
		page, err := execute("index.tmpl", v)
		if err != nil {
			t.Fatal(err)
		}
		for _, want := range []string{
			`<tr><td>2026-10</td><td class="num">12</td><td class="num">11</td><td class="num">0</td><td class="num">0</td><td class="num">1</td><td class="num">0</td><td class="num">91.7 %</td><td class="num">91.7 %</td><td class="num">1</td></tr>`,
			`<tr><td>2026-11</td><td class="num">12</td><td class="num">10</td><td class="num">1</td><td class="num">0</td><td class="num">0</td><td class="num">1</td><td class="num">90.9 %</td><td class="num">100.0 %</td><td class="num">1</td></tr>`,
			"KU-PANEL-16: first-pass yield <b>91.3 %</b> · final yield <b>95.7 %</b>",
			`data-for="chart-p0-months"`,
		} {
			if !strings.Contains(string(page), want) {
				t.Errorf("index lacks %q", want)
			}
		}
	})
	t.Run("small samples", func(t *testing.T) {
		page, err := execute("index.tmpl", v)
		if err != nil {
			t.Fatal(err)
		}
		// 24 units: Cpk indicative (method.md section 10: below 30 units);
		// the X-BAND-4 chart of one point is too few to call any point out.
		for _, want := range []string{"indicative, n = 24", "too few points"} {
			if !strings.Contains(string(page), want) {
				t.Errorf("index lacks %q", want)
			}
		}
	})
}

func countIn(m map[string]bool, keys ...string) int {
	n := 0
	for _, k := range keys {
		if m[k] {
			n++
		}
	}
	return n
}

func TestControlChartAgainstDate(t *testing.T) {
	f := fixtureFleet(t)
	l := f.Products[0].Limits[0]
	idx := map[string]int{}
	for i, u := range f.Units {
		idx[u.Serial] = i
	}
	c, err := controlChart("c", l, idx)
	if err != nil {
		t.Fatal(err)
	}
	var opt struct {
		XAxis []struct {
			Type string `json:"type"`
		} `json:"xAxis"`
		YAxis []struct {
			NameLocation string `json:"nameLocation"`
		} `json:"yAxis"`
		Series []struct {
			ID   string      `json:"id"`
			Data [][]float64 `json:"data"`
		} `json:"series"`
	}
	if err := json.Unmarshal([]byte(c.Option), &opt); err != nil {
		t.Fatal(err)
	}
	if opt.XAxis[0].Type != "time" || opt.YAxis[0].NameLocation != "middle" {
		t.Errorf("axes %+v %+v: want a time axis and the value axis's title along it, clear of the legend", opt.XAxis, opt.YAxis)
	}
	series := map[string][][]float64{}
	for _, s := range opt.Series {
		series[s.ID] = s.Data
	}
	if len(series["points"]) != len(l.Chart.ValuesDB) {
		t.Errorf("%d points drawn, want %d", len(series["points"]), len(l.Chart.ValuesDB))
	}
	// Every point beyond the limits is marked, at its run date and with its unit.
	if len(l.Chart.Beyond) == 0 || len(series["beyond"]) != len(l.Chart.Beyond) {
		t.Fatalf("%d marked, want %d", len(series["beyond"]), len(l.Chart.Beyond))
	}
	for k, b := range l.Chart.Beyond {
		p := series["beyond"][k]
		ms, _ := epochMS(l.Chart.Started[b])
		if p[0] != float64(ms) || int(p[2]) != idx[l.Chart.Serials[b]] {
			t.Errorf("beyond point %d = %v, want at %d for unit %d", k, p, ms, idx[l.Chart.Serials[b]])
		}
	}
	if !strings.Contains(c.Caption, "of all 24 units in test order") || !strings.Contains(c.Caption, "2.66 × mean moving range") {
		t.Errorf("caption lacks the basis of the limits: %s", c.Caption)
	}
}

// A station's check unit is named apart on the overview, with a link to
// its report, and counted in none of its totals, counts or tables.
func TestIndexLeavesCheckUnitsOut(t *testing.T) {
	f := fixtureFleet(t)
	n := len(f.Units)
	f.Units = append(f.Units, reduce.FleetUnit{Serial: "KP16-GOLD-01", Product: f.Units[0].Product, Started: mustTime("2026-11-20T08:00:00Z"),
		Verdict: reduce.VerdictFail, Runs: 12, FirstVerdict: reduce.VerdictFail, CheckUnit: true})
	page := string(mustIndex(t, f))
	if !strings.Contains(page, fmt.Sprintf("<h1>%d units</h1>", n)) {
		t.Errorf("the total counts the check unit")
	}
	if !strings.Contains(page, `<a href="units/KP16-GOLD-01/report.html">KP16-GOLD-01</a>`) || strings.Count(page, "KP16-GOLD-01") != 2 {
		t.Errorf("the check unit is not named apart once (it appears %d times)", strings.Count(page, "KP16-GOLD-01"))
	}
}
