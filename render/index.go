package render

import (
	"encoding/json"
	"errors"
	"fmt"
	"html/template"
	"math"
	"net/url"
	"sort"
	"strings"
	"time"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"gtpack.example/gtpack/reduce"
)

// Index renders the fleet overview (index.html). It opens on what to act
// on: the verdict counts (each one filters the unit table), the units that
// need attention first (fail, conditional, incomplete, stale, on the watch
// list, beyond a control limit), first-pass and final yield by month; then
// the table of every unit, and per product its limits, control charts
// against the run date, golden band and watch list.
//
// The two unit tables are not written as HTML rows: at 10,000 units that
// was 9 MB and 200,000 elements. The units go into one compact JSON block
// (indexData), and page.js shows one page of rows at a time, filtering
// and sorting the block itself.
func Index(f *reduce.Fleet) ([]byte, error) {
	if f == nil {
		return nil, errors.New("render: index of a nil fleet")
	}
	if _, err := loadPages(); err != nil {
		return nil, err
	}
	v, err := indexModel(f, fleetIssueOf)
	if err != nil {
		return nil, err
	}
	return executeSized("index.tmpl", v, len(assets.lib)+len(v.Data)+256<<10)
}

type indexView struct {
	pageAssets
	Version string
	Total   int // production units: check units are not counted
	// CheckUnits are the stations' check units, named apart.
	CheckUnits []checkUnitLink
	Counts     []countRow
	Stale      int
	Histogram  *chartSpec
	Products   []productView
	Cautions   string
	Notices    []string
	// ShowIssue is set when the fleet knows any unit's issue state: the
	// table then has a Report state and a Runs column. Issues counts the
	// units per issue state; Retested those with more than one run.
	ShowIssue bool
	Issues    []issueCount
	Retested  int
	// Attention is the needs-attention list, most severe first; Reasons
	// counts its units per reason.
	Attention []attentionRow
	Reasons   []reasonCount
	// Data is the JSON block the unit tables are drawn from (indexData).
	Data template.JS
	// Months is the yield by month of every product.
	Months []monthsView
	// MinCapability and MinChartPoints are the small-sample thresholds
	// (method.md section 10).
	MinCapability, MinChartPoints int
}

type issueCount struct {
	State reduce.IssueState
	N     int
}

type reasonCount struct {
	Reason string
	N      int
}

// Reasons for attention, in the order the summary lists them.
const (
	reasonFail      = "fail"
	reasonCondFail  = "conditional fail"
	reasonIncomp    = "incomplete"
	reasonStale     = "stale"
	reasonCondPass  = "conditional pass"
	reasonWatch     = "watch list"
	reasonBeyond    = "beyond control limits"
	reasonNoReport  = "no report"
	reasonOtherVerd = "unknown verdict"
)

var reasonOrder = []string{reasonFail, reasonCondFail, reasonIncomp, reasonStale, reasonNoReport, reasonOtherVerd, reasonCondPass, reasonWatch, reasonBeyond}

// attentionRow is a unit that needs attention and why.
type attentionRow struct {
	Unit    int // index into indexView's units (serial order)
	Serial  string
	Verdict reduce.Verdict
	Rank    int
	Reasons []string
	// Why is the reasons as a line: the watch list's span and worst
	// excursion, the limits whose control chart it is beyond.
	Why string
}

// severityOrder is the order of verdicts by severity, worst first: the
// unit table's verdict sort and the needs-attention list. An incomplete
// unit comes before the conditional pass: nothing about it is known to
// pass.
var severityOrder = []reduce.Verdict{reduce.VerdictFail, reduce.VerdictConditionalFail, reduce.VerdictIncomplete, reduce.VerdictConditionalPass, reduce.VerdictPass}

// severityRank is v's place in severityOrder; any other verdict ranks
// with incomplete.
func severityRank(v reduce.Verdict) int {
	for i, s := range severityOrder {
		if s == v {
			return i
		}
	}
	return 2
}

type productView struct {
	reduce.ProductFleet
	Index      int
	Counts     []countRow
	Limits     []limitStatsRow
	Charts     []chartSpec
	Watch      []watchRow
	MinUnits   int
	MinPoints  int
	HasMonths  bool
	YieldChart *chartSpec
}

