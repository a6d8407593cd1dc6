package render

import (
	"bytes"
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	cdpbrowser "github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/emulation"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"gtpack.example/gtpack/reduce"
)

// These tests open the pages in a real browser (Chromium, headless, no
// GPU) from file:// URLs, the way a test engineer opens a site copied to a
// laptop without a network.

const chromiumPath = "/usr/bin/chromium"

// browser starts a headless Chromium with a fresh profile, or skips (fails
// under CI=true) when it is not installed.
func browser(t *testing.T) context.Context {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("chromium is required under CI: %v", err)
		}
		t.Skipf("chromium not installed at %s: %v", chromiumPath, err)
	}
	parent, cancelTimeout := context.WithTimeout(context.Background(), 3*time.Minute)
	t.Cleanup(cancelTimeout)
	actx, cancelAlloc := chromedp.NewExecAllocator(parent,
		chromedp.ExecPath(chromiumPath),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1280, 900),
	)
	t.Cleanup(cancelAlloc)
	bctx, cancelBrowser := chromedp.NewContext(actx)
	t.Cleanup(cancelBrowser)
	// Start the browser now, so that every page opened later is a tab of
	// this one (a first run on a tab's context would start a browser of
	// its own, on the same profile).
	if err := chromedp.Do(bctx); err != nil {
		t.Fatalf("starting chromium: %v", err)
	}
	return bctx
}

// pageLog is what a tab did: every request it made and every error it
// reported.
type pageLog struct {
	mu       sync.Mutex
	requests []string
	errors   []string
}

func (l *pageLog) snapshot() ([]string, []string) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return append([]string(nil), l.requests...), append([]string(nil), l.errors...)
}

// openPage opens a file in a new tab of the browser and records its
// requests and errors from the start.
func openPage(t *testing.T, bctx context.Context, path string) (context.Context, *pageLog) {
	t.Helper()
	ctx, cancel := chromedp.NewContext(bctx)
	t.Cleanup(cancel)
	pl := &pageLog{}
	err := chromedp.Listen(ctx, func(ev any) {
		pl.mu.Lock()
		defer pl.mu.Unlock()
		switch e := ev.(type) {
		case *network.EventRequestWillBeSent:
			if e.Request != nil {
				pl.requests = append(pl.requests, e.Request.URL)
			}
		case *runtime.EventExceptionThrown:
			msg := "exception"
			if d := e.ExceptionDetails; d != nil {
				msg = d.Text
				if d.Exception != nil {
					msg += " " + d.Exception.Description
				}
			}
			pl.errors = append(pl.errors, msg)
		case *runtime.EventConsoleAPICalled:
			if e.Type == runtime.ConsoleAPICalledTypeError || e.Type == runtime.ConsoleAPICalledTypeAssert {
				var parts []string
				for _, a := range e.Args {
					parts = append(parts, string(a.Value)+a.Description)
				}
				pl.errors = append(pl.errors, "console.error: "+strings.Join(parts, " "))
			}
		case *cdplog.EventEntryAdded:
			if e.Entry != nil && e.Entry.Level == cdplog.EntryLevelError {
				pl.errors = append(pl.errors, "log: "+e.Entry.Text+" "+e.Entry.URL)
			}
		}
	})
	if err != nil {
		t.Fatalf("listening to the tab: %v", err)
	}
	if _, err := chromedp.Call(ctx, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{Source: policyRecorderJS}); err != nil {
		t.Fatalf("adding the policy recorder: %v", err)
	}
	if err := chromedp.Do(ctx, chromedp.Navigate("file://"+path)); err != nil {
		t.Fatalf("opening %s: %v", path, err)
	}
	return ctx, pl
}

// policyRecorderJS runs before the page's own scripts (DevTools adds it to
// every new document, outside the page's policy) and keeps every
// Content-Security-Policy violation the page reports.
const policyRecorderJS = `window.__policyViolations = [];
document.addEventListener('securitypolicyviolation', function (e) {
  window.__policyViolations.push(e.violatedDirective + ' ' + e.blockedURI);
});`

// policyViolations is what the page's policy refused so far.
func policyViolations(t *testing.T, ctx context.Context) []string {
	t.Helper()
	return eval[[]string](t, ctx, `window.__policyViolations || ['the policy recorder did not run']`)
}

