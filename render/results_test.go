package render

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// The reference for the JSON encoding is the standard library's
// encoding/json: for finite values without nil lists the bytes must be
// the same as json.MarshalIndent's.
func TestResultJSONMatchesEncodingJSON(t *testing.T) {
	u := fixtureUnit(t, 3, 21)
	u.Beams[0].LimitCurves = []reduce.LimitCurve{{Name: "G/T at boresight", Quantity: "gt", Start: 2, LimitDB: []float64{2, 2.1, 2.2}}}
	got, err := ResultJSON(u)
	if err != nil {
		t.Fatal(err)
	}
	want, err := json.MarshalIndent(u, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	want = append(want, '\n')
	if !bytes.Equal(got, want) {
		i := 0
		for i < len(got) && i < len(want) && got[i] == want[i] {
			i++
		}
		t.Fatalf("ResultJSON differs from encoding/json at byte %d:\n got %q\nwant %q", i, snippet(got, i), snippet(want, i))
	}
}

func snippet(b []byte, i int) string {
	lo, hi := max(0, i-60), min(len(b), i+60)
	return string(b[lo:hi])
}

func TestAppendJSONFloat(t *testing.T) {
	// Every value must format as encoding/json formats it.
	for _, f := range []float64{0, -0.0, 1, -1, 0.1, 1e-6, 9.99e-7, 1e-7, 1.5e-9, 123.456, 1e20, 1e21, 1.2345e25, -3.0e-12,
		math.MaxFloat64, math.SmallestNonzeroFloat64, 11.725e9, 2.000000001} {
		want, _ := json.Marshal(f)
		if got := appendJSONFloat(nil, f, 64); string(got) != string(want) {
			t.Errorf("appendJSONFloat(%g) = %s, encoding/json gives %s", f, got, want)
		}
	}
	for _, f := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		if got := string(appendJSONFloat(nil, f, 64)); got != "null" {
			t.Errorf("appendJSONFloat(%v) = %s, want null", f, got)
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
	if !bytes.HasSuffix(first, []byte("}\n")) || !bytes.HasPrefix(first, []byte("{\n  \"schema\": 1,\n")) {
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
		{"gt[3][57]", back.Beams[3].GTdBPerK[57], u.Beams[3].GTdBPerK[57]},
		{"budget term", back.Beams[1].GTBudget.Terms[2].StandardDB[99], u.Beams[1].GTBudget.Terms[2].StandardDB[99]},
		{"law loss", *back.Scan.Beams[1].LawLossDB, *u.Scan.Beams[1].LawLossDB},
		{"problem line", back.Problems[0].Line, 17},
		{"element present", back.Elements.Present[7][7], false},
	}
	for _, c := range checks {
		if c.got != c.want {
			t.Errorf("%s: %v after the round trip, want %v", c.name, c.got, c.want)
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
	if back.Beams[0].GTdBPerK[4] != u.Beams[0].GTdBPerK[4] {
		t.Errorf("finite value changed: %v", back.Beams[0].GTdBPerK[4])
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
		{"schema", edit(`"schema": 1`, `"schema": 2`), 0, "schema 2, expected 1"},
		{"serial", edit(`"serial": "`, `"serial": "",  "x": "`), 0, "serial is empty"},
		{"short list", edit(`"gt_db_per_k": [`, `"gt_db_per_k": [1,`), 0, "gt_db_per_k has 6 values, expected 5"},
		{"empty", nil, 1, "expected JSON"},
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
	var back reduce.Fleet
	if err := json.Unmarshal(data, &back); err != nil {
		t.Fatal(err)
	}
	second, _ := FleetJSON(&back)
	if !bytes.Equal(data, second) {
		t.Error("fleet.json does not survive a parse and a second encoding")
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
	if back.Products[0].Limits[0].Cpk != f.Products[0].Limits[0].Cpk || back.Products[0].VerdictCounts["pass"] != 21 {
		t.Errorf("values changed: %v %v", back.Products[0].Limits[0].Cpk, back.Products[0].VerdictCounts)
	}
}

func TestResultsCSV(t *testing.T) {
	f := fixtureFleet(t)
	units := append([]reduce.UnitSummary{{Serial: "AA-0001", Product: "KU-PANEL-16", Started: "2026-12-01T08:00:00Z",
		Verdict: reduce.VerdictIncomplete}}, f.Units...) // no limits; given out of serial order
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
	header := "serial,product,started,unit_verdict,beam,limit,quantity,statistic,worst_margin_db,at_frequency_ghz,value,limit_value,expanded_uncertainty_db,verdict"
	if strings.Join(rows[0], ",") != header {
		t.Fatalf("header %q", strings.Join(rows[0], ","))
	}
	want := 1 // the unit without limits
	for _, u := range f.Units {
		want += len(u.Limits)
	}
	if len(rows)-1 != want {
		t.Fatalf("%d rows, want %d (24 units x 2 limits + 1 unit x 1 limit + 1 unit without limits)", len(rows)-1, want)
	}
	if r := rows[1]; r[0] != "AA-0001" || r[3] != reduce.VerdictIncomplete || strings.Join(r[4:], "") != "" {
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
			if r[0] != u.Serial || r[5] != l.Name || r[4] != l.Beam || r[13] != l.Verdict || r[3] != u.Verdict {
				t.Errorf("row %d: %q", row-1, r)
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
	for i := 0; i < b.N; i++ {
		data, err := ResultJSON(u)
		if err != nil {
			b.Fatal(err)
		}
		b.SetBytes(int64(len(data)))
	}
}

// A field whose type has its own MarshalJSON (time.Time) is written as
// encoding/json writes it.
func TestEncodeIndentedMarshaler(t *testing.T) {
	v := struct {
		At    time.Time  `json:"at"`
		Maybe *time.Time `json:"maybe"`
		List  []float64  `json:"list"`
	}{At: time.Date(2026, 11, 3, 9, 15, 0, 0, time.UTC), List: []float64{1.5}}
	got, err := encodeIndented(&v)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := json.MarshalIndent(&v, "", "  ")
	if string(got) != string(want)+"\n" {
		t.Errorf("got %s\nwant %s", got, want)
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
