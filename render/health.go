package render

import (
	"errors"
	"fmt"
	"math"
	"net/url"
	"time"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"gtpack.example/gtpack/reduce"
)

// Health renders health.html: the checks of the measuring system
// (method.md section 12). Per station and reference antenna, the range
// loss at band centre run by run as an individuals control chart against
// the run date, the pre/post drift of each run against the station's
// tolerance and the runs out of control; the reference antennas with their
// dates and the runs that used one past due.
func Health(f *reduce.Fleet) ([]byte, error) {
	if f == nil {
		return nil, errors.New("render: health page of a nil fleet")
	}
	if _, err := loadPages(); err != nil {
		return nil, err
	}
	v := &healthView{pageAssets: inlineAssets(), Version: Version, Cautions: cautions}
	for i, c := range f.Stations {
		cv, err := rangeChartView(fmt.Sprintf("range-%d", i), c)
		if err != nil {
			return nil, err
		}
		v.Charts = append(v.Charts, cv)
	}
	for i, c := range f.CheckUnits {
		cv, err := checkUnitView(fmt.Sprintf("check-%d", i), c)
		if err != nil {
			return nil, err
		}
		v.CheckUnits = append(v.CheckUnits, cv)
	}
	for _, r := range f.References {
		rv := referenceView{ReferenceHealth: r}
		for _, p := range r.RunsAfterDue {
			rv.Runs = append(rv.Runs, pointRow(p, math.NaN()))
		}
		v.References = append(v.References, rv)
	}
	return execute("health.tmpl", v)
}

type healthView struct {
	pageAssets
	Version    string
	Cautions   string
	Charts     []rangeView
	CheckUnits []checkView
	References []referenceView
}

type checkView struct {
	reduce.CheckUnitChart
	Chart      chartSpec
	Out        []reduce.CheckPoint
	ReportHref string
}

// checkUnitView is a check unit's G/T at band centre against the run
// date, with the limits of its first runs.
func checkUnitView(id string, c reduce.CheckUnitChart) (checkView, error) {
	v := checkView{CheckUnitChart: c, ReportHref: "units/" + url.PathEscape(c.Serial) + "/report.html"}
	var pts []opts.LineData
	for _, p := range c.Points {
		pts = append(pts, timePoint(c.Serial, p.Started, p.GTdBPerK))
	}
	for _, i := range c.OutOfControl {
		v.Out = append(v.Out, c.Points[i])
	}
	ch := individualsChart(opts.YAxis{Type: "value", Name: "G/T (dB/K)", Scale: opts.Bool(true)}, "48", false,
		"G/T", pts, c.Points[0].Started, c.Points[len(c.Points)-1].Started, c.OutOfControl, c.Baseline, c.CentreDB, c.LCLDB, c.UCLDB)
	opt, err := finish(ch, map[string]any{"unit": "dB/K", "dates": true}, nil)
	caption := fmt.Sprintf("G/T of beam %s at %s GHz, run by run (%d runs).", c.Beam, fmtGHz(c.FrequencyHz), len(c.Points))
	if c.Baseline >= 2 {
		caption += fmt.Sprintf(" Centre %s dB/K, limits %s to %s dB/K from the first %d runs.", fmtFixed(c.CentreDB, 3), fmtFixed(c.LCLDB, 3), fmtFixed(c.UCLDB, 3), c.Baseline)
	}
	if c.TooFew {
		caption += fmt.Sprintf(" Fewer than %d runs: no run is called out of control yet.", reduce.MinChartPoints)
	}
	v.Chart = chartSpec{ID: id, Title: fmt.Sprintf("Check unit %s on %s", c.Serial, c.Station), Height: 260, Option: opt, Caption: caption}
	return v, err
}

type rangeView struct {
	reduce.RangeChart
	Runs       int
	Range      chartSpec
	Drift      *chartSpec
	Out        []runRow
	DriftOver  []runRow
	HasLimits  bool
	BaselineTo string // date of the last baseline run
}

type referenceView struct {
	reduce.ReferenceHealth
	Runs []runRow
}

// runRow is a run as the page lists it, linked to its unit's report.
type runRow struct {
	reduce.RangePoint
	Date        string
	ReportHref  string
	DeviationDB float64 // from the centre line; NaN when not shown
}

