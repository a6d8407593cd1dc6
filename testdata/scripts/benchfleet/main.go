// Command benchfleet opens a site's index.html in headless Chromium over
// the DevTools protocol and measures what a quality engineer waits for:
// DOMContentLoaded, a keystroke in the unit filter to the next frame,
// clearing the filter, a column sort, and the renderer's memory. It
// prints one line per figure and, with -shots DIR, writes screenshots of
// the page's top and of the whole page. testdata/scripts/bench-fleet.sh
// runs it.
//
//	benchfleet [-chromium PATH] [-shots DIR] SITE/index.html
package main

import (
	"context"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/heapprofiler"
	"github.com/chromedp/cdproto/performance"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

func main() {
	chromium := flag.String("chromium", "/usr/bin/chromium", "the browser")
	shots := flag.String("shots", "", "folder for screenshots (none when empty)")
	loadOnly := flag.Bool("load-only", false, "measure loading and memory only (any page)")
	flag.Parse()
	if flag.NArg() != 1 {
		fmt.Fprintln(os.Stderr, "usage: benchfleet [-chromium PATH] [-shots DIR] SITE/index.html")
		os.Exit(2)
	}
	if err := run(*chromium, *shots, flag.Arg(0), *loadOnly); err != nil {
		fmt.Fprintln(os.Stderr, "benchfleet:", err)
		os.Exit(1)
	}
}

func run(chromium, shots, page string, loadOnly bool) error {
	abs, err := filepath.Abs(page)
	if err != nil {
		return err
	}
	st, err := os.Stat(abs)
	if err != nil {
		return err
	}
	fmt.Printf("index.html size          %8.2f MB   (target < 3 MB)\n", float64(st.Size())/1e6)
	profile, err := os.MkdirTemp("", "benchfleet-profile-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(profile)
	parent, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
	defer cancel()
	actx, cancelAlloc := chromedp.NewExecAllocator(parent,
		chromedp.ExecPath(chromium), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU, chromedp.NoFirstRun,
		chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true), chromedp.UserDataDir(profile), chromedp.WindowSize(1280, 900))
	defer cancelAlloc()
	ctx, cancelTab := chromedp.NewContext(actx)
	defer cancelTab()
	var errs []string
	if err := chromedp.Do(ctx); err != nil { // start the browser before timing
		return err
	}
	if err := chromedp.Listen(ctx, func(ev any) {
		if e, ok := ev.(*runtime.EventExceptionThrown); ok && e.ExceptionDetails != nil {
			errs = append(errs, e.ExceptionDetails.Text)
		}
	}); err != nil {
		return err
	}
	if err := chromedp.Do(ctx, chromedp.Navigate("file://"+abs)); err != nil {
		return err
	}
	type navTimes struct {
		DCL  float64 `json:"dcl"`
		Load float64 `json:"load"`
	}
	nav, err := chromedp.Run(ctx, chromedp.Evaluate[navTimes](`(function () { var n = performance.getEntriesByType('navigation')[0];
  return {dcl: n.domContentLoadedEventEnd, load: n.loadEventEnd}; })()`))
	if err != nil {
		return err
	}
	fmt.Printf("DOMContentLoaded         %8.0f ms   (target < 2000 ms; load event %.0f ms)\n", nav.DCL, nav.Load)
	nodes, err := chromedp.Run(ctx, chromedp.Evaluate[int](`document.getElementsByTagName('*').length`))
	if err != nil {
		return err
	}
	fmt.Printf("elements in the document %8d\n", nodes)
	if shots != "" {
		if err := shot(ctx, shots, "index-top.png", false); err != nil {
			return err
		}
		// The page's sections, one screen each from its heading.
		for _, sec := range []string{"months", "units", "product-0"} {
			if err := shotAt(ctx, shots, "index-"+sec+".png", sec, 0); err != nil {
				return err
			}
		}
		if err := shotAt(ctx, shots, "index-product-0-charts.png", "product-0", 700); err != nil {
			return err
		}
		if err := shotAt(ctx, shots, "index-product-0-lists.png", "product-0", 1500); err != nil {
			return err
		}
	}

	if loadOnly {
		return memory(ctx, errs)
	}
	// Keystrokes: each key's keydown to the frame after the page's input
	// handler ran (requestAnimationFrame, then a task: the frame is drawn).
	if _, err := chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void](`(function () {
  window.__keys = [];
  var i = document.querySelector('input.filter-box[data-table="unit-table"]');
  var t0 = 0;
  i.addEventListener('keydown', function () { t0 = performance.now(); }, true);
  i.addEventListener('input', function () {
    var start = t0 || performance.now();
    requestAnimationFrame(function () { setTimeout(function () { window.__keys.push(performance.now() - start); }, 0); });
  });
  i.focus();
})()`)); err != nil {
		return err
	}
	for _, k := range []string{"Q", "D", "A", "-", "2", "6", "-", "0", "9"} {
		if err := chromedp.Do(ctx, chromedp.KeyEvent(k)); err != nil {
			return err
		}
		time.Sleep(150 * time.Millisecond)
	}
	keyMS, err := chromedp.Run(ctx, chromedp.Evaluate[[]float64](`window.__keys`))
	if err != nil {
		return err
	}
	shown, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.getElementById('unit-shown').textContent`))
	if err != nil {
		return err
	}
	fmt.Printf("filter keystroke         %8.1f ms   (target < 100 ms; median %.1f of %d keys; %s units shown after \"QDA-26-09\")\n", maxOf(keyMS), median(keyMS), len(keyMS), shown)
	// Clearing the filter: select all, delete.
	if _, err := chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void](`window.__keys = []; document.querySelector('input.filter-box[data-table="unit-table"]').select()`)); err != nil {
		return err
	}
	if err := chromedp.Do(ctx, chromedp.KeyEvent(kb.Delete)); err != nil {
		return err
	}
	time.Sleep(300 * time.Millisecond)
	if keyMS, err = chromedp.Run(ctx, chromedp.Evaluate[[]float64](`window.__keys`)); err != nil {
		return err
	}
	if shown, err = chromedp.Run(ctx, chromedp.Evaluate[string](`document.getElementById('unit-shown').textContent`)); err != nil {
		return err
	}
	fmt.Printf("clear the filter         %8.1f ms   (%s units shown)\n", maxOf(keyMS), shown)

	// Sorts: a click on a heading to the next frame.
	for _, key := range []string{"verdict", "margin", "started", "serial"} {
		var ms []float64
		for i := 0; i < 2; i++ { // ascending, then descending
			t, err := chromedp.Run(ctx, chromedp.Evaluate[float64](fmt.Sprintf(`new Promise(function (done) {
  var th = document.querySelector('#unit-table th[data-key="%s"]'), t0 = performance.now();
  th.click();
  requestAnimationFrame(function () { setTimeout(function () { done(performance.now() - t0); }, 0); });
})`, key), chromedp.EvalAwaitPromise))
			if err != nil {
				return err
			}
			ms = append(ms, t)
		}
		fmt.Printf("sort by %-16s %8.1f ms   (target < 300 ms; ascending %.1f, descending %.1f)\n", key, maxOf(ms), ms[0], ms[1])
	}
	first, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(function () { document.querySelector('#unit-table th[data-key="verdict"]').click();
  return document.querySelector('#unit-table tbody tr').textContent; })()`))
	if err != nil {
		return err
	}
	fmt.Printf("first row sorted by verdict: %s\n", first)
	if shots != "" {
		if _, err := chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void](`document.getElementById('units').scrollIntoView()`)); err != nil {
			return err
		}
		png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
		if err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(shots, "index-sorted.png"), png, 0o644); err != nil {
			return err
		}
	}

	return memory(ctx, errs)
}

