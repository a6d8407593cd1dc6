package render

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"go/parser"
	"go/token"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// result.json is what encoding/json writes of the wire form, laid out by
// indentJSON: compacted again, it is json.Marshal's text byte for byte.
func TestResultJSONMatchesEncodingJSON(t *testing.T) {
	u := fixtureUnit(t, 3, 21)
	u.Beams[0].LimitCurves = []reduce.LimitCurve{{Name: "G/T at boresight", Quantity: "gt", Start: 2, LimitDB: []float64{2, 2.1, 2.2}}}
	got, err := ResultJSON(u)
	if err != nil {
		t.Fatal(err)
	}
	want, err := json.Marshal(unitToWire(u, nil))
	if err != nil {
		t.Fatal(err)
	}
	var compact bytes.Buffer
	if err := json.Compact(&compact, got); err != nil {
		t.Fatalf("result.json is not valid JSON: %v", err)
	}
	if !bytes.Equal(compact.Bytes(), want) {
		t.Fatal("result.json, compacted, is not json.Marshal's text of the wire form")
	}
	if bytes.Contains(got, []byte(`"value_db": [`)) {
		t.Error("budget terms still carry value_db")
	}
	if bytes.Contains(got, []byte(`"expanded_db"`)) {
		t.Error("budgets still carry expanded_db beside the beam's expanded uncertainty")
	}
	for _, k := range []string{`"standard_db": [`, `"constant_standard_db": 0.`, `"divisor": 1.732051`} { // sqrt(3), the rectangular divisor (GUM 4.3.7)
		if !bytes.Contains(got, []byte(k)) {
			t.Errorf("result.json lacks %s", k)
		}
	}
}

// jsonTolerance is the largest change the rounding of appendJSONFloat makes
// to x: half of 1e-6, or half a unit in the 15th significant digit from 1e9
// up, plus the float64 error of reading the text back.
func jsonTolerance(x float64) float64 {
	if math.Abs(x) < 1e9 {
		return 5e-7 + 1e-15*math.Abs(x)
	}
	return 5.01e-15 * math.Abs(x)
}

// The layout: objects indented by two spaces, a list of numbers or
// booleans on one line, a list of objects or lists one element per line,
// nil lists of numbers as [], nil pointers as null, strings escaped as
// encoding/json escapes them (< > & too). The expected text is written out
// by hand.
func TestWireLayout(t *testing.T) {
	type point struct {
		Name string `json:"name"`
		DB   nums   `json:"db"`
	}
	v := struct {
		Schema  int      `json:"schema"`
		Hz      nums     `json:"hz"`
		Grid    []nums   `json:"grid"`
		Present [][]bool `json:"present"`
		Points  []point  `json:"points"`
		Counts  []int    `json:"counts"`
		Names   []string `json:"names"`
		Empty   nums     `json:"empty"`
		Skipped nums     `json:"skipped,omitempty"`
		Hidden  nums     `json:"-"`
		Ptr     *point   `json:"ptr"`
		Mixed   num      `json:"mixed"`
		Object  struct{} `json:"object"`
		Text    string   `json:"text"`
	}{
		Schema:  1,
		Hz:      nums{10.7e9, 10702562500.000002, 12.75e9},
		Grid:    []nums{{1.23456789, -0.5}, {math.NaN(), 2}},
		Present: [][]bool{{true, false}},
		Points:  []point{{"a", nums{0.1 + 0.2, -1e-7}}},
		Counts:  []int{3, 4},
		Names:   []string{"x", "y"},
		Hidden:  nums{1},
		Mixed:   num(math.Inf(-1)),
		Text:    "<a href=\"x\">[1,{2}]</a> & \u2028 \\",
	}
	got, err := appendIndented(nil, &v, 0, "\n")
	if err != nil {
		t.Fatal(err)
	}
	want := `{
  "schema": 1,
  "hz": [10700000000,10702562500,12750000000],
  "grid": [
    [1.234568,-0.5],
    [null,2]
  ],
  "present": [
    [true,false]
  ],
  "points": [
    {
      "name": "a",
      "db": [0.3,0]
    }
  ],
  "counts": [3,4],
  "names": [
    "x",
    "y"
  ],
  "empty": [],
  "ptr": null,
  "mixed": null,
  "object": {},
  "text": "\u003ca href=\"x\"\u003e[1,{2}]\u003c/a\u003e \u0026 \u2028 \\"
}
`
	if string(got) != want {
		t.Errorf("got\n%s\nwant\n%s", got, want)
	}
}

