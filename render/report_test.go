package render

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// sizeBudget is the most a report of a realistic unit (16 beams of 801
// points) may weigh, chart library included.
const sizeBudget = 1_500_000

func mustReport(t testing.TB, u *reduce.Unit) []byte {
	t.Helper()
	b, err := Report(u)
	if err != nil {
		t.Fatalf("Report: %v", err)
	}
	return b
}

func mustIndex(t testing.TB, f *reduce.Fleet) []byte {
	t.Helper()
	b, err := Index(f)
	if err != nil {
		t.Fatalf("Index: %v", err)
	}
	return b
}

func TestPagesDeterministic(t *testing.T) {
	tests := []struct {
		name   string
		render func() []byte
	}{
		{"report", func() []byte { return mustReport(t, fixtureUnit(t, 16, 801)) }},
		{"index", func() []byte { return mustIndex(t, fixtureFleet(t)) }},
		{"csv", func() []byte { return UnitCSV(fixtureUnit(t, 16, 801)) }},
	}
	for _, tc := range tests {
		a, b := tc.render(), tc.render()
		if !bytes.Equal(a, b) {
			i := 0
			for i < len(a) && i < len(b) && a[i] == b[i] {
				i++
			}
			t.Errorf("%s: two renders differ at byte %d of %d/%d", tc.name, i, len(a), len(b))
		}
	}
}

func TestReportSize(t *testing.T) {
	u := fixtureUnit(t, 16, 801)
	b := mustReport(t, u)
	t.Logf("report of 16 beams x 801 points: %d bytes (chart library %d, CSV %d)", len(b), len(assets.lib), len(UnitCSV(u)))
	if len(b) > sizeBudget {
		t.Errorf("report is %d bytes, budget %d", len(b), sizeBudget)
	}
	// The CSV is embedded once (as the download link), not once per use.
	if n := bytes.Count(b, []byte("data:text/csv")); n != 1 {
		t.Errorf("the CSV data URL appears %d times, want 1", n)
	}
}

// TestNoInjection plants script in every free-text field (see the
// fixture) and checks that no page carries it as markup. html/template
// escapes text; goldmark drops raw HTML (CommonMark leaves raw HTML to the
// renderer; goldmark's default is to omit it); the notes' links other than
// in-page ones are text.
func TestNoInjection(t *testing.T) {
	report := string(mustReport(t, fixtureUnit(t, 16, 801)))
	index := string(mustIndex(t, fixtureFleet(t)))
	for _, page := range []struct{ name, html string }{{"report", report}, {"index", index}} {
		for _, bad := range []string{
			"<script>window.__pwned",
			"<img src=x onerror",
			`href="javascript:`,
			"<b>bold?</b>",
		} {
			if strings.Contains(page.html, bad) {
				t.Errorf("%s contains %q as markup", page.name, bad)
			}
		}
		// Scripts: exactly the two inline ones (library, page script) plus
		// the JSON options; none with a src.
		if strings.Contains(page.html, "<script src") || strings.Contains(page.html, "<link") {
			t.Errorf("%s loads an external resource", page.name)
		}
		for _, m := range regexp.MustCompile(`(?i)(?:src|href)="([a-z][a-z0-9+.-]*:[^"]*|//[^"]*)"`).FindAllStringSubmatch(page.html, -1) {
			if !strings.HasPrefix(m[1], "data:") {
				t.Errorf("%s refers to %s", page.name, m[1])
			}
		}
	}
	// The escaped forms are there: the text is shown, not dropped.
	for _, want := range []string{
		"KP16-&lt;script&gt;window.__pwned=1&lt;/script&gt;00017",
		"AB&lt;img src=x onerror=&#34;window.__pwned=2&#34;&gt;",
		`click me <code>javascript:window.__pwned=5</code> <span class="hint">(link not followed)</span>`,
		`a safe link <code>https://example.org/procedure</code> <span class="hint">(link not followed)</span>`,
		"<li>cable <code>W12</code> re-torqued</li>",
	} {
		if !strings.Contains(report, want) {
			t.Errorf("report lacks %q", want)
		}
	}
}