type limitStatsRow struct {
	reduce.LimitStats
	HasStats bool
	Beyond   []beyondRow
	Basis    string
}

// beyondRow is a point of a control chart beyond its limits.
type beyondRow struct {
	Serial     string
	ReportHref string
	Date       string
	MarginDB   float64
	Side       string // "above" or "below"
}

// watchRow is a watch-list entry as the overview shows it: the span, the
// number of grid points outside the band and the worst excursion.
type watchRow struct {
	reduce.WatchEntry
	ReportHref string
}

type monthsView struct {
	Product string
	Index   int
	Months  []reduce.MonthYield
	Chart   *chartSpec
}

// indexData is the JSON block of the unit tables. Units are rows of
// fixed fields (see unitRecord), in serial order; verdicts, products and
// limit names are indexes into their lists, so that a row of 10,000 is
// some 100 bytes. Attention lists unit indexes with the reason line, most
// severe first.
type indexData struct {
	Verdicts  []string `json:"verdicts"` // severityOrder, then any other
	Products  []string `json:"products"`
	Limits    []string `json:"limits"`
	Issue     bool     `json:"issue"`
	Units     [][]any  `json:"units"`
	Attention [][2]any `json:"attention"`
	Fields    []string `json:"fields"`
}

// unitFields name the fields of a unit row of indexData, in order.
var unitFields = []string{"serial", "product", "verdict", "worst_margin_db", "worst_limit", "started", "runs", "first_verdict", "issue_state", "report_number", "no_report", "stale"}

// checkUnitLink is a check unit as the overview names it.
type checkUnitLink struct {
	Serial     string
	ReportHref string
}