func TestAppendJSONFloat(t *testing.T) {
	// Expected texts worked out by hand: f rounded to 6 decimal places
	// (15 significant digits from 1e9 up), shortest form, no exponent.
	tests := []struct {
		f    float64
		want string
	}{
		{0, "0"}, {math.Copysign(0, -1), "0"}, {1, "1"}, {-1, "-1"}, {0.1, "0.1"},
		{0.1 + 0.2, "0.3"}, // 0.30000000000000004 in float64 (general knowledge)
		{1e-6, "0.000001"}, {-1e-6, "-0.000001"}, {4.9e-7, "0"}, {5.1e-7, "0.000001"}, {-4e-7, "0"},
		{123.456, "123.456"}, {3.156020021010441, "3.15602"}, {3.1851659092441764, "3.185166"},
		{-12.3456784, "-12.345678"}, {-12.3456786, "-12.345679"}, {2.000000001, "2"},
		{1.7320508075688772, "1.732051"}, {999999999.9999996, "1000000000"}, {123456789.123456789, "123456789.123457"},
		{11.725e9, "11725000000"}, {10702562500.000002, "10702562500"}, {1.2345678901234567e12, "1234567890123.46"},
		{1e20, "100000000000000000000"}, {1e21, "1e+21"}, {-2.5e22, "-2.5e+22"},
		{math.NaN(), "null"}, {math.Inf(1), "null"}, {math.Inf(-1), "null"},
	}
	for _, tc := range tests {
		if got := string(appendJSONFloat(nil, tc.f)); got != tc.want {
			t.Errorf("appendJSONFloat(%v) = %s, want %s", tc.f, got, tc.want)
		}
	}
	// Over many values: within the rounding, no exponent, at most 6
	// decimals, the shortest text of its own value (strconv's shortest
	// formatting is the reference), and stable when encoded again.
	x := 0.000123
	for i := 0; i < 20000; i++ {
		x = math.Mod(x*7.919+0.3141592653589793, 2000) - 1000 // a spread of values in (-1000, 1000)
		for _, f := range []float64{x, x * 1e-5, x * 1e6, x * 1e9} {
			text := string(appendJSONFloat(nil, f))
			back, err := strconv.ParseFloat(text, 64)
			if err != nil || math.Abs(back-f) > jsonTolerance(f) || strings.ContainsAny(text, "eE") {
				t.Fatalf("appendJSONFloat(%v) = %s", f, text)
			}
			if dot := strings.IndexByte(text, '.'); dot >= 0 && len(text)-dot-1 > 6 {
				t.Fatalf("appendJSONFloat(%v) = %s: more than 6 decimals", f, text)
			}
			if short := strconv.FormatFloat(back, 'f', -1, 64); short != text {
				t.Fatalf("appendJSONFloat(%v) = %s, but the shortest text of that value is %s", f, text, short)
			}
			if again := string(appendJSONFloat(nil, back)); again != text {
				t.Fatalf("appendJSONFloat(%v) = %s, then %s", f, text, again)
			}
		}
	}
}