func eval[T any](t *testing.T, ctx context.Context, expr string) T {
	t.Helper()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](expr))
	if err != nil {
		t.Fatalf("evaluating %q: %v", expr, err)
	}
	return v
}

type drawnChart struct {
	ID    string `json:"id"`
	W     int    `json:"w"`
	H     int    `json:"h"`
	Inked int    `json:"inked"`
}

// chartsJS reports, for every chart container, the size of its canvas and
// how many of a sample of its pixels are not transparent.
const chartsJS = `Array.from(document.querySelectorAll('div.chart')).map(function (d) {
  var c = d.querySelector('canvas'), r = {id: d.id, w: 0, h: 0, inked: 0};
  if (!c) { return r; }
  r.w = c.width; r.h = c.height;
  var px = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
  for (var i = 3; i < px.length; i += 4 * 7) { if (px[i] > 0) { r.inked++; } }
  return r;
})`

// checkPage asserts what every page must satisfy: no request leaves for the
// network, no error on the console, nothing refused by the page's policy
// (so the policy lets the page's own scripts and styles work), every chart
// drawn, and none of the planted payloads ran.
func checkPage(t *testing.T, ctx context.Context, pl *pageLog, wantCharts []string) {
	t.Helper()
	drawn := eval[[]drawnChart](t, ctx, chartsJS)
	got := map[string]drawnChart{}
	for _, d := range drawn {
		got[d.ID] = d
	}
	if len(drawn) != len(wantCharts) {
		t.Errorf("page has %d charts %v, want %d %v", len(drawn), drawn, len(wantCharts), wantCharts)
	}
	for _, id := range wantCharts {
		d, ok := got[id]
		switch {
		case !ok:
			t.Errorf("chart %s missing", id)
		case d.W == 0 || d.H == 0:
			t.Errorf("chart %s has a canvas of %d x %d", id, d.W, d.H)
		case d.Inked < 200:
			t.Errorf("chart %s looks blank: %d inked sample pixels of %d x %d", id, d.Inked, d.W, d.H)
		}
	}
	if pwned := eval[string](t, ctx, `typeof window.__pwned`); pwned != "undefined" {
		t.Errorf("a planted payload ran: window.__pwned is %s", pwned)
	}
	for _, v := range policyViolations(t, ctx) {
		t.Errorf("the page's policy refused %s", v)
	}
	if p := eval[string](t, ctx, `(document.querySelector('head > meta[http-equiv="Content-Security-Policy"]') || {}).content || ''`); !strings.HasPrefix(p, "default-src 'none';") {
		t.Errorf("the page's policy is %q, want one that starts with default-src 'none'", p)
	}
	reqs, errs := pl.snapshot()
	if len(reqs) == 0 {
		t.Errorf("no request recorded: the listener saw nothing, so the network check proves nothing")
	}
	for _, u := range reqs {
		if !strings.HasPrefix(u, "file:") && !strings.HasPrefix(u, "data:") {
			t.Errorf("the page requested %q: only file: and data: are allowed", u)
		}
	}
	for _, e := range errs {
		t.Errorf("browser reported an error: %s", e)
	}
}