func indexModel(f *reduce.Fleet, issueOf func(*reduce.FleetUnit) fleetIssue) (*indexView, error) {
	v := &indexView{pageAssets: inlineAssets(), Version: Version, Total: len(f.Units), Cautions: cautions, Notices: f.Notices,
		MinCapability: reduce.MinCapabilityUnits, MinChartPoints: reduce.MinChartPoints}
	// Check units are the range's check standards, not production: the
	// overview names them and leaves them out of its counts and tables
	// (health.html charts them).
	units := make([]*reduce.FleetUnit, 0, len(f.Units))
	for i := range f.Units {
		if u := &f.Units[i]; u.CheckUnit {
			v.CheckUnits = append(v.CheckUnits, checkUnitLink{Serial: u.Serial, ReportHref: "units/" + url.PathEscape(u.Serial) + "/report.html"})
		} else {
			units = append(units, u)
		}
	}
	v.Total = len(units)
	// The units arrive sorted by serial; keep that order whatever the input.
	sort.SliceStable(units, func(i, j int) bool { return units[i].Serial < units[j].Serial })
	unitIndex := make(map[string]int, len(units))
	for i, u := range units {
		unitIndex[u.Serial] = i
	}

	d := indexData{Verdicts: make([]string, len(severityOrder)), Products: []string{}, Limits: []string{}, Units: make([][]any, 0, len(units)), Attention: [][2]any{}, Fields: unitFields}
	verdictIdx := map[string]int{}
	for i, s := range severityOrder {
		d.Verdicts[i] = string(s)
		verdictIdx[string(s)] = i
	}
	lookup := func(list *[]string, idx map[string]int, s string) int {
		if i, ok := idx[s]; ok {
			return i
		}
		idx[s] = len(*list)
		*list = append(*list, s)
		return idx[s]
	}
	productIdx, limitIdx := map[string]int{}, map[string]int{}

	counts := map[reduce.Verdict]int{}
	issues := map[reduce.IssueState]int{}
	var margins []float64
	reasons := make([][]string, len(units))
	whys := make([][]string, len(units))
	addReason := func(i int, r, why string) {
		for _, x := range reasons[i] {
			if x == r {
				if why != "" {
					whys[i] = append(whys[i], why)
				}
				return
			}
		}
		reasons[i] = append(reasons[i], r)
		if why != "" {
			whys[i] = append(whys[i], why)
		}
	}
	for i, u := range units {
		fi := issueOf(u)
		if fi.known() {
			v.ShowIssue = true
			issues[fi.State]++
			if fi.Retested() {
				v.Retested++
			}
		}
		margin, limit, has := math.NaN(), "", false
		// Each entry is a limit name's worst beam; the first entry wins a tie.
		for _, l := range u.Limits {
			if finite(l.WorstMarginDB) && (!has || l.WorstMarginDB < margin) {
				margin, limit, has = l.WorstMarginDB, l.Name+" ("+l.Beam+")", true
			}
		}
		var marginVal any
		limitVal := -1
		if has {
			margins = append(margins, margin)
			marginVal = compact{margin, 3}
			limitVal = lookup(&d.Limits, limitIdx, limit)
		}
		counts[u.Verdict]++
		first := -1
		if fi.FirstVerdict != "" {
			first = lookup(&d.Verdicts, verdictIdx, string(fi.FirstVerdict))
		}
		report := fi.ReportNumber
		if report == "" && fi.Revision > 0 {
			report = fmt.Sprintf("R%d", fi.Revision)
		}
		noReport := 0
		if u.NoReport {
			noReport = 1
		}
		d.Units = append(d.Units, []any{u.Serial, lookup(&d.Products, productIdx, u.Product), lookup(&d.Verdicts, verdictIdx, string(u.Verdict)),
			marginVal, limitVal, timeText(u.Started), fi.Runs, first, fi.State, report, noReport, u.Stale})
		switch u.Verdict {
		case reduce.VerdictFail:
			addReason(i, reasonFail, "")
		case reduce.VerdictConditionalFail:
			addReason(i, reasonCondFail, "")
		case reduce.VerdictIncomplete:
			addReason(i, reasonIncomp, "")
		case reduce.VerdictConditionalPass:
			addReason(i, reasonCondPass, "")
		case reduce.VerdictPass:
		default:
			addReason(i, reasonOtherVerd, "verdict "+string(u.Verdict))
		}
		if u.Stale != "" {
			v.Stale++
			addReason(i, reasonStale, "stale: "+u.Stale)
		}
		if u.NoReport {
			addReason(i, reasonNoReport, "no report in the site")
		}
	}
	d.Issue = v.ShowIssue
	v.Counts = severityCounts(counts)
	for _, st := range []reduce.IssueState{stateIssued, stateDraft, stateVoid} {
		if n := issues[st]; n > 0 {
			v.Issues = append(v.Issues, issueCount{st, n})
		}
	}
	if len(margins) > 0 {
		h, err := histogramChart(margins)
		if err != nil {
			return nil, err
		}
		v.Histogram = &h
	}
	for pi, p := range f.Products {
		pv := productView{ProductFleet: p, Index: pi, Counts: severityCounts(p.VerdictCounts), MinUnits: reduce.MinCapabilityUnits, MinPoints: reduce.MinChartPoints, HasMonths: len(p.Months) > 0}
		for li, l := range p.Limits {
			row := limitStatsRow{LimitStats: l, HasStats: l.Units >= 2, Basis: controlBasis(l)}
			for _, b := range l.Chart.Beyond {
				if b < 0 || b >= len(l.Chart.ValuesDB) {
					continue
				}
				serial := at(l.Chart.Serials, b)
				br := beyondRow{Serial: serial, ReportHref: reportHref(serial), Date: dateOf(at(l.Chart.Started, b)), MarginDB: l.Chart.ValuesDB[b], Side: "below"}
				if br.MarginDB > l.Chart.UpperDB {
					br.Side = "above"
				}
				row.Beyond = append(row.Beyond, br)
				if i, ok := unitIndex[serial]; ok {
					addReason(i, reasonBeyond, fmt.Sprintf("%s: %s dB, %s the control limits", l.Name, fmtSigned(br.MarginDB), br.Side))
				}
			}
			pv.Limits = append(pv.Limits, row)
			if len(l.Chart.ValuesDB) >= 2 {
				c, err := controlChart(fmt.Sprintf("chart-p%d-l%d", pi, li), l, unitIndex)
				if err != nil {
					return nil, err
				}
				pv.Charts = append(pv.Charts, c)
			}
		}
		if p.Band != nil && len(p.Band.FrequencyHz) > 1 {
			c, err := bandChart(fmt.Sprintf("chart-p%d-band", pi), p.Band)
			if err != nil {
				return nil, err
			}
			pv.Charts = append(pv.Charts, c)
		}
		for _, w := range p.Watch {
			pv.Watch = append(pv.Watch, watchRow{WatchEntry: w, ReportHref: reportHref(w.Serial)})
			if i, ok := unitIndex[w.Serial]; ok {
				addReason(i, reasonWatch, "watch list: "+watchLine(w))
			}
		}
		// The largest excursions first.
		sort.SliceStable(pv.Watch, func(i, j int) bool {
			return math.Abs(pv.Watch[i].WorstExcursionDB) > math.Abs(pv.Watch[j].WorstExcursionDB)
		})
		if len(p.Months) > 0 {
			mv := monthsView{Product: p.Product, Index: pi, Months: p.Months}
			c, err := yieldChart(fmt.Sprintf("chart-p%d-months", pi), p)
			if err != nil {
				return nil, err
			}
			mv.Chart = &c
			pv.YieldChart = &c
			v.Months = append(v.Months, mv)
		}
		v.Products = append(v.Products, pv)
	}

	// The needs-attention list: most severe verdict first, then the
	// number of reasons, then serial.
	reasonN := map[string]int{}
	for i, rs := range reasons {
		if len(rs) == 0 {
			continue
		}
		for _, r := range rs {
			reasonN[r]++
		}
		u := units[i]
		v.Attention = append(v.Attention, attentionRow{Unit: i, Serial: u.Serial, Verdict: u.Verdict, Rank: severityRank(u.Verdict),
			Reasons: rs, Why: strings.Join(whys[i], "; ")})
	}
	sort.SliceStable(v.Attention, func(i, j int) bool {
		a, b := &v.Attention[i], &v.Attention[j]
		if a.Rank != b.Rank {
			return a.Rank < b.Rank
		}
		if len(a.Reasons) != len(b.Reasons) {
			return len(a.Reasons) > len(b.Reasons)
		}
		return a.Unit < b.Unit
	})
	for _, r := range reasonOrder {
		if n := reasonN[r]; n > 0 {
			v.Reasons = append(v.Reasons, reasonCount{r, n})
		}
	}
	for _, a := range v.Attention {
		why := a.Why
		if why == "" {
			why = strings.Join(a.Reasons, ", ")
		}
		d.Attention = append(d.Attention, [2]any{a.Unit, why})
	}
	raw, err := json.Marshal(d)
	if err != nil {
		return nil, err
	}
	v.Data = template.JS(raw)
	return v, nil
}