func TestResultJSONRoundTrip(t *testing.T) {
	u := fixtureUnit(t, 4, 101)
	first, err := ResultJSON(u)
	if err != nil {
		t.Fatal(err)
	}
	again, _ := ResultJSON(u)
	if !bytes.Equal(first, again) {
		t.Fatal("two encodings of the same unit differ")
	}
	if !bytes.HasSuffix(first, []byte("}\n")) || !bytes.HasPrefix(first, []byte("{\n  \"schema\": 2,\n")) {
		t.Errorf("not indented with a trailing newline: %q ... %q", first[:30], first[len(first)-10:])
	}
	back, err := ParseResultJSON(first)
	if err != nil {
		t.Fatal(err)
	}
	second, err := ResultJSON(back)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(first, second) {
		t.Fatal("result.json does not survive a parse and a second encoding")
	}
	checks := []struct {
		name      string
		got, want any
	}{
		{"serial", back.Serial, u.Serial},
		{"verdict", back.Verdict, u.Verdict},
		{"beams", len(back.Beams), 4},
		{"problem line", back.Problems[0].Line, 17},
		{"element present", back.Elements.Present[7][7], false},
	}
	for _, c := range checks {
		if c.got != c.want {
			t.Errorf("%s: %v after the round trip, want %v", c.name, c.got, c.want)
		}
	}
	// Numbers come back within the 1e-6 rounding; a budget term's stated
	// values, left out of the file, come back as standard_db * divisor.
	term, backTerm := u.Beams[1].GTBudget.Terms[2], back.Beams[1].GTBudget.Terms[2]
	near := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"gt[3][57]", back.Beams[3].GTdBPerK[57], u.Beams[3].GTdBPerK[57], 5e-7},
		{"frequency[2][100]", back.Beams[2].FrequencyHz[100], u.Beams[2].FrequencyHz[100], 0},
		{"budget term standard", backTerm.StandardDB[99], term.StandardDB[99], 5e-7},
		{"budget term divisor", backTerm.Divisor, term.Divisor, 5e-7},
		{"budget term value", backTerm.ValueDB[99], term.ValueDB[99], 5e-7 * (term.Divisor + term.StandardDB[99] + 1)},
		{"gain budget term value", back.Beams[0].GainBudget.Terms[0].ValueDB[0], u.Beams[0].GainBudget.Terms[0].ValueDB[0], 2e-6},
		{"law loss", *back.Scan.Beams[1].LawLossDB, *u.Scan.Beams[1].LawLossDB, 5e-7},
		{"element phase", back.Elements.ResidualPhaseDeg[3][4], u.Elements.ResidualPhaseDeg[3][4], 5e-7},
	}
	for _, c := range near {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s: %v after the round trip, want %v within %g", c.name, c.got, c.want, c.tol)
		}
	}
	if len(backTerm.ValueDB) != len(term.ValueDB) {
		t.Errorf("restored %d budget values, want %d", len(backTerm.ValueDB), len(term.ValueDB))
	}
	// Schema 2 writes constant terms as one value and leaves the budget's
	// expanded uncertainty to the beam's list: both come back whole.
	for bi := range u.Beams {
		for ti, tm := range u.Beams[bi].GTBudget.Terms {
			bt := back.Beams[bi].GTBudget.Terms[ti]
			if len(bt.StandardDB) != len(tm.StandardDB) {
				t.Fatalf("beam %d term %d: %d standard values after the round trip, want %d", bi, ti, len(bt.StandardDB), len(tm.StandardDB))
			}
			for k := range tm.StandardDB {
				if math.Abs(bt.StandardDB[k]-tm.StandardDB[k]) > 5e-7 {
					t.Fatalf("beam %d term %d point %d: %v, want %v", bi, ti, k, bt.StandardDB[k], tm.StandardDB[k])
				}
			}
		}
		if got, want := back.Beams[bi].GTBudget.ExpandedDB, u.Beams[bi].GTBudget.ExpandedDB; len(got) != len(want) || math.Abs(got[5]-want[5]) > 5e-7 {
			t.Errorf("beam %d: expanded uncertainty %d values after the round trip, want %d", bi, len(got), len(want))
		}
	}

	// The keys the site contract (archive-format.md, result.json) promises.
	var doc map[string]any
	if err := json.Unmarshal(first, &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"serial", "product", "run", "started", "verdict", "beams", "limits", "problems"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("result.json lacks %q", k)
		}
	}
	beam := doc["beams"].([]any)[0].(map[string]any)
	for _, k := range []string{"id", "theta_deg", "phi_deg", "frequency_hz", "range_loss_db", "gain_dbi", "gt_db_per_k", "gt_expanded_uncertainty_db", "gt_form"} {
		if _, ok := beam[k]; !ok {
			t.Errorf("result.json beams[0] lacks %q", k)
		}
	}
	limit := doc["limits"].([]any)[0].(map[string]any)
	for _, k := range []string{"name", "beam", "worst_margin_db", "verdict"} {
		if _, ok := limit[k]; !ok {
			t.Errorf("result.json limits[0] lacks %q", k)
		}
	}
}