// The notes load nothing and link nowhere outside the page: an image is
// drawn only from a data: URL of a safe kind, a link works only within
// the page; anything else is shown as text with its address.
func TestMarkdownNotes(t *testing.T) {
	const notLoaded = ` <span class="hint">(remote image not loaded)</span></span>`
	const notFollowed = ` <span class="hint">(link not followed)</span></span>`
	tests := []struct {
		src, want, not string
	}{
		{"*a*", "<p><em>a</em></p>", ""},
		{"<script>x()</script>", "<!-- raw HTML omitted -->", "<script>"},
		{`<div style="background:url(http://x/y.png)">z</div>`, "<!-- raw HTML omitted -->", "style="},
		{`<img src="http://x/y.png">`, "<!-- raw HTML omitted -->", "<img"},
		{"[x](javascript:alert(1))", `<span class="remote-link">x <code>javascript:alert(1)</code>` + notFollowed, "href"},
		{"[x](JaVaScRiPt:alert(1))", `<span class="remote-link">x <code>JaVaScRiPt:alert(1)</code>` + notFollowed, "href"},
		{"![i](javascript:alert(1))", `<span class="remote-image">i <code>javascript:alert(1)</code>` + notLoaded, "<img"},
		{"<a href=\"javascript:x()\">y</a>", "<!-- raw HTML omitted -->y<!-- raw HTML omitted -->", "javascript:"},
		{"[ok](https://example.org/a?b=1&c=2)", `<span class="remote-link">ok <code>https://example.org/a?b=1&amp;c=2</code>` + notFollowed, "href"},
		{"[**b** c](http://127.0.0.1:8/x \"t\")", `<span class="remote-link"><strong>b</strong> c <code>http://127.0.0.1:8/x</code>` + notFollowed, "href"},
		{"[r]\n\n[r]: //host/path", `<span class="remote-link">r <code>//host/path</code>` + notFollowed, "href"},
		{"[u](../index.html)", `<span class="remote-link">u <code>../index.html</code>` + notFollowed, "href"},
		{"<https://example.org/x>", `<span class="remote-link"><code>https://example.org/x</code></span>`, "href"},
		{"<someone@example.org>", `<span class="remote-link"><code>someone@example.org</code></span>`, "href"},
		{"[limits](#limits)", `<a href="#limits">limits</a>`, ""},
		{"![horn *S/N 42*](http://127.0.0.1:8/horn.jpg)", `<span class="remote-image">horn S/N 42 <code>http://127.0.0.1:8/horn.jpg</code>` + notLoaded, "<img"},
		{"![](HTTPS://x/y.png)", `<span class="remote-image"><code>HTTPS://x/y.png</code>` + notLoaded, "<img"},
		{"![p](photo.png)", `<span class="remote-image">p <code>photo.png</code>` + notLoaded, "<img"},
		{"![p](file:///etc/x.png)", `<span class="remote-image">p <code>file:///etc/x.png</code>` + notLoaded, "<img"},
		{"[![i](http://x/i.png)](http://x/)", `<span class="remote-link"><span class="remote-image">i <code>http://x/i.png</code>` + notLoaded + ` <code>http://x/</code>` + notFollowed, "<img"},
		{"![dot](data:image/png;base64,iVBORw0KGgo=)", `<img src="data:image/png;base64,iVBORw0KGgo=" alt="dot">`, ""},
		{"![s](data:image/svg+xml;base64,PHN2Zz4=)", `<span class="remote-image">s <code>data:image/svg+xml;base64,PHN2Zz4=</code> <span class="hint">(image not shown: only PNG, GIF, JPEG and WebP data are)</span></span>`, "<img"},
	}
	for _, tc := range tests {
		got, err := markdown(tc.src)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(got), tc.want) {
			t.Errorf("markdown(%q) = %q, want it to contain %q", tc.src, got, tc.want)
		}
		if tc.not != "" && strings.Contains(strings.ToLower(string(got)), strings.ToLower(tc.not)) {
			t.Errorf("markdown(%q) = %q still contains %q", tc.src, got, tc.not)
		}
	}
}