// severityCounts lists a verdict-count map in severityOrder, then any
// other verdict sorted.
func severityCounts(m map[reduce.Verdict]int) []countRow {
	var out []countRow
	for _, v := range severityOrder {
		if n, ok := m[v]; ok && n > 0 {
			out = append(out, countRow{Verdict: v, N: n})
		}
	}
	var rest []reduce.Verdict
	for k, n := range m {
		if severityRank(k) == 2 && k != reduce.VerdictIncomplete && n > 0 {
			rest = append(rest, k)
		}
	}
	sort.Slice(rest, func(i, j int) bool { return rest[i] < rest[j] })
	for _, k := range rest {
		out = append(out, countRow{Verdict: k, N: m[k]})
	}
	return out
}

func at[T any](xs []T, i int) T {
	if i >= 0 && i < len(xs) {
		return xs[i]
	}
	var zero T
	return zero
}

func reportHref(serial string) string { return "units/" + url.PathEscape(serial) + "/report.html" }

// watchLine is a watch-list entry in a few words: span, points, worst
// excursion and where.
func watchLine(w reduce.WatchEntry) string {
	span := fmtGHz(w.SpanHz[0])
	if w.SpanHz[1] != w.SpanHz[0] {
		span += "–" + fmtGHz(w.SpanHz[1])
	}
	pts := "points"
	if w.Points == 1 {
		pts = "point"
	}
	return fmt.Sprintf("%s GHz, %d %s outside the band, worst %s dB at %s GHz", span, w.Points, pts, fmtSigned(w.WorstExcursionDB), fmtGHz(w.WorstAtHz))
}