// Decision: a non-finite number is written as null (the unit is not
// refused for one bad point) and read back as NaN.
func TestResultJSONNonFinite(t *testing.T) {
	u := fixtureUnit(t, 1, 11)
	u.Beams[0].GTdBPerK[3] = math.NaN()
	u.Beams[0].GainDBi[2] = math.Inf(1)
	u.Beams[0].S21DB[0] = math.Inf(-1)
	u.AmbientC = math.NaN()
	u.Limits[0].WorstMarginDB = math.NaN()
	u.Flags, u.History = nil, nil // nil lists are written as []
	data, err := ResultJSON(u)
	if err != nil {
		t.Fatal(err)
	}
	if !json.Valid(data) {
		t.Fatal("result.json with NaN is not valid JSON")
	}
	var doc struct {
		AmbientC any   `json:"ambient_c"`
		Flags    []any `json:"flags"`
		History  []any `json:"history"`
		Beams    []struct {
			GT   []any `json:"gt_db_per_k"`
			Gain []any `json:"gain_dbi"`
			S21  []any `json:"s21_db"`
		} `json:"beams"`
		Limits []struct {
			Margin any `json:"worst_margin_db"`
		} `json:"limits"`
	}
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	b := doc.Beams[0]
	if doc.AmbientC != nil || b.GT[3] != nil || b.Gain[2] != nil || b.S21[0] != nil || doc.Limits[0].Margin != nil {
		t.Errorf("non-finite values not null: %v %v %v %v %v", doc.AmbientC, b.GT[3], b.Gain[2], b.S21[0], doc.Limits[0].Margin)
	}
	if b.GT[4] == nil || doc.Flags == nil || len(doc.Flags) != 0 || doc.History == nil {
		t.Errorf("finite neighbour or empty lists wrong: %v %v %v", b.GT[4], doc.Flags, doc.History)
	}
	back, err := ParseResultJSON(data)
	if err != nil {
		t.Fatal(err)
	}
	for name, v := range map[string]float64{
		"ambient": back.AmbientC, "gt[3]": back.Beams[0].GTdBPerK[3], "gain[2]": back.Beams[0].GainDBi[2],
		"s21[0]": back.Beams[0].S21DB[0], "margin": back.Limits[0].WorstMarginDB,
	} {
		if !math.IsNaN(v) {
			t.Errorf("%s read back as %v, want NaN", name, v)
		}
	}
	if math.Abs(back.Beams[0].GTdBPerK[4]-u.Beams[0].GTdBPerK[4]) > 5e-7 {
		t.Errorf("finite value changed beyond the rounding: %v, want %v", back.Beams[0].GTdBPerK[4], u.Beams[0].GTdBPerK[4])
	}
}

func TestParseResultJSONRefuses(t *testing.T) {
	good, err := ResultJSON(fixtureUnit(t, 1, 5))
	if err != nil {
		t.Fatal(err)
	}
	edit := func(old, new string) []byte {
		if !bytes.Contains(good, []byte(old)) {
			t.Fatalf("fixture JSON has no %q", old)
		}
		return bytes.Replace(good, []byte(old), []byte(new), 1)
	}
	tests := []struct {
		name string
		data []byte
		line int
		want string
	}{
		{"syntax", []byte("{\n  \"schema\": 1,\n  \"serial\": \"A\"\n  \"run\": 2\n}"), 4, "expected JSON"},
		{"type", []byte("{\n  \"schema\": 1,\n  \"serial\": 7\n}"), 3, "expected string"},
		{"schema", edit(`"schema": 2`, `"schema": 1`), 0, "schema 1, expected 2"},
		{"serial", edit(`"serial": "`, `"serial": "",  "x": "`), 0, "serial is empty"},
		{"short list", edit(`"gt_db_per_k": [`, `"gt_db_per_k": [1,`), 0, "gt_db_per_k has 6 values, expected 5"},
		{"empty", nil, 1, "expected JSON"},
		{"text in a list", edit(`"gt_db_per_k": [`, `"gt_db_per_k": ["x",`), lineOfText(good, `"gt_db_per_k": [`), "a JSON string, expected a number or null"},
		{"time", edit(`"started": "2026-`, `"started": "x2026-`), lineOfText(good, `"started": "2026-`), "expected an RFC 3339 time"},
	}
	for _, tc := range tests {
		_, err := ParseResultJSON(tc.data)
		var p *ingest.Problem
		if !errors.As(err, &p) {
			t.Errorf("%s: error %v, want an *ingest.Problem", tc.name, err)
			continue
		}
		if p.File != "result.json" || p.Line != tc.line || !strings.Contains(p.Message, tc.want) {
			t.Errorf("%s: %v, want result.json line %d containing %q", tc.name, err, tc.line, tc.want)
		}
	}
}