func shot(t *testing.T, ctx context.Context, name string) {
	t.Helper()
	dir := os.Getenv("GTPACK_SCREENSHOTS")
	if dir == "" {
		return
	}
	png, err := chromedp.Run(ctx, chromedp.FullScreenshot(100))
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	if err := os.WriteFile(filepath.Join(dir, name), png, 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestBrowserReport(t *testing.T) {
	bctx := browser(t)
	dir := t.TempDir()
	u := fixtureUnit(t, 16, 801)
	html, err := Report(u)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "report.html")
	if err := os.WriteFile(path, html, 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, pl := openPage(t, bctx, path)
	checkPage(t, ctx, pl, reportCharts)

	// The G/T chart starts on the beam of the worst limit (b00 in the
	// fixture) and follows the focus selector.
	type focusState struct {
		Width float64 `json:"width"`
		Band  int     `json:"band"`
		Limit int     `json:"limit"`
	}
	const focusJS = `(function (id) {
  var o = echarts.getInstanceByDom(document.getElementById('chart-gt')).getOption();
  var s = function (x) { return o.series.filter(function (e) { return e.id === x; })[0]; };
  return {width: s('beam-' + id).lineStyle.width, band: s('band-w').data.length, limit: s('limit-0').data.length};
})`
	if got := eval[focusState](t, ctx, focusJS+`('b00')`); got.Width != 2.6 || got.Band != 801 || got.Limit != 2 {
		t.Errorf("initial focus: %+v, want width 2.6 on b00, a band of 801 points and a 2-vertex limit", got)
	}
	eval[chromedp.Void](t, ctx, `(function () { var s = document.querySelector('select.focus'); s.value = '15'; s.dispatchEvent(new Event('change')); })()`)
	if got := eval[focusState](t, ctx, focusJS+`('b15')`); got.Width != 2.6 || got.Band != 801 {
		t.Errorf("focus on b15: %+v, want the heavy line and the band on b15", got)
	}

	// Tooltips carry units.
	tip := eval[string](t, ctx, `(function () {
  var c = echarts.getInstanceByDom(document.getElementById('chart-gt'));
  c.dispatchAction({type: 'showTip', seriesIndex: 0, dataIndex: 400});
  var el = document.querySelector('#chart-gt div[style*="z-index"]') || document.querySelector('#chart-gt > div:last-child');
  return el ? el.textContent : '';
})()`)
	for _, want := range []string{"GHz", "dB/K", "b00", "U (k = 2) of b15"} {
		if !strings.Contains(tip, want) {
			t.Errorf("G/T tooltip %q lacks %q", tip, want)
		}
	}

	// Nothing is wider than the 1280-pixel window (the beam table's long
	// headings once pushed it 9 pixels past).
	if w := eval[[]int](t, ctx, `[document.documentElement.scrollWidth, document.documentElement.clientWidth]`); w[0] > w[1] {
		t.Errorf("the page is %d pixels wide in a window of %d", w[0], w[1])
	}

	// The download link is a data: URL with a download name and the CSV.
	link := eval[string](t, ctx, `(function () { var a = document.getElementById('csv-link'); return a.getAttribute('download') + '|' + decodeURIComponent(a.getAttribute('href')).slice(0, 60); })()`)
	if !strings.HasPrefix(link, "KP16-_script_window.__pwned_1__script_00017-per-frequency.csv|data:text/csv;charset=utf-8,frequency_hz,range_loss_db,") {
		t.Errorf("download link: %q", link)
	}

	// The link downloads the CSV under the page's policy (a download is
	// not a load that default-src governs; the browser saves the bytes).
	if got := downloadCSV(t, ctx); !bytes.Equal(got, UnitCSV(u)) {
		t.Errorf("the downloaded CSV (%d bytes) differs from UnitCSV (%d bytes)", len(got), len(UnitCSV(u)))
	}
	for _, v := range policyViolations(t, ctx) {
		t.Errorf("the page's policy refused %s after the download", v)
	}

	shot(t, ctx, "report.png")
	// Printing: the charts redraw at the paper width; a PDF comes out.
	pdf, err := chromedp.Run(ctx, chromedp.PrintToPDF(chromedp.PDFPreferCSSPageSize(), chromedp.PDFPrintBackground()))
	if err != nil {
		t.Fatalf("printing: %v", err)
	}
	if !bytes.HasPrefix(pdf, []byte("%PDF-")) || len(pdf) < 50_000 {
		t.Errorf("print gave %d bytes starting %q, want a PDF", len(pdf), pdf[:min(8, len(pdf))])
	}
	if dir := os.Getenv("GTPACK_SCREENSHOTS"); dir != "" {
		_ = os.WriteFile(filepath.Join(dir, "report.pdf"), pdf, 0o644)
		if _, err := chromedp.Call(ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: "print"}); err != nil {
			t.Fatal(err)
		}
		eval[chromedp.Void](t, ctx, `window.dispatchEvent(new Event('beforeprint'))`)
		shot(t, ctx, "report-print.png")
	}
	_, errs := pl.snapshot()
	for _, e := range errs {
		t.Errorf("browser reported an error after interaction: %s", e)
	}
}

func TestBrowserIndex(t *testing.T) {
	bctx := browser(t)
	dir := t.TempDir()
	html, err := Index(fixtureFleet(t))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "index.html")
	if err := os.WriteFile(path, html, 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, pl := openPage(t, bctx, path)
	checkPage(t, ctx, pl, []string{"chart-p0-months", "chart-hist", "chart-p0-l0", "chart-p0-l1", "chart-p0-band"})

	// The rows are drawn from the page's unit data: one page of them.
	const rowsJS = `(function () {
  var rs = Array.from(document.querySelectorAll('#unit-table tbody tr'));
  return rs.length + '/' + document.getElementById('unit-shown').textContent;
})()`
	if got := eval[string](t, ctx, rowsJS); got != "25/25" {
		t.Errorf("unit table on opening: rows/counter %s, want 25/25", got)
	}
	// Every row links to its unit's report and workbook, with the serial
	// as one escaped path segment.
	links := eval[[]string](t, ctx, `Array.from(document.querySelectorAll('#unit-table tbody a')).map(function (a) { return a.getAttribute('href'); })`)
	for _, u := range fixtureFleet(t).Units {
		seg := strings.ReplaceAll(url.PathEscape(u.Serial), "=", "%3D") // encodeURIComponent escapes '=' too
		for _, href := range []string{"units/" + seg + "/report.html", "units/" + seg + "/" + seg + ".xlsx"} {
			if !slices.Contains(links, href) {
				t.Errorf("unit table lacks the link %s", href)
			}
		}
	}

	// The filter box: text matches serial, product, date; a verdict word
	// matches that verdict exactly (pass is not conditional pass).
	tests := []struct {
		query string
		rows  int
	}{
		{"XB4", 1},
		{"fail", 2}, // the two FAIL units (general knowledge of the fixture)
		{"kp16", 24},
		{"pass", 21},
		{"conditional pass", 1},
		{"conditional-pass kp16", 1},
		{"pass fail", 23}, // either
		{"retest", 2},
		{"2026-11-20", 1},
		{"", 25},
	}
	for _, tc := range tests {
		got := eval[string](t, ctx, fmt.Sprintf(`(function () {
  var i = document.querySelector('input.filter-box[data-table="unit-table"]'); i.value = %q; i.dispatchEvent(new Event('input'));
  return %s;
})()`, tc.query, rowsJS))
		if want := fmt.Sprintf("%d/%d", tc.rows, tc.rows); got != want {
			t.Errorf("filter %q: shown rows/counter %s, want %s", tc.query, got, want)
		}
	}
	// A verdict count filters the table to that verdict.
	for _, tc := range []struct {
		verdict reduce.Verdict
		rows    int
	}{{"fail", 2}, {"conditional-pass", 1}, {"pass", 21}, {"incomplete", 1}} {
		got := eval[string](t, ctx, fmt.Sprintf(`(function () {
  document.querySelector('button.count[data-verdict="%s"]').click();
  return %s + ' ' + Array.from(document.querySelectorAll('#unit-table tbody tr td:nth-child(3)')).map(function (c) { return c.textContent; }).join('|');
})()`, tc.verdict, rowsJS))
		n, labels, _ := strings.Cut(got, " ")
		if want := fmt.Sprintf("%d/%d", tc.rows, tc.rows); n != want {
			t.Errorf("count %s: rows/counter %s, want %s", tc.verdict, n, want)
		}
		for _, l := range strings.Split(labels, "|") {
			if l != verdictLabel(tc.verdict) {
				t.Errorf("count %s: a row shows %q", tc.verdict, l)
			}
		}
	}
	eval[chromedp.Void](t, ctx, `(function () { var i = document.querySelector('input.filter-box[data-table="unit-table"]'); i.value = ''; i.dispatchEvent(new Event('input')); })()`)

	// Sorting by worst margin puts the most negative first, then reverses.
	const firstJS = `(function (key) { document.querySelector('#unit-table th[data-key="' + key + '"]').click(); return document.querySelector('#unit-table tbody tr td').textContent; })`
	if got := eval[string](t, ctx, firstJS+`('margin')`); got != "KP16-00010" {
		t.Errorf("ascending worst margin: first unit %q, want KP16-00010 (-0.80 dB)", got)
	}
	if got := eval[string](t, ctx, firstJS+`('margin')`); got != "KP16-00007" {
		t.Errorf("descending worst margin: first unit %q, want KP16-00007 (+1.25 dB)", got)
	}
	// By verdict: in order of severity, then by serial.
	order := eval[string](t, ctx, `(function () {
  document.querySelector('#unit-table th[data-key="verdict"]').click();
  return Array.from(document.querySelectorAll('#unit-table tbody tr')).map(function (r) { return r.cells[0].textContent + ' ' + r.cells[2].textContent; }).slice(0, 5).join('|');
})()`)
	if want := "KP16-00010 FAIL|XB4-00001 FAIL|KP16-00021 INCOMPLETE|KP16-00015 CONDITIONAL PASS|KP16-00001 PASS"; order != want {
		t.Errorf("sorted by verdict: %s, want %s", order, want)
	}
	if got := eval[string](t, ctx, firstJS+`('verdict')`); got != "KP16-00001" {
		t.Errorf("descending verdict: first unit %q, want the first PASS", got)
	}
	// A retested unit shows it.
	if got := eval[string](t, ctx, `(function () { var i = document.querySelector('input.filter-box[data-table="unit-table"]'); i.value = 'KP16-00015'; i.dispatchEvent(new Event('input'));
  return document.querySelector('#unit-table tbody tr td:nth-child(8)').innerHTML; })()`); got != `3 <span class="tag retest" title="retested: first run FAIL">retest</span>` {
		t.Errorf("runs cell of KP16-00015: %s", got)
	}

	// The needs-attention list comes first, worst first, with its reasons.
	att := eval[[]string](t, ctx, `Array.from(document.querySelectorAll('#attention-table tbody tr')).map(function (r) { return r.cells[0].textContent + ' ' + r.cells[2].textContent + ' ' + r.cells[3].textContent; })`)
	if len(att) < 5 || !strings.HasPrefix(att[0], "KP16-00010 FAIL ") || !strings.HasPrefix(att[1], "XB4-00001 FAIL") {
		t.Errorf("needs-attention rows %q", att)
	}
	if pos := eval[[]int](t, ctx, `[document.getElementById('attention').offsetTop, document.getElementById('units').offsetTop]`); pos[0] >= pos[1] {
		t.Errorf("the needs-attention list (at %d px) is not before the unit table (%d px)", pos[0], pos[1])
	}
	// The control chart marks every point beyond its limits.
	want := len(fixtureFleet(t).Products[0].Limits[0].Chart.Beyond)
	if got := eval[int](t, ctx, `(function () {
  var o = echarts.getInstanceByDom(document.getElementById('chart-p0-l0')).getOption();
  return o.series.filter(function (s) { return s.id === 'beyond'; })[0].data.length;
})()`); got != want || want == 0 {
		t.Errorf("control chart marks %d points beyond the limits, want %d", got, want)
	}
	// Its tooltip names the unit and the date.
	tip := eval[string](t, ctx, `(function () {
  var c = echarts.getInstanceByDom(document.getElementById('chart-p0-l0'));
  var o = c.getOption(), k = o.series.findIndex(function (s) { return s.id === 'beyond'; });
  return o.tooltip[0].formatter({value: o.series[k].data[0], seriesName: o.series[k].name});
})()`)
	if !strings.Contains(tip, "KP16-00010") || !strings.Contains(tip, "2026-11-03") {
		t.Errorf("control chart tooltip %q lacks the unit and its date", tip)
	}
	shot(t, ctx, "index.png")
	_, errs := pl.snapshot()
	for _, e := range errs {
		t.Errorf("browser reported an error after interaction: %s", e)
	}
}

// downloadCSV clicks the report's download link and returns the bytes the
// browser saved.
func downloadCSV(t *testing.T, ctx context.Context) []byte {
	t.Helper()
	dir := t.TempDir()
	done := make(chan string, 1)
	if err := chromedp.ListenBrowser(ctx, func(ev any) {
		if e, ok := ev.(*cdpbrowser.EventDownloadProgress); ok && e.State == cdpbrowser.DownloadProgressStateCompleted {
			select {
			case done <- e.GUID:
			default:
			}
		}
	}); err != nil {
		t.Fatal(err)
	}
	events := true
	if _, err := chromedp.CallBrowser(ctx, cdpbrowser.SetDownloadBehavior, cdpbrowser.SetDownloadBehaviorParams{
		Behavior: cdpbrowser.SetDownloadBehaviorBehaviorAllowAndName, DownloadPath: dir, EventsEnabled: &events,
	}); err != nil {
		t.Fatalf("allowing downloads: %v", err)
	}
	eval[chromedp.Void](t, ctx, `document.getElementById('csv-link').click()`)
	select {
	case guid := <-done:
		b, err := os.ReadFile(filepath.Join(dir, guid))
		if err != nil {
			t.Fatalf("the download: %v", err)
		}
		return b
	case <-time.After(30 * time.Second):
		t.Fatal("clicking the download link saved no file within 30 s")
	}
	return nil
}

// trap is an HTTP server on the loopback address that records every
// request: a page that loads anything from it has fetched from outside.
type trap struct {
	*httptest.Server
	mu    sync.Mutex
	paths []string
}

func newTrap(t *testing.T) *trap {
	t.Helper()
	tr := &trap{}
	tr.Server = httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		tr.mu.Lock()
		tr.paths = append(tr.paths, r.URL.Path)
		tr.mu.Unlock()
		w.WriteHeader(http.StatusNoContent)
	}))
	t.Cleanup(tr.Close)
	return tr
}