func pointRow(p reduce.RangePoint, centre float64) runRow {
	r := runRow{RangePoint: p, Date: dateOf(p.Started), ReportHref: "units/" + url.PathEscape(p.Serial) + "/report.html", DeviationDB: math.NaN()}
	if finite(centre) {
		r.DeviationDB = p.RangeLossDB - centre
	}
	return r
}

// dateOf is the date part of an RFC 3339 time.
// dateOf is the date of t in UTC, "" for the zero time.
func dateOf(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format("2006-01-02")
}

func rangeChartView(id string, c reduce.RangeChart) (rangeView, error) {
	v := rangeView{RangeChart: c, Runs: len(c.Points), HasLimits: c.Baseline >= 2}
	if c.Baseline > 0 {
		v.BaselineTo = dateOf(c.Points[c.Baseline-1].Started)
	}
	for _, i := range c.OutOfControl {
		v.Out = append(v.Out, pointRow(c.Points[i], c.CentreDB))
	}
	for _, p := range c.Points {
		if p.DriftDB != nil && c.DriftToleranceDB > 0 && *p.DriftDB > c.DriftToleranceDB {
			v.DriftOver = append(v.DriftOver, pointRow(p, math.NaN()))
		}
	}
	spec, err := rangeLossChart(id, c)
	if err != nil {
		return v, err
	}
	v.Range = spec
	if d, ok, err := driftChart(id+"-drift", c); err != nil {
		return v, err
	} else if ok {
		v.Drift = &d
	}
	return v, nil
}

// timePoint is a [date, value] pair of a chart on a time axis, named
// after its unit.
func timePoint(serial string, started time.Time, v float64) opts.LineData {
	return opts.LineData{Name: serial, Value: []any{timeText(started), r3(v)}}
}

// rangeLossChart is the individuals chart of the range loss against the
// run date: every run, the centre line and the limits of the baseline,
// and the runs beyond them marked.
func rangeLossChart(id string, c reduce.RangeChart) (chartSpec, error) {
	var pts []opts.LineData
	for _, p := range c.Points {
		pts = append(pts, timePoint(p.Serial, p.Started, p.RangeLossDB))
	}
	ch := individualsChart(opts.YAxis{Type: "value", Name: "Range loss (dB)", Scale: opts.Bool(true)}, "64", true,
		"range loss", pts, c.Points[0].Started, c.Points[len(c.Points)-1].Started, c.OutOfControl, c.Baseline, c.CentreDB, c.LCLDB, c.UCLDB)
	opt, err := finish(ch, map[string]any{"unit": "dB", "dates": true}, nil)
	caption := fmt.Sprintf("Range loss at %s GHz, run by run (%d runs). ", fmtGHz(c.FrequencyHz), len(c.Points))
	switch {
	case c.Baseline < 2:
		caption += "One run: no control limits yet."
	default:
		caption += fmt.Sprintf("Centre %s dB and limits %s to %s dB (centre ± 2.66 × mean moving range) from the first %d runs (the baseline); each later run is judged against them.",
			fmtFixed(c.CentreDB, 3), fmtFixed(c.LCLDB, 3), fmtFixed(c.UCLDB, 3), c.Baseline)
		if c.TooFew {
			caption += fmt.Sprintf(" Fewer than %d runs: no run is called out of control yet.", reduce.MinChartPoints)
		} else {
			caption += " Runs beyond the limits are marked in red."
		}
	}
	return chartSpec{ID: id, Title: fmt.Sprintf("Range check: %s with %s", c.Station, c.Reference), Height: 300, Option: opt, Caption: caption}, err
}