// lineOfText is the line where text first stands in data.
func lineOfText(data []byte, text string) int {
	return 1 + bytes.Count(data[:bytes.Index(data, []byte(text))], []byte{'\n'})
}

func TestFleetJSON(t *testing.T) {
	f := fixtureFleet(t)
	data, err := FleetJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	again, _ := FleetJSON(f)
	if !bytes.Equal(data, again) {
		t.Fatal("two encodings of the same fleet differ")
	}
	// fleet.json read into its wire form and written again is the same.
	var back struct {
		Schema     int                   `json:"schema"`
		Units      []fleetUnitWire       `json:"units"`
		Products   []productFleetWire    `json:"products"`
		Stations   []rangeChartWire      `json:"stations"`
		References []referenceHealthWire `json:"references"`
		CheckUnits []checkUnitChartWire  `json:"check_units"`
		Notices    []string              `json:"notices,omitempty"`
	}
	if err := json.Unmarshal(data, &back); err != nil {
		t.Fatal(err)
	}
	second, err := appendIndented(nil, &back, 0, "\n")
	if err != nil || !bytes.Equal(data, second) {
		t.Errorf("fleet.json does not survive a parse and a second encoding (%v)", err)
	}
	// Map keys sorted (as encoding/json does), nil lists as [].
	s := string(data)
	i, j := strings.Index(s, `"conditional-pass": 1`), strings.Index(s, `"fail": 1`)
	if i < 0 || j < 0 || i > j {
		t.Errorf("verdict counts not in key order: %d %d", i, j)
	}
	if !strings.Contains(s, `"watch": []`) {
		t.Error("the single-unit product's nil watch list is not []")
	}
	if math.Abs(float64(back.Products[0].Limits[0].Cpk)-f.Products[0].Limits[0].Cpk) > 5e-7 || back.Products[0].VerdictCounts["pass"] != 21 {
		t.Errorf("values changed: %v %v", back.Products[0].Limits[0].Cpk, back.Products[0].VerdictCounts)
	}
}

