package render

import (
	"errors"
	"fmt"
	"math"
	"net/url"
	"sort"
	"strings"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"gtpack.example/gtpack/reduce"
)

// Index renders the fleet overview (index.html): every unit with its
// verdict, worst margin, date and links to units/<serial>/report.html and
// units/<serial>/<serial>.xlsx; verdict counts, yield per limit, a
// histogram of worst margins and the statistics of each product.
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
	return execute("index.tmpl", v)
}

type indexView struct {
	pageAssets
	Version   string
	Units     []unitRow
	Counts    []countRow
	Total     int
	Histogram *chartSpec
	Products  []productView
	Cautions  string
	Notices   []string
	// ShowIssue is set when the fleet knows any unit's issue state: the
	// table then has a Report and a Runs column. Issues counts the units
	// per issue state; Retested those with more than one run.
	ShowIssue bool
	Issues    []issueCount
	Retested  int
}

type issueCount struct {
	State string
	N     int
}

type unitRow struct {
	reduce.FleetUnit
	WorstMarginDB float64
	WorstLimit    string
	HasMargin     bool
	Date          string
	ReportHref    string
	BookHref      string
	Issue         fleetIssue
}

type productView struct {
	reduce.ProductFleet
	Counts []countRow
	Limits []limitStatsRow
	Charts []chartSpec
}

type limitStatsRow struct {
	reduce.LimitStats
	HasStats bool
}