// controlBasis says what a control chart's limits rest on and how far
// they can be trusted (method.md section 10).
func controlBasis(l reduce.LimitStats) string {
	n := len(l.Chart.ValuesDB)
	s := fmt.Sprintf("Centre %s dB = mean of the worst margins of all %d units in test order; limits %s and %s dB = centre ± 2.66 × mean moving range (%s dB; Shewhart individuals chart).",
		fmtFixed(l.Chart.CentreDB, 3), n, fmtFixed(l.Chart.LowerDB, 3), fmtFixed(l.Chart.UpperDB, 3), fmtFixed(l.Chart.MeanMovingRange, 3))
	if l.Chart.TooFew {
		s += fmt.Sprintf(" Fewer than %d points: no point is called out of control.", reduce.MinChartPoints)
	}
	return s
}

// niceStep is the bin width of a histogram of values spanning span dB in
// about n bins: 1, 2, 2.5 or 5 times a power of ten.
func niceStep(span float64, n int) float64 {
	if !(span > 0) || n < 1 {
		return 0.1
	}
	raw := span / float64(n)
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*p >= raw {
			return m * p
		}
	}
	return 10 * p
}

// histogramChart counts the worst margins in bins aligned on zero, so that
// no bin straddles the limit; bins below zero are drawn in the fail colour
// and every bin carries its count, so that a bin of one unit beside bins
// of hundreds still reads.
func histogramChart(ms []float64) (chartSpec, error) {
	lo, hi := ms[0], ms[0]
	for _, m := range ms {
		lo, hi = math.Min(lo, m), math.Max(hi, m)
	}
	nb := int(math.Ceil(math.Sqrt(float64(len(ms)))))
	if nb < 5 {
		nb = 5
	}
	if nb > 40 {
		nb = 40
	}
	step := niceStep(hi-lo, nb)
	first := math.Floor(lo/step) * step
	n := int(math.Floor((hi-first)/step)) + 1
	counts := make([]int, n)
	for _, m := range ms {
		i := int(math.Floor((m - first) / step))
		if i >= n {
			i = n - 1
		}
		if i < 0 {
			i = 0
		}
		counts[i]++
	}
	labels := make([]string, n)
	data := make([]opts.BarData, n)
	for i := range counts {
		a := first + float64(i)*step
		labels[i] = fmt.Sprintf("%s to %s", fmtFixed(a, 2), fmtFixed(a+step, 2))
		col := "#1b4f72"
		if a+step <= 1e-12 {
			col = "#922b21"
		}
		data[i] = opts.BarData{Value: counts[i], ItemStyle: &opts.ItemStyle{Color: col}}
	}
	c := charts.NewBar()
	c.SetGlobalOptions(
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "item"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "category", Name: "Worst margin (dB)", NameLocation: "middle", NameGap: 30}),
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: "Units", MinInterval: 1}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(false)}),
		charts.WithGridOpts(opts.Grid{Left: "56", Right: "24", Top: "36", Bottom: "56"}),
	)
	c.SetXAxis(labels)
	c.AddSeries("units", data, charts.WithBarChartOpts(opts.BarChart{BarCategoryGap: "8%"}),
		charts.WithLabelOpts(opts.Label{Show: opts.Bool(true), Position: "top", FontSize: 10}))
	opt, err := finish(c, map[string]any{"unit": "units", "categories": labels}, nil)
	return chartSpec{ID: "chart-hist", Title: "Worst margin of every unit", Height: 300, Option: opt,
		Caption: fmt.Sprintf("Each unit counted once at its worst margin over all limits; bins of %s dB aligned on 0 dB; red bins are below the limit; the number above a bar is its count.", fmtFixed(step, 2))}, err
}

// epochMS is t, to the second as result.json writes it, in milliseconds
// since 1970 (a time axis's value); ok is false for the zero time.
func epochMS(t time.Time) (int64, bool) {
	if t.IsZero() {
		return 0, false
	}
	return t.Truncate(time.Second).UnixMilli(), true
}