// csvHref extracts the download link's data URL from a report and decodes
// it (RFC 2397: percent-encoded data after the first comma).
func csvHref(t *testing.T, page []byte) (name string, data []byte) {
	t.Helper()
	m := regexp.MustCompile(`<a id="csv-link" href="data:text/csv;charset=utf-8,([^"]*)" download="([^"]*)"`).FindSubmatch(page)
	if m == nil {
		t.Fatal("no CSV download link with a download attribute")
	}
	raw := strings.ReplaceAll(string(m[1]), "&amp;", "&")
	dec, err := url.PathUnescape(raw)
	if err != nil {
		t.Fatalf("decoding the data URL: %v", err)
	}
	return string(m[2]), []byte(dec)
}

func TestReportEmbedsUnitCSV(t *testing.T) {
	u := fixtureUnit(t, 16, 801)
	name, data := csvHref(t, mustReport(t, u))
	if !bytes.Equal(data, UnitCSV(u)) {
		t.Errorf("the embedded CSV (%d bytes) differs from UnitCSV (%d bytes)", len(data), len(UnitCSV(u)))
	}
	if name != "KP16-_script_window.__pwned_1__script_00017-per-frequency.csv" {
		t.Errorf("download name %q", name)
	}
}

func readCSV(t *testing.T, b []byte) (map[string]int, [][]string) {
	t.Helper()
	recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll() // RFC 4180 reader
	if err != nil {
		t.Fatalf("the CSV does not parse: %v", err)
	}
	cols := map[string]int{}
	for i, h := range recs[0] {
		cols[h] = i
	}
	return cols, recs[1:]
}

func TestUnitCSV(t *testing.T) {
	u := fixtureUnit(t, 16, 801)
	cols, rows := readCSV(t, UnitCSV(u))
	if len(rows) != 801 {
		t.Fatalf("%d rows, want one per frequency: 801", len(rows))
	}
	// 1 frequency + shared range loss and drift + per beam 8 quantities
	// (s21, gain, U, G/T, U, noise, other form) + the derived projection
	// of b00.
	if want := 1 + 2 + 16*7 + 1; len(cols) != want {
		t.Errorf("%d columns, want %d", len(cols), want)
	}
	tests := []struct {
		col  string
		k    int
		want float64
		tol  float64
	}{
		{"b00_gt_db_per_k", 0, u.Beams[0].GTdBPerK[0], 0.0005},
		{"b07_gt_db_per_k", 400, u.Beams[7].GTdBPerK[400], 0.0005},
		{"b15_gain_dbi", 800, u.Beams[15].GainDBi[800], 0.0005},
		{"b03_gt_u_db", 123, u.Beams[3].GTExpandedUncertaintyDB[123], 0.0005},
		{"range_loss_db", 200, u.Beams[5].RangeLossDB[200], 0.0005},
		{"range_drift_db", 200, u.Beams[5].RangeDriftDB[200], 0.00005},
		{"b00_operating_gt_db_per_k_derived", 10, u.Beams[0].Projection.OperatingGTdBPerK[10], 0.0005},
		{"b09_gt_other_form_db_per_k", 600, u.Beams[9].OtherForm.GTdBPerK[600], 0.0005},
	}
	for _, tc := range tests {
		i, ok := cols[tc.col]
		if !ok {
			t.Errorf("no column %s", tc.col)
			continue
		}
		got, err := strconv.ParseFloat(rows[tc.k][i], 64)
		if err != nil || math.Abs(got-tc.want) > tc.tol {
			t.Errorf("%s[%d] = %q, want %.6f within %g", tc.col, tc.k, rows[tc.k][i], tc.want, tc.tol)
		}
	}
	if f, _ := strconv.ParseFloat(rows[0][0], 64); f != u.Beams[0].FrequencyHz[0] {
		t.Errorf("first frequency %s, want %v Hz exactly", rows[0][0], u.Beams[0].FrequencyHz[0])
	}
}