// driftChart is the pre/post drift of each run against the station's
// tolerance; ok is false when no run has a post measurement.
func driftChart(id string, c reduce.RangeChart) (chartSpec, bool, error) {
	var pts []opts.LineData
	for _, p := range c.Points {
		if p.DriftDB != nil {
			pts = append(pts, timePoint(p.Serial, p.Started, *p.DriftDB))
		}
	}
	if len(pts) == 0 {
		return chartSpec{}, false, nil
	}
	ch := dateChart(opts.YAxis{Type: "value", Name: "|pre − post| (dB)", Min: 0}, "48", false)
	ch.AddSeries("drift", pts, charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(len(pts) <= symbolPoints), SymbolSize: 5}))
	if c.DriftToleranceDB > 0 {
		first, last := c.Points[0].Started, c.Points[len(c.Points)-1].Started
		ch.AddSeries("station tolerance", flatLine(first, last, c.DriftToleranceDB),
			charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
			charts.WithLineStyleOpts(opts.LineStyle{Color: "#922b21", Width: 1, Type: "dashed"}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#922b21"}))
	}
	opt, err := finish(ch, map[string]any{"unit": "dB", "dates": true}, nil)
	return chartSpec{ID: id, Title: "Pre/post drift: " + c.Station + " with " + c.Reference, Height: 220, Option: opt,
		Caption: fmt.Sprintf("The change of the range loss at %s GHz between the reference measurements before and after each unit; the dashed line is the station's tolerance (%s dB).",
			fmtGHz(c.FrequencyHz), fmtFixed(c.DriftToleranceDB, 3))}, true, err
}

// dateChart is a line chart against the run date, its points given by
// timePoint; y is its value axis, top the grid's top margin (room for the
// legend).
func dateChart(y opts.YAxis, top string, zoom bool) *charts.Line {
	ch := charts.NewLine()
	o := []charts.GlobalOpts{
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "item"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "time", Name: "Run date", NameLocation: "middle", NameGap: 26,
			AxisLabel: &opts.AxisLabel{Formatter: "{yyyy}-{MM}-{dd}"}}),
		charts.WithYAxisOpts(y),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "0"}),
		charts.WithGridOpts(opts.Grid{Left: "64", Right: "24", Top: top, Bottom: "48"}),
	}
	if zoom {
		o = append(o, charts.WithDataZoomOpts(opts.DataZoom{Type: "inside", XAxisIndex: []int{0}}))
	}
	ch.SetGlobalOptions(o...)
	return ch
}

// individualsChart is an individuals control chart against the run date:
// the points (timePoint, in time order, dated first to last), the centre
// line and control limits when the baseline has two points or more, and
// the points at the indexes beyond marked.
func individualsChart(y opts.YAxis, top string, zoom bool, name string, pts []opts.LineData, first, last time.Time, beyond []int, baseline int, centre, lcl, ucl float64) *charts.Line {
	ch := dateChart(y, top, zoom)
	// Up to symbolPoints runs each has its dot; beyond that the runs are
	// one line (a dot each is an element each in the browser, where a
	// year's runs of a station took more memory than the whole page
	// otherwise), and the runs beyond the limits keep their marks.
	ch.AddSeries(name, pts, charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(len(pts) <= symbolPoints), SymbolSize: 5}))
	if baseline >= 2 {
		addControlLines(ch, first, last, centre, lcl, ucl)
	}
	var out []opts.LineData
	for _, i := range beyond {
		out = append(out, pts[i])
	}
	addBeyond(ch, out)
	return ch
}

// symbolPoints is the most runs an individuals or drift chart draws a dot
// for (runs beyond the control limits are marked whatever their number;
// runs past the drift tolerance are listed in the page's table).
const symbolPoints = 500

// flatLine is a horizontal line at v from the date first to last.
func flatLine(first, last time.Time, v float64) []opts.LineData {
	return []opts.LineData{timePoint("", first, v), timePoint("", last, v)}
}

// addControlLines adds an individuals chart's centre line and control
// limits from first to last.
func addControlLines(ch *charts.Line, first, last time.Time, centre, lcl, ucl float64) {
	ch.AddSeries("centre", flatLine(first, last, centre), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
		charts.WithLineStyleOpts(opts.LineStyle{Color: "#17202a", Width: 1}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#17202a"}))
	for _, l := range []struct {
		name string
		v    float64
	}{{"upper control limit", ucl}, {"lower control limit", lcl}} {
		ch.AddSeries(l.name, flatLine(first, last, l.v), charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
			charts.WithLineStyleOpts(opts.LineStyle{Color: "#922b21", Width: 1, Type: "dashed"}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#922b21"}))
	}
}

// addBeyond marks the points beyond the control limits.
func addBeyond(ch *charts.Line, out []opts.LineData) {
	if len(out) > 0 {
		ch.AddSeries("beyond the control limits", out, charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(true), SymbolSize: 12, Symbol: "diamond"}),
			charts.WithLineStyleOpts(opts.LineStyle{Opacity: opts.Float(0)}), charts.WithItemStyleOpts(opts.ItemStyle{Color: "#922b21"}))
	}
}