// memory prints the renderer's resident set (from /proc, the renderer
// processes of this browser) and the page's JS heap, then the page's
// errors.
func memory(ctx context.Context, errs []string) error {
	if _, err := chromedp.Call(ctx, performance.Enable, performance.EnableParams{}); err != nil {
		return err
	}
	metrics, err := chromedp.Call(ctx, performance.GetMetrics, cdp.Empty{})
	if err != nil {
		return err
	}
	heap := 0.0
	for _, m := range metrics.Metrics {
		if m.Name == "JSHeapUsedSize" {
			heap = m.Value / 1e6
		}
	}
	rss, private := rendererMemory(chromedp.FromContext(ctx).Browser.Process().Pid)
	fmt.Printf("renderer memory          %8.0f MB   (target < 300 MB; resident set of the page's renderer, of it %.0f MB private; JS heap %.0f MB)\n", rss, private, heap)
	// Again after a collection: what the page holds, not garbage the
	// collector has not yet come to.
	if _, err := chromedp.Call(ctx, heapprofiler.CollectGarbage, cdp.Empty{}); err != nil {
		return err
	}
	time.Sleep(time.Second)
	rss, private = rendererMemory(chromedp.FromContext(ctx).Browser.Process().Pid)
	fmt.Printf("renderer memory after GC %8.0f MB   (private %.0f MB)\n", rss, private)
	for _, e := range errs {
		fmt.Println("page error:", e)
	}
	return nil
}