func (tr *trap) seen() []string {
	tr.mu.Lock()
	defer tr.mu.Unlock()
	return append([]string(nil), tr.paths...)
}

// waitSeen waits up to d for the trap to see path.
func (tr *trap) waitSeen(path string, d time.Duration) bool {
	for end := time.Now().Add(d); time.Now().Before(end); time.Sleep(50 * time.Millisecond) {
		if slices.Contains(tr.seen(), path) {
			return true
		}
	}
	return false
}

// writePage writes a page into a fresh folder and returns its path.
func writePage(t *testing.T, name string, html []byte) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, html, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// trapControl opens a page without a policy that loads an image from the
// trap, and fails unless the trap sees it: the browser can reach the trap
// from a file: page, so a trap that sees nothing later means something.
func trapControl(t *testing.T, bctx context.Context, tr *trap) {
	t.Helper()
	path := writePage(t, "control.html", []byte(`<!DOCTYPE html><html><head><meta charset="utf-8"><title>control</title></head><body><img src="`+tr.URL+`/control.png"></body></html>`))
	openPage(t, bctx, path)
	if !tr.waitSeen("/control.png", 10*time.Second) {
		t.Fatalf("the control page's image never reached the trap (saw %q): the test cannot tell a page that fetches from one that does not", tr.seen())
	}
}