// Beams on different grids: one row per frequency of the union, empty
// cells where a beam has no point, range loss per beam.
func TestUnitCSVUnionOfGrids(t *testing.T) {
	u := &reduce.Unit{Serial: "S, with \"quotes\"", Beams: []reduce.Beam{
		{ID: "a", FrequencyHz: []float64{1e9, 2e9}, GTdBPerK: []float64{1.23456, math.NaN()}, RangeLossDB: []float64{50, 51}},
		{ID: "b,c", FrequencyHz: []float64{1.5e9, 2e9}, GTdBPerK: []float64{-0.0004, 3}, RangeLossDB: []float64{52, 53}},
	}}
	cols, rows := readCSV(t, UnitCSV(u))
	want := [][]string{
		{"1000000000", "50", "1.235", "", ""},
		{"1500000000", "", "", "52", "0"},
		{"2000000000", "51", "", "53", "3"},
	}
	order := []string{"frequency_hz", "a_range_loss_db", "a_gt_db_per_k", "b,c_range_loss_db", "b,c_gt_db_per_k"}
	if len(rows) != len(want) {
		t.Fatalf("%d rows, want %d", len(rows), len(want))
	}
	for r := range want {
		for j, name := range order {
			i, ok := cols[name]
			if !ok {
				t.Fatalf("no column %q in %v", name, cols)
			}
			if rows[r][i] != want[r][j] {
				t.Errorf("row %d %s = %q, want %q", r, name, rows[r][i], want[r][j])
			}
		}
	}
	// The report of such a unit renders too.
	mustReport(t, u)
}

// The budget table is the worst limit's quantity at its worst frequency,
// and its rows combine as GUM says (JCGM 100:2008, 5.1.2: u_c is the root
// sum of squares; U = k u_c).
func TestReportBudgetAtWorstMargin(t *testing.T) {
	u := fixtureUnit(t, 16, 801)
	v, err := reportModel(u)
	if err != nil {
		t.Fatal(err)
	}
	worst := u.Limits[0]
	for _, l := range u.Limits {
		if l.WorstMarginDB < worst.WorstMarginDB {
			worst = l
		}
	}
	if v.Budget == nil || v.Budget.Limit.Name != worst.Name || v.Budget.Limit.Beam != worst.Beam {
		t.Fatalf("budget of %+v, want the worst limit %s on %s", v.Budget, worst.Name, worst.Beam)
	}
	if v.Budget.FrequencyH != worst.AtFrequencyHz {
		t.Errorf("budget at %v Hz, want the worst-margin frequency %v Hz", v.Budget.FrequencyH, worst.AtFrequencyHz)
	}
	s := 0.0
	for _, r := range v.Budget.Rows {
		if math.Abs(r.StdDB-r.ValueDB/r.Divisor) > 1e-12 {
			t.Errorf("%s: u %.6f is not value/divisor %.6f", r.Name, r.StdDB, r.ValueDB/r.Divisor)
		}
		s += r.StdDB * r.StdDB
	}
	if math.Abs(v.Budget.CombinedDB-math.Sqrt(s)) > 1e-12 || math.Abs(v.Budget.ExpandedDB-2*math.Sqrt(s)) > 1e-12 {
		t.Errorf("u_c %.6f, U %.6f; want %.6f and twice that", v.Budget.CombinedDB, v.Budget.ExpandedDB, math.Sqrt(s))
	}
	// The budget's U is the U of the limit row.
	if math.Abs(v.Budget.ExpandedDB-worst.ExpandedUncertaintyDB) > 1e-12 {
		t.Errorf("budget U %.6f, limit row U %.6f", v.Budget.ExpandedDB, worst.ExpandedUncertaintyDB)
	}
	page := string(mustReport(t, u))
	for _, want := range []string{
		fmt.Sprintf("at <b>%s GHz</b>", fmtGHz(worst.AtFrequencyHz)),
		fmt.Sprintf(`<td class="num"><b>%s</b></td>`, fmtFixed(v.Budget.ExpandedDB, 3)),
		"<td>Noise receiver calibration</td><td>station</td><td>normal</td><td class=\"num\">2.000</td>",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("report lacks %q", want)
		}
	}
}