func TestResultsCSV(t *testing.T) {
	_, sums := fixtureFleetAndSummaries(t)
	units := append([]reduce.UnitSummary{{Serial: "AA-0001", Product: "KU-PANEL-16", Started: mustTime("2026-12-01T08:00:00Z"),
		Verdict: reduce.VerdictIncomplete}}, sums...) // no limits; given out of serial order
	units[1].Limits = append([]reduce.LimitResult(nil), units[1].Limits...)
	units[1].Limits[1].WorstMarginDB = math.NaN()
	data := ResultsCSV(units)
	again := ResultsCSV(units)
	if !bytes.Equal(data, again) {
		t.Fatal("two results.csv differ")
	}
	rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	header := "serial,product,started,unit_verdict,beam,limit,quantity,statistic,worst_margin_db,at_frequency_ghz,value,limit_value,expanded_uncertainty_db,verdict,issue_state,revision,report_number"
	if strings.Join(rows[0], ",") != header {
		t.Fatalf("header %q", strings.Join(rows[0], ","))
	}
	want := 1 // the unit without limits
	for _, u := range sums {
		want += len(u.Limits)
	}
	if len(rows)-1 != want {
		t.Fatalf("%d rows, want %d (24 units x 2 limits + 1 unit x 1 limit + 1 unit without limits)", len(rows)-1, want)
	}
	if r := rows[1]; r[0] != "AA-0001" || r[3] != string(reduce.VerdictIncomplete) || strings.Join(r[4:], "") != "" {
		t.Errorf("row of the unit without limits: %q", r)
	}
	for i := 2; i < len(rows); i++ {
		if rows[i][0] < rows[i-1][0] {
			t.Errorf("row %d: serial %q after %q", i, rows[i][0], rows[i-1][0])
		}
	}
	// Every number reads back to the float64 it came from.
	row := 2
	for _, u := range sortedBySerial(units[1:]) {
		for _, l := range u.Limits {
			r := rows[row]
			row++
			if r[0] != u.Serial || r[5] != l.Name || r[4] != l.Beam || r[13] != string(l.Verdict) || r[3] != string(u.Verdict) {
				t.Errorf("row %d: %q", row-1, r)
			}
			// The issue state closes every row of the unit.
			rev := ""
			if u.Revision > 0 {
				rev = strconv.Itoa(u.Revision)
			}
			if len(r) != 17 || r[14] != string(u.IssueState) || r[15] != rev || r[16] != u.ReportNumber {
				t.Errorf("row %d: issue columns %q, want %q %q %q", row-1, r[14:], u.IssueState, rev, u.ReportNumber)
			}
			for c, v := range map[int]float64{8: l.WorstMarginDB, 10: l.ValueDB, 11: l.LimitDB, 12: l.ExpandedUncertaintyDB} {
				if math.IsNaN(v) {
					if r[c] != "" {
						t.Errorf("row %d col %d = %q, want empty for NaN", row-1, c, r[c])
					}
					continue
				}
				got, err := strconv.ParseFloat(r[c], 64)
				if err != nil || got != v {
					t.Errorf("row %d col %d = %q, want %v", row-1, c, r[c], v)
				}
			}
			if got, _ := strconv.ParseFloat(r[9], 64); math.Abs(got*1e9-l.AtFrequencyHz) > 0.5 {
				t.Errorf("row %d frequency %q GHz, want %v Hz", row-1, r[9], l.AtFrequencyHz)
			}
		}
	}
	if rows[2][9] != "12.75" || rows[3][9] != "11.725" {
		t.Errorf("frequencies %q %q, want 12.75 and 11.725", rows[2][9], rows[3][9])
	}
	if rows[2][8] != "0.9" {
		t.Errorf("first margin %q, want 0.9", rows[2][8])
	}
	// The fixture's first unit is issued as R1 (fixtureFleetAndSummaries).
	if got := strings.Join(rows[2][14:], ","); got != "issued,1,EATL-GT-KP16-00001-R1" {
		t.Errorf("issue columns of KP16-00001: %q", got)
	}
	if got := string(ResultsCSV(nil)); got != header+"\n" {
		t.Errorf("no units: %q", got)
	}
}

func sortedBySerial(us []reduce.UnitSummary) []reduce.UnitSummary {
	out := append([]reduce.UnitSummary(nil), us...)
	sortUnitSummaries(out)
	return out
}

func TestCSVGHz(t *testing.T) {
	for _, tc := range []struct {
		hz   float64
		want string
	}{
		{11.725e9, "11.725"}, {12.1e9, "12.1"}, {1e9, "1"}, {10.700000001e9, "10.700000001"}, {0, "0"},
		{-0.0, "0"}, {math.NaN(), ""}, {math.Inf(1), ""}, {8.1e9, "8.1"},
	} {
		if got := csvGHz(tc.hz); got != tc.want {
			t.Errorf("csvGHz(%v) = %q, want %q", tc.hz, got, tc.want)
		}
	}
}

func BenchmarkResultJSON16x801(b *testing.B) {
	u := fixtureUnit(b, 16, 801)
	b.ReportAllocs()
	size := 0
	for i := 0; i < b.N; i++ {
		data, err := ResultJSON(u)
		if err != nil {
			b.Fatal(err)
		}
		b.SetBytes(int64(len(data)))
		size = len(data)
	}
	b.ReportMetric(float64(size), "file-bytes")
}