// reportCharts are the charts of the report of fixtureUnit(t, 16, 801).
var reportCharts = []string{"chart-gt", "chart-gain", "chart-noise", "chart-range", "chart-scan", "chart-elements"}

// Remote images and links in the notes, pointing at a server of the test,
// are shown as text and fetch nothing; raw HTML with a CSS url() or an
// image is left out.
func TestBrowserNotesLoadNothing(t *testing.T) {
	bctx := browser(t)
	tr := newTrap(t)
	trapControl(t, bctx, tr)
	u := fixtureUnit(t, 16, 801)
	u.Notes = "Photo of the set-up: ![the horn on the mast](" + tr.URL + "/notes-image.png)\n\n" +
		"See [the procedure](" + tr.URL + "/notes-link) and <" + tr.URL + "/notes-autolink>, or [the limits](#limits).\n\n" +
		"<div style=\"background-image: url(" + tr.URL + "/notes-css.png); height: 20px\">styled</div>\n\n" +
		"<img src=\"" + tr.URL + "/notes-raw.png\">\n"
	html, err := Report(u)
	if err != nil {
		t.Fatal(err)
	}
	ctx, pl := openPage(t, bctx, writePage(t, "report.html", html))
	checkPage(t, ctx, pl, reportCharts)
	// Whatever the page would load is asked for while it loads; give a
	// late request a moment all the same.
	time.Sleep(500 * time.Millisecond)
	if got := tr.seen(); !slices.Equal(got, []string{"/control.png"}) {
		t.Errorf("the trap saw %q after the report was opened, want only the control page's /control.png", got)
	}
	type notesState struct {
		Text      string   `json:"text"`
		HTML      string   `json:"html"`
		Images    []string `json:"images"`
		Links     []string `json:"links"`
		Backdrops []string `json:"backdrops"`
	}
	got := eval[notesState](t, ctx, `(function () {
  var n = document.getElementById('notes');
  var all = Array.from(document.querySelectorAll('*'));
  return {
    text: n.textContent, html: n.innerHTML,
    images: Array.from(document.images).map(function (i) { return i.src; }),
    links: Array.from(document.querySelectorAll('a[href]')).map(function (a) { return a.getAttribute('href').slice(0, 20); }),
    backdrops: all.map(function (e) { return getComputedStyle(e).backgroundImage; }).filter(function (b) { return b !== 'none'; })
  };
})()`)
	for _, want := range []string{
		"the horn on the mast " + tr.URL + "/notes-image.png (remote image not loaded)",
		"the procedure " + tr.URL + "/notes-link (link not followed)",
		tr.URL + "/notes-autolink",
		"the limits",
	} {
		if !strings.Contains(got.Text, want) {
			t.Errorf("the notes lack the text %q: %q", want, got.Text)
		}
	}
	for _, gone := range []string{"notes-css", "notes-raw", "styled"} {
		if strings.Contains(got.HTML, gone) {
			t.Errorf("the notes carry %q: %s", gone, got.HTML)
		}
	}
	if len(got.Images) != 0 {
		t.Errorf("the page has images %q, want none", got.Images)
	}
	for _, h := range got.Links {
		if !strings.HasPrefix(h, "#") && !strings.HasPrefix(h, "data:") {
			t.Errorf("the page links to %q: only #... and the data: download are allowed", h)
		}
	}
	if len(got.Backdrops) != 0 {
		t.Errorf("elements have background images %q, want none", got.Backdrops)
	}
	if dir := os.Getenv("GTPACK_SCREENSHOTS"); dir != "" {
		png, err := chromedp.Run(ctx, chromedp.Screenshot(chromedp.ID("notes")))
		if err != nil {
			t.Fatalf("screenshot of the notes: %v", err)
		}
		_ = os.WriteFile(filepath.Join(dir, "report-notes.png"), png, 0o644)
	}
}