func indexModel(f *reduce.Fleet, issueOf func(*reduce.FleetUnit) fleetIssue) (*indexView, error) {
	v := &indexView{pageAssets: inlineAssets(), Version: Version, Total: len(f.Units), Cautions: cautions, Notices: f.Notices}
	counts := map[string]int{}
	issues := map[string]int{}
	var margins []float64
	for i, u := range f.Units {
		r := unitRow{FleetUnit: u, WorstMarginDB: math.NaN(), Issue: issueOf(&f.Units[i])}
		if r.Issue.known() {
			v.ShowIssue = true
			issues[r.Issue.State]++
			if r.Issue.Retested() {
				v.Retested++
			}
		}
		// Each entry is a limit name's worst beam; the first entry wins a tie.
		for _, l := range u.Limits {
			if finite(l.WorstMarginDB) && (!r.HasMargin || l.WorstMarginDB < r.WorstMarginDB) {
				r.WorstMarginDB, r.WorstLimit, r.HasMargin = l.WorstMarginDB, l.Name+" ("+l.Beam+")", true
			}
		}
		if r.HasMargin {
			margins = append(margins, r.WorstMarginDB)
		}
		r.Date = u.Started
		if i := strings.IndexByte(r.Date, 'T'); i > 0 {
			r.Date = r.Date[:i]
		}
		seg := url.PathEscape(u.Serial)
		r.ReportHref = "units/" + seg + "/report.html"
		r.BookHref = "units/" + seg + "/" + seg + ".xlsx"
		counts[u.Verdict]++
		v.Units = append(v.Units, r)
	}
	// The units arrive sorted by serial; keep that order whatever the input.
	sort.SliceStable(v.Units, func(i, j int) bool { return v.Units[i].Serial < v.Units[j].Serial })
	v.Counts = sortedCounts(counts)
	for _, st := range []string{stateIssued, stateDraft, stateVoid} {
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
		pv := productView{ProductFleet: p, Counts: sortedCounts(p.VerdictCounts)}
		for li, l := range p.Limits {
			pv.Limits = append(pv.Limits, limitStatsRow{LimitStats: l, HasStats: l.Units >= 2})
			if len(l.Chart.ValuesDB) >= 2 {
				c, err := controlChart(fmt.Sprintf("chart-p%d-l%d", pi, li), l)
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
		v.Products = append(v.Products, pv)
	}
	return v, nil
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
// no bin straddles the limit; bins below zero are drawn in the fail colour.
func histogramChart(ms []float64) (chartSpec, error) {
	lo, hi := ms[0], ms[0]
	for _, m := range ms {
		lo, hi = math.Min(lo, m), math.Max(hi, m)
	}
	nb := int(math.Ceil(math.Sqrt(float64(len(ms)))))
	if nb < 5 {
		nb = 5
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
	c.AddSeries("units", data, charts.WithBarChartOpts(opts.BarChart{BarCategoryGap: "8%"}))
	opt, err := finish(c, map[string]any{"unit": "units", "categories": labels}, nil)
	return chartSpec{ID: "chart-hist", Title: "Worst margin of every unit", Height: 300, Option: opt,
		Caption: fmt.Sprintf("Each unit counted once at its worst margin over all limits; bins of %s dB aligned on 0 dB; red bins are below the limit.", fmtFixed(step, 2))}, err
}

// controlChart is the individuals chart of one limit's worst margins in
// test order, with its centre line and control limits.
func controlChart(id string, l reduce.LimitStats) (chartSpec, error) {
	cc := l.Chart
	n := len(cc.ValuesDB)
	xs := make([]string, n)
	for i := range xs {
		xs[i] = fmt.Sprintf("%d", i+1)
	}
	beyond := map[int]bool{}
	for _, b := range cc.Beyond {
		beyond[b] = true
	}
	pts := make([]opts.LineData, n)
	out := make([]opts.LineData, n)
	for i, m := range cc.ValuesDB {
		name := ""
		if i < len(cc.Serials) {
			name = cc.Serials[i]
		}
		pts[i] = opts.LineData{Name: name, Value: r3(m)}
		if beyond[i] {
			out[i] = opts.LineData{Name: name, Value: r3(m)}
		} else {
			out[i] = opts.LineData{Value: compact{math.NaN(), 0}}
		}
	}
	flat := func(v float64) []opts.LineData {
		out := make([]opts.LineData, n)
		for i := range out {
			out[i] = opts.LineData{Value: r3(v)}
		}
		return out
	}
	c := charts.NewLine()
	c.SetGlobalOptions(
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "axis"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "category", Name: "Unit in test order", NameLocation: "middle", NameGap: 26}),
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: "Worst margin (dB)", Scale: opts.Bool(true)}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "0"}),
		charts.WithGridOpts(opts.Grid{Left: "56", Right: "24", Top: "60", Bottom: "48"}),
		charts.WithDataZoomOpts(opts.DataZoom{Type: "inside", XAxisIndex: []int{0}}),
	)
	c.SetXAxis(xs)
	c.AddSeries("margin", pts, charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(true), SymbolSize: 6}))
	c.AddSeries("centre", flat(cc.CentreDB), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#17202a", Width: 1}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#17202a"}))
	c.AddSeries("upper control limit", flat(cc.UpperDB), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#922b21", Width: 1, Type: "dashed"}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#922b21"}))
	c.AddSeries("lower control limit", flat(cc.LowerDB), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#922b21", Width: 1, Type: "dashed"}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#922b21"}))
	c.AddSeries("limit (margin 0)", flat(0), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#000000", Width: 2}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#000000"}))
	if len(cc.Beyond) > 0 {
		c.AddSeries("beyond the control limits", out, charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(true), SymbolSize: 12, Symbol: "diamond"}),
			charts.WithLineStyleOpts(opts.LineStyle{Opacity: opts.Float(0)}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#922b21"}))
	}
	opt, err := finish(c, map[string]any{"unit": "dB", "serials": cc.Serials}, nil)
	return chartSpec{ID: id, Title: "Control chart: " + l.Name, Height: 300, Option: opt,
		Caption: fmt.Sprintf("Individuals chart of the worst margin in test order: centre %s dB, limits %s and %s dB (centre ± 2.66 × mean moving range %s dB); points beyond them in red; the black line is the limit (margin 0).",
			fmtFixed(cc.CentreDB, 3), fmtFixed(cc.LowerDB, 3), fmtFixed(cc.UpperDB, 3), fmtFixed(cc.MeanMovingRange, 3))}, err
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