// controlChart is the individuals chart of one limit's worst margins
// against the run date, with its centre line and control limits, and
// every point beyond them marked. A point is [time in ms, margin, unit]
// with unit the index of its row in the page's unit data, which the
// tooltip names and a click opens.
func controlChart(id string, l reduce.LimitStats, unitIndex map[string]int) (chartSpec, error) {
	cc := l.Chart
	beyond := map[int]bool{}
	for _, b := range cc.Beyond {
		beyond[b] = true
	}
	var pts, out [][]any
	var first, last int64
	have := false
	undated := 0
	for i, m := range cc.ValuesDB {
		ms, ok := epochMS(at(cc.Started, i))
		if !ok {
			undated++
			continue
		}
		if !have || ms < first {
			first = ms
		}
		if !have || ms > last {
			last = ms
		}
		have = true
		u := -1
		if k, ok := unitIndex[at(cc.Serials, i)]; ok {
			u = k
		}
		p := []any{ms, r3(m), u}
		pts = append(pts, p)
		if beyond[i] {
			out = append(out, p)
		}
	}
	c := charts.NewLine()
	c.SetGlobalOptions(
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "item"}),
		// ECharts' own labels of a time axis (months, with the year at
		// its turn): a full date at every tick overlapped.
		charts.WithXAxisOpts(opts.XAxis{Type: "time", Name: "Run date", NameLocation: "middle", NameGap: 26}),
		// The axis title along the axis, so that no legend row can cover it.
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: "Worst margin (dB)", NameLocation: "middle", NameGap: 44, Scale: opts.Bool(true)}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "0", Type: "scroll"}),
		charts.WithGridOpts(opts.Grid{Left: "64", Right: "24", Top: "40", Bottom: "48"}),
		charts.WithDataZoomOpts(opts.DataZoom{Type: "inside", XAxisIndex: []int{0}}),
	)
	// The series are written here rather than through go-echarts: the
	// units' points are a scatter series in ECharts' large mode (one path
	// for thousands of points instead of a symbol each), and the points
	// beyond the limits a series of their own drawn above it, every one of
	// them marked.
	line := func(name, id, colour, dash string, width, v float64) map[string]any {
		return map[string]any{"type": "line", "name": name, "id": id, "showSymbol": false, "silent": true,
			"data":      [][]any{{first, r3(v)}, {last, r3(v)}},
			"lineStyle": map[string]any{"color": colour, "width": width, "type": dash}, "itemStyle": map[string]any{"color": colour}}
	}
	series := []map[string]any{{"type": "scatter", "name": "worst margin", "id": "points", "data": pts, "symbolSize": 4,
		"large": true, "largeThreshold": 400, "itemStyle": map[string]any{"color": "#1b4f72", "opacity": 0.75}}}
	if have {
		series = append(series, line("centre", "centre", "#17202a", "solid", 1, cc.CentreDB),
			line("control limits", "ucl", "#922b21", "dashed", 1, cc.UpperDB),
			line("control limits", "lcl", "#922b21", "dashed", 1, cc.LowerDB),
			line("limit (margin 0)", "zero", "#000000", "solid", 2, 0))
	}
	if len(out) > 0 {
		series = append(series, map[string]any{"type": "scatter", "name": fmt.Sprintf("beyond the control limits (%d)", len(out)), "id": "beyond",
			"data": out, "symbol": "diamond", "symbolSize": 11, "z": 5, "itemStyle": map[string]any{"color": "#922b21"}})
	}
	opt, err := finish(c, map[string]any{"unit": "dB", "unitRef": true}, map[string]any{"series": series})
	caption := "Individuals chart of the worst margin against the run date. " + controlBasis(l)
	if len(out) > 0 {
		caption += fmt.Sprintf(" The %d points beyond the limits are red diamonds, listed below the chart.", len(out))
	}
	if undated > 0 {
		caption += fmt.Sprintf(" %d points without a readable date are not drawn.", undated)
	}
	caption += " Click a point to open its unit's report."
	return chartSpec{ID: id, Title: "Control chart: " + l.Name, Height: 320, Option: opt, Caption: caption}, err
}