// The page's policy stops every load, should markup ever reach the page
// past the escaping: the report with an image, a style sheet, a CSS url(),
// a frame and a script added to it loads nothing from the trap, runs
// nothing, and still draws its charts. The refusals are reported, which
// also shows that the check for refusals in checkPage sees them.
func TestBrowserPolicyBlocks(t *testing.T) {
	bctx := browser(t)
	tr := newTrap(t)
	trapControl(t, bctx, tr)
	html, err := Report(fixtureUnit(t, 16, 801))
	if err != nil {
		t.Fatal(err)
	}
	planted := `<img src="` + tr.URL + `/planted.png"><link rel="stylesheet" href="` + tr.URL + `/planted.css">` +
		`<div style="width: 20px; height: 20px; background-image: url(` + tr.URL + `/planted-bg.png)"></div>` +
		`<iframe src="` + tr.URL + `/planted-frame"></iframe><script>window.__pwned = 6;</script></body>`
	html = bytes.Replace(html, []byte("</body>"), []byte(planted), 1)
	ctx, pl := openPage(t, bctx, writePage(t, "report.html", html))
	eval[chromedp.Void](t, ctx, `fetch('`+tr.URL+`/planted-fetch').catch(function () {})`)
	time.Sleep(500 * time.Millisecond)
	if got := tr.seen(); !slices.Equal(got, []string{"/control.png"}) {
		t.Errorf("the trap saw %q after the report was opened, want only the control page's /control.png", got)
	}
	if pwned := eval[string](t, ctx, `typeof window.__pwned`); pwned != "undefined" {
		t.Errorf("the planted script ran: window.__pwned is %s", pwned)
	}
	drawn := eval[[]drawnChart](t, ctx, chartsJS)
	if len(drawn) != len(reportCharts) {
		t.Errorf("%d charts drawn, want %d", len(drawn), len(reportCharts))
	}
	refused := strings.Join(policyViolations(t, ctx), "\n")
	for _, want := range []string{"img-src " + tr.URL + "/planted-bg.png", "img-src " + tr.URL + "/planted.png",
		"style-src-elem " + tr.URL + "/planted.css",
		"frame-src " + tr.URL, // a frame's refusal names the origin only
		"script-src-elem inline", "connect-src " + tr.URL + "/planted-fetch"} {
		if !strings.Contains(refused, want) {
			t.Errorf("the policy did not report refusing %q; it reported:\n%s", want, refused)
		}
	}
	_, errs := pl.snapshot()
	if !slices.ContainsFunc(errs, func(e string) bool { return strings.Contains(e, "Content Security Policy") }) {
		t.Errorf("no refusal reached the console log (%q): checkPage's error check would miss one", errs)
	}
}