// A number written as null (NaN, an infinity) reads back as NaN, as a
// single number, in a list and as an exact number of the cache records;
// a value that is no number is refused.
func TestWireNumbersNull(t *testing.T) {
	tenth := 0.1
	third := tenth + 0.2 // 0.30000000000000004 in float64 (general knowledge)
	v := struct {
		One   num    `json:"one"`
		List  nums   `json:"list"`
		Exact exact  `json:"exact"`
		Trace exacts `json:"trace"`
		Ptr   *num   `json:"ptr,omitempty"`
	}{num(math.NaN()), nums{1.5, math.Inf(1), -2}, exact(math.Inf(-1)), exacts{math.NaN(), third}, nil}
	data, err := json.Marshal(&v)
	if err != nil {
		t.Fatal(err)
	}
	if want := `{"one":null,"list":[1.5,null,-2],"exact":null,"trace":[null,0.30000000000000004]}`; string(data) != want {
		t.Fatalf("got %s, want %s", data, want)
	}
	var back struct {
		One   num    `json:"one"`
		List  nums   `json:"list"`
		Exact exact  `json:"exact"`
		Trace exacts `json:"trace"`
	}
	if err := json.Unmarshal(data, &back); err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(float64(back.One)) || !math.IsNaN(back.List[1]) || back.List[0] != 1.5 || back.List[2] != -2 ||
		!math.IsNaN(float64(back.Exact)) || !math.IsNaN(back.Trace[0]) || back.Trace[1] != third {
		t.Errorf("read back as %v %v %v %v, want NaN where null was written", back.One, back.List, back.Exact, back.Trace)
	}
	for _, bad := range []string{`{"list":[1,"2"]}`, `{"one":true}`, `{"list":[1,[2]]}`, `{"one":1e999}`, `{"list":5}`, `{"list":{}}`, `{"trace":"x"}`} {
		if err := json.Unmarshal([]byte(bad), &back); err == nil {
			t.Errorf("%s: no error", bad)
		}
	}
}

// render encodes and decodes JSON with encoding/json alone: no file of the
// package uses reflection.
func TestNoReflectionEncoder(t *testing.T) {
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	fset := token.NewFileSet()
	for _, name := range files {
		if strings.HasSuffix(name, "_test.go") {
			continue
		}
		f, err := parser.ParseFile(fset, name, nil, parser.ImportsOnly)
		if err != nil {
			t.Fatal(err)
		}
		for _, imp := range f.Imports {
			if imp.Path.Value == `"reflect"` {
				t.Errorf("%s imports reflect", name)
			}
		}
	}
	for _, gone := range []string{"encodeIndented", "appendJSON", "jsonSizeHint", "decodeWithNaN", "restoreNaN", "shortBudgetTerm", "expandBudget"} {
		for _, name := range files {
			src, err := os.ReadFile(name)
			if err != nil {
				t.Fatal(err)
			}
			if strings.Contains(string(src), "func "+gone+"(") {
				t.Errorf("%s still defines %s", name, gone)
			}
		}
	}
}

// Any input either is refused with a *ingest.Problem or parses into a unit
// that encodes again and renders to a workbook, without a panic.
func FuzzParseResultJSON(f *testing.F) {
	u := fixtureUnit(f, 2, 4)
	u.Beams[0].LimitCurves = []reduce.LimitCurve{{Name: "L", Quantity: "gt", Start: 1, LimitDB: []float64{1, 2}}}
	seed, err := ResultJSON(u)
	if err != nil {
		f.Fatal(err)
	}
	f.Add(seed)
	f.Add([]byte(`{"schema":1,"serial":"S","beams":[{"id":"b","frequency_hz":[1e9,2e9],"gt_db_per_k":[null,1]}]}`))
	f.Add([]byte(`{"schema":1,"serial":"S","beams":[{"frequency_hz":[1],"limit_curves":[{"start":-1,"limit_db":[1]}]}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		got, err := ParseResultJSON(data)
		if err != nil {
			var p *ingest.Problem
			if !errors.As(err, &p) {
				t.Fatalf("error %v is not an *ingest.Problem", err)
			}
			return
		}
		if _, err := ResultJSON(got); err != nil {
			t.Fatalf("parsed unit does not encode: %v", err)
		}
		if len(got.Beams) <= 4 && len(data) < 4096 {
			if _, err := UnitWorkbook(got); err != nil {
				t.Logf("workbook refused: %v", err) // an error is allowed, a panic is not
			}
		}
	})
}