// yieldChart is a product's first-pass and final yield per month, with
// the number of units of each month on a second axis.
func yieldChart(id string, p reduce.ProductFleet) (chartSpec, error) {
	months := make([]string, len(p.Months))
	fpy := make([]opts.LineData, len(p.Months))
	fin := make([]opts.LineData, len(p.Months))
	n := make([]opts.BarData, len(p.Months))
	for i, m := range p.Months {
		months[i] = m.Month
		fpy[i] = opts.LineData{Value: compact{100 * m.FirstPassYield, 1}}
		fin[i] = opts.LineData{Value: compact{100 * m.FinalYield, 1}}
		n[i] = opts.BarData{Value: m.Units}
	}
	bar := charts.NewBar()
	bar.SetGlobalOptions(
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "axis"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "category", Name: "Month of the acceptance run", NameLocation: "middle", NameGap: 28}),
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: "Units", NameLocation: "middle", NameGap: 40, MinInterval: 1}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "0"}),
		charts.WithGridOpts(opts.Grid{Left: "56", Right: "56", Top: "36", Bottom: "48"}),
	)
	bar.ExtendYAxis(opts.YAxis{Type: "value", Name: "Yield (%)", NameLocation: "middle", NameGap: 40, Max: 100, Scale: opts.Bool(true)})
	bar.SetXAxis(months)
	bar.AddSeries("units", n, charts.WithItemStyleOpts(opts.ItemStyle{Color: "#d5d8dc"}))
	line := charts.NewLine()
	line.SetXAxis(months)
	line.AddSeries("first-pass yield", fpy, charts.WithLineChartOpts(opts.LineChart{YAxisIndex: 1, ShowSymbol: opts.Bool(true)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#b9770e", Width: 2}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#b9770e"}))
	line.AddSeries("final yield", fin, charts.WithLineChartOpts(opts.LineChart{YAxisIndex: 1, ShowSymbol: opts.Bool(true)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#1e8449", Width: 2}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#1e8449"}))
	bar.Overlap(line)
	opt, err := finish(bar, map[string]any{"yield": true}, nil)
	return chartSpec{ID: id, Title: "Yield by month: " + p.Product, Height: 280, Option: opt,
		Caption: "First-pass yield: units whose first run passed (a conditional pass included), over the month's units judged; final yield: the same at each unit's acceptance run. Grey bars: units of the month (left axis)."}, err
}

// bandChart is a product's golden band: the median boresight G/T and the
// band median ± 3 scaled MAD.
func bandChart(id string, b *reduce.GoldenBand) (chartSpec, error) {
	n := len(b.FrequencyHz)
	at := func(xs []float64, i int) float64 {
		if i < len(xs) {
			return xs[i]
		}
		return math.NaN()
	}
	lo := make([]opts.LineData, n)
	w := make([]opts.LineData, n)
	med := make([]opts.LineData, n)
	for i, f := range b.FrequencyHz {
		l, h := at(b.LowDB, i), at(b.HighDB, i)
		lo[i] = opts.LineData{Value: []compact{ghz(f), r3(l)}}
		w[i] = opts.LineData{Value: []compact{ghz(f), r3(h - l)}}
		med[i] = opts.LineData{Value: []compact{ghz(f), r3(at(b.MedianDB, i))}}
	}
	c := charts.NewLine()
	commonFreqOpts(c, "G/T (dB/K)", true, opts.Grid{Left: "56", Right: "24", Top: "40", Bottom: "70"})
	c.SetGlobalOptions(charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Orient: "horizontal", Top: "0"}))
	c.AddSeries("band (median ± 3 scaled MAD)", lo, charts.WithSeriesId("band-lo"), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false), Stack: "band"}),
		charts.WithLineStyleOpts(opts.LineStyle{Opacity: opts.Float(0)}))
	c.AddSeries("band (median ± 3 scaled MAD)", w, charts.WithSeriesId("band-w"), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false), Stack: "band"}),
		charts.WithLineStyleOpts(opts.LineStyle{Opacity: opts.Float(0)}),
		charts.WithAreaStyleOpts(opts.AreaStyle{Color: "rgba(27,79,114,0.18)", Opacity: opts.Float(1)}))
	c.AddSeries("median", med, charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#1b4f72", Width: 2}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#1b4f72"}))
	opt, err := finish(c, map[string]any{"unit": "dB/K", "bandName": "half-width of the band"}, nil)
	return chartSpec{ID: id, Title: "Golden band of boresight G/T", Height: 300, Option: opt,
		Caption: fmt.Sprintf("Median boresight G/T of %d units per frequency, with the band median ± 3 × 1.4826 × MAD, every trace and the band's half-width smoothed over %d points; a passing unit that leaves it is on the watch list.", b.Units, b.SmoothingPoints)}, err
}