func TestReportSections(t *testing.T) {
	u := fixtureUnit(t, 16, 801)
	page := string(mustReport(t, u))
	for _, want := range []string{
		`<div class="verdict">CONDITIONAL PASS</div>`,
		"guarded acceptance (ILAC-G8)",
		"certificate <b>LAB-26-0211</b>",
		"due <b>2026-10-10</b>",
		`<span class="tag v-fail">EXPIRED</span>`,
		`<span class="tag flag">reference-expired</span>`,
	} {
		if !strings.Contains(page, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	for _, in := range u.Inputs {
		if !strings.Contains(page, fmt.Sprintf(`<td><code>%s</code></td><td class="num">%d</td><td><code class="hash">%s</code></td>`, in.Path, in.Size, in.SHA256)) {
			t.Errorf("input %s is not listed with its size and SHA-256", in.Path)
		}
	}
	for _, want := range []string{
		"2026/11/KP16-00017/run-2/b07-noise.csv:17: frequency 11.2e9 is not above the previous 11.3e9; point skipped",
		"2026/10/KP16-00017/run-1", "gtpack " + Version, "ISO/IEC 17025", "<li><b>b00</b>: passive gain 30.2 dBi",
		"problem(s) with the inputs</a>", // the banner points at the problems
		"row 3, column 5: 31.5 deg",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	// Every chart has its options, and the options parse as JSON.
	opts := regexp.MustCompile(`<script type="application/json" class="chart-opt" data-for="([^"]+)">([^<]*)</script>`).FindAllStringSubmatch(page, -1)
	var ids []string
	for _, m := range opts {
		ids = append(ids, m[1])
		var v map[string]any
		if err := json.Unmarshal([]byte(m[2]), &v); err != nil {
			t.Errorf("options of %s do not parse: %v", m[1], err)
		}
		// Chart data is rounded: GHz to 6 decimals (1 kHz), dB to 3.
		if long := regexp.MustCompile(`\d\.\d{7,}`).FindString(m[2]); long != "" {
			t.Errorf("options of %s carry an unrounded number %s", m[1], long)
		}
	}
	if got := strings.Join(ids, ","); got != "chart-gt,chart-gain,chart-noise,chart-range,chart-scan,chart-elements" {
		t.Errorf("charts %s", got)
	}
}

// A unit without scan analysis, elements, projection or limits still
// renders: the scan chart falls back to the beams' G/T at their centre.
func TestReportSparseUnits(t *testing.T) {
	full := fixtureUnit(t, 3, 11)
	full.Scan, full.Elements = nil, nil
	tests := []struct {
		name    string
		u       *reduce.Unit
		want    []string
		notWant []string
	}{
		{"empty", &reduce.Unit{Serial: "E1", Verdict: reduce.VerdictIncomplete},
			[]string{"INCOMPLETE", "No limit was evaluated.", "No budget"}, []string{"chart-gt"}},
		{"no scan", full, []string{"The unit has no scan analysis.", `data-for="chart-scan"`}, []string{"chart-elements"}},
	}
	for _, tc := range tests {
		page := string(mustReport(t, tc.u))
		for _, w := range tc.want {
			if !strings.Contains(page, w) {
				t.Errorf("%s: report lacks %q", tc.name, w)
			}
		}
		for _, w := range tc.notWant {
			if strings.Contains(page, w) {
				t.Errorf("%s: report has %q", tc.name, w)
			}
		}
	}
	if _, err := Report(nil); err == nil {
		t.Error("Report(nil) gave no error")
	}
	if _, err := Index(nil); err == nil {
		t.Error("Index(nil) gave no error")
	}
	if b, err := Index(&reduce.Fleet{}); err != nil || !bytes.Contains(b, []byte("No unit.")) {
		t.Errorf("Index of an empty fleet: %v", err)
	}
}

func TestIndex(t *testing.T) {
	f := fixtureFleet(t)
	page := string(mustIndex(t, f))
	// Every unit is in the page's unit data, from which page.js draws the
	// table rows and their links (TestBrowserIndex follows them).
	d := indexDataOf(t, page)
	if len(d.Units) != len(f.Units) {
		t.Fatalf("unit data has %d units, want %d", len(d.Units), len(f.Units))
	}
	for i, u := range f.Units {
		if got := d.Units[i][0]; got != u.Serial {
			t.Errorf("unit data row %d is %v, want %s", i, got, u.Serial)
		}
	}
	// The lists written into the page link to the reports themselves.
	for _, serial := range []string{"KP16-00004", "KP16-00010"} {
		if !strings.Contains(page, `href="units/`+url.PathEscape(serial)+`/report.html"`) {
			t.Errorf("index lacks a link to the report of %s", serial)
		}
	}
	// Yield 23 of 24 = 95.8 %; Cpk = mean/(3 sd) of the fixture's margins
	// (method.md section 10, ISO 22514-2).
	gt := f.Products[0].Limits[0]
	for _, want := range []string{
		"<td class=\"num\">95.8 %</td>",
		fmt.Sprintf("<td class=\"num\">%s <span class=\"tag flag\"", fmtFixed(gt.MeanMarginDB/(3*gt.StdMarginDB), 2)), // indicative: 24 units
		"KP16-00010 (-0.80 dB, z = -5.2)",
		// The watch list: span, points outside, worst excursion and where.
		`<td class="nowrap"><a href="units/KP16-00004/report.html">KP16-00004</a></td><td class="nowrap">12.1 – 12.4</td><td class="num">3</td><td class="num">-0.42</td><td class="num">12.2</td>`,
		`<button type="button" class="count" data-verdict="pass" title="show the PASS units in the table"><span class="tag v-pass">PASS</span><b>21</b></button>`,
		`<button type="button" class="count" data-verdict="fail" title="show the FAIL units in the table"><span class="tag v-fail">FAIL</span><b>2</b></button>`,
		"(1 unit)",
		"Capability and control statistics need at least two units.",
		"must not radiate", // method.md section 11 cautions, on the overview too
		`<a href="health.html">range health</a>`,
		"ISO/IEC 17025",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("index lacks %q", want)
		}
	}
	// The histogram counts every unit once.
	m := regexp.MustCompile(`data-for="chart-hist">([^<]*)<`).FindStringSubmatch(page)
	if m == nil {
		t.Fatal("no histogram")
	}
	var opt struct {
		Series []struct {
			Data []struct {
				Value int `json:"value"`
			} `json:"data"`
		} `json:"series"`
	}
	if err := json.Unmarshal([]byte(m[1]), &opt); err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, d := range opt.Series[0].Data {
		n += d.Value
	}
	if n != len(f.Units) {
		t.Errorf("histogram counts %d units, want %d", n, len(f.Units))
	}
}

func TestNiceStep(t *testing.T) {
	tests := []struct {
		span float64
		n    int
		want float64
	}{
		{2.05, 5, 0.5}, // 0.41 -> 0.5
		{1, 10, 0.1},
		{3, 10, 0.5}, // 0.3 -> 0.5
		{0.9, 5, 0.2},
		{0.5, 2, 0.25},
		{0, 5, 0.1},
	}
	for _, tc := range tests {
		if got := niceStep(tc.span, tc.n); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("niceStep(%g, %d) = %g, want %g", tc.span, tc.n, got, tc.want)
		}
	}
}

func BenchmarkReport(b *testing.B) {
	u := fixtureUnit(b, 16, 801)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Report(u); err != nil {
			b.Fatal(err)
		}
	}
}