// shotAt captures the screen with the element id at its top, scrolled
// down by px more.
func shotAt(ctx context.Context, dir, name, id string, px int) error {
	if _, err := chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void](fmt.Sprintf(`(function () { var e = document.getElementById(%q); if (e) { e.scrollIntoView(); } window.scrollBy(0, %d); })()`, id, px))); err != nil {
		return err
	}
	png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
	if err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, name), png, 0o644)
}

func shot(ctx context.Context, dir, name string, full bool) error {
	if _, err := chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void](`window.scrollTo(0, 0)`)); err != nil {
		return err
	}
	a := chromedp.CaptureScreenshot()
	if full {
		a = chromedp.FullScreenshot(90)
	}
	png, err := chromedp.Run(ctx, a)
	if err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, name), png, 0o644)
}

// rendererMemory returns, for the renderer process of this browser (a
// descendant of the browser process pid with --type=renderer) that holds
// the most private memory, its resident set and its private (anonymous)
// resident memory in MB. The resident set counts the browser's shared
// code and fonts too (some 150-200 MB of any renderer); the private part
// is what the page costs. Every renderer is printed.
func rendererMemory(pid int) (rss, private float64) {
	parent := map[int]int{}
	procs, _ := filepath.Glob("/proc/[0-9]*/stat")
	for _, p := range procs {
		b, err := os.ReadFile(p)
		if err != nil {
			continue
		}
		s := string(b)
		i := strings.LastIndexByte(s, ')')
		if i < 0 {
			continue
		}
		f := strings.Fields(s[i+1:])
		if len(f) < 2 {
			continue
		}
		me, _ := strconv.Atoi(filepath.Base(filepath.Dir(p)))
		pp, _ := strconv.Atoi(f[1])
		parent[me] = pp
	}
	descends := func(p int) bool {
		for i := 0; i < 10 && p > 1; i++ {
			if p = parent[p]; p == pid {
				return true
			}
		}
		return false
	}
	pids := make([]int, 0, len(parent))
	for p := range parent {
		pids = append(pids, p)
	}
	sort.Ints(pids)
	for _, p := range pids {
		if !descends(p) {
			continue
		}
		cmd, _ := os.ReadFile(fmt.Sprintf("/proc/%d/cmdline", p))
		if !strings.Contains(string(cmd), "--type=renderer") {
			continue
		}
		status, _ := os.ReadFile(fmt.Sprintf("/proc/%d/status", p))
		var r, a float64
		for _, line := range strings.Split(string(status), "\n") {
			f := strings.Fields(line)
			if len(f) < 2 {
				continue
			}
			v, _ := strconv.ParseFloat(f[1], 64)
			switch f[0] {
			case "VmRSS:":
				r = v / 1024
			case "RssAnon:":
				a = v / 1024
			}
		}
		fmt.Printf("  renderer process %d: resident %.0f MB, private %.0f MB\n", p, r, a)
		if a > private {
			rss, private = r, a
		}
	}
	return rss, private
}

func maxOf(xs []float64) float64 {
	m := 0.0
	for _, x := range xs {
		m = max(m, x)
	}
	return m
}

func median(xs []float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	return s[len(s)/2]
}