// A unit where no beam has G/T (its noise traces were refused) gets no U
// band: a band series without data would draw the page's dataset columns
// as a meaningless curve.
func TestReportNoGTNoBand(t *testing.T) {
	u := fixtureUnit(t, 2, 11)
	with, err := Report(u)
	if err != nil {
		t.Fatal(err)
	}
	// The series id in the chart options (page.js names it too, so the bare
	// id would always be found).
	const band = `{"id":"band-lo"`
	if !strings.Contains(string(with), band) {
		t.Fatal("the report of a unit with G/T has no U band series")
	}
	for i := range u.Beams {
		u.Beams[i].GTdBPerK, u.Beams[i].GTExpandedUncertaintyDB = nil, nil
	}
	without, err := Report(u)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(without), band) {
		t.Error("the report of a unit without G/T still has a U band series")
	}
}

// A grid note shared by every beam is listed once, below the beam table,
// not repeated in each row.
func TestReportGridNotesOnce(t *testing.T) {
	u := fixtureUnit(t, 4, 11)
	for i := range u.Beams {
		u.Beams[i].Interpolated = []string{"range loss from the 13-point table"}
	}
	u.Beams[2].Interpolated = append(u.Beams[2].Interpolated, "noise of b02-noise.csv from 6 points")
	data, err := Report(u)
	if err != nil {
		t.Fatal(err)
	}
	page := string(data)
	if n := strings.Count(page, "range loss from the 13-point table"); n != 1 {
		t.Errorf("the shared note appears %d times, want once", n)
	}
	for _, want := range []string{
		"range loss from the 13-point table <i>(every beam)</i>",
		"noise of b02-noise.csv from 6 points <i>(" + u.Beams[2].ID + ")</i>",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("report lacks %q", want)
		}
	}
}

// The heat map's axes carry the row and column numbers of elements.csv
// (here counted from 1), the numbers the text and the workbook use.
func TestElementChartAxesAreElementNumbers(t *testing.T) {
	e := &reduce.ElementState{Rows: 2, Cols: 3, FirstRow: 1, FirstCol: 5,
		ResidualPhaseDeg: [][]float64{{1, 2, 3}, {4, 5, 6}},
		Present:          [][]bool{{true, true, true}, {true, true, true}}}
	spec, err := elementChart(e)
	if err != nil {
		t.Fatal(err)
	}
	opt := string(spec.Option)
	for _, want := range []string{`"data":["5","6","7"]`, `"data":["1","2"]`, `"firstRow":1`, `"firstCol":5`} {
		if !strings.Contains(opt, want) {
			t.Errorf("heat map options lack %s:\n%.600s", want, opt)
		}
	}
}

// Every page carries its Content-Security-Policy first thing after the
// character set, before anything it could govern, and the policy allows
// exactly the page's own inline scripts (by SHA-256 of their text, as CSP
// Level 3 hashes a script element's text) and no load from anywhere.
func TestPagePolicy(t *testing.T) {
	metaRe := regexp.MustCompile(`^<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n<meta http-equiv="Content-Security-Policy" content="([^"]*)">\n`)
	scriptRe := regexp.MustCompile(`(?s)<script([^>]*)>(.*?)</script>`)
	for _, page := range []struct {
		name string
		html []byte
	}{{"report", mustReport(t, fixtureUnit(t, 16, 801))}, {"index", mustIndex(t, fixtureFleet(t))}} {
		m := metaRe.FindSubmatch(page.html)
		if m == nil {
			t.Errorf("%s: the head does not start with the charset and the policy: %q", page.name, page.html[:min(300, len(page.html))])
			continue
		}
		policy := string(m[1])
		var hashes []string
		for _, s := range scriptRe.FindAllSubmatch(page.html, -1) {
			if strings.Contains(string(s[1]), `type="application/json"`) {
				continue // data, not run
			}
			if len(s[1]) != 0 {
				t.Errorf("%s: a script with attributes %q", page.name, s[1])
			}
			sum := sha256.Sum256(s[2])
			hashes = append(hashes, "'sha256-"+base64.StdEncoding.EncodeToString(sum[:])+"'")
		}
		if len(hashes) != 2 {
			t.Errorf("%s: %d inline scripts, want 2 (the chart library and page.js)", page.name, len(hashes))
		}
		want := "default-src 'none'; script-src " + strings.Join(hashes, " ") +
			"; style-src 'unsafe-inline'; img-src data:; font-src data:; connect-src 'none'; form-action 'none'; base-uri 'none'"
		if policy != want {
			t.Errorf("%s: policy\n%s\nwant\n%s", page.name, policy, want)
		}
		if n := bytes.Count(page.html, []byte("Content-Security-Policy")); n != 1 {
			t.Errorf("%s: %d policies, want 1", page.name, n)
		}
	}
	// The hashes are those of the assets as embedded.
	for _, a := range [][]byte{assets.lib, assets.js} {
		sum := sha256.Sum256(a)
		if h := "'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"; !strings.Contains(assets.policy, h) {
			t.Errorf("the policy lacks the hash %s of an asset", h)
		}
	}
}
