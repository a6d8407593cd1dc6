package render

import (
	"bytes"
	"encoding/json"
	"fmt"
	"html/template"
	"math"
	"sort"

	"github.com/go-echarts/go-echarts/v2/charts"
	"github.com/go-echarts/go-echarts/v2/opts"

	"gtpack.example/gtpack/reduce"
)

// Chart options are built with go-echarts and marshalled to JSON; the
// pages' own script (templates/page.js) hands them to the inlined chart
// library. go-echarts' page templates are never used, so nothing ever
// points a <script src> at a network host.
//
// The per-frequency charts carry no data of their own: they name columns
// of the unit's CSV, which the page embeds once (as the download link) and
// the script parses. Each option may hold a private "gtpack" object for the
// script: the CSV flag, the unit shown in tooltips, the focus-beam data.

// palette is the pages' own series colours: dark, distinct on white paper
// and in grey print, cycled for more series.
var palette = []string{
	"#1b4f72", "#b9770e", "#1e8449", "#922b21", "#6c3483", "#117a65", "#7e5109", "#2e4053",
	"#c0392b", "#2874a6", "#7d6608", "#a04000", "#148f77", "#5b2c6f", "#515a5a", "#196f3d",
}

// chartSpec is one chart of a page.
type chartSpec struct {
	ID      string
	Title   string
	Caption string
	Height  int // px on screen
	Option  template.JS
	// Focus lists the beams a focus selector offers (G/T chart only).
	Focus []focusChoice
}

type focusChoice struct {
	Index int
	Label string
}

// optioner is what every go-echarts chart offers.
type optioner interface {
	Validate()
	JSON() map[string]interface{}
}

// finish marshals a go-echarts chart, drops what it fills in that the
// pages do not use (empty title and toolbox, null series data, its default
// palette) and adds the private object for page.js. The result is
// deterministic: encoding/json sorts map keys.
func finish(c optioner, private map[string]any, extra map[string]any) (template.JS, error) {
	c.Validate()
	raw, err := json.Marshal(c.JSON())
	if err != nil {
		return "", err
	}
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber()
	var m map[string]any
	if err := dec.Decode(&m); err != nil {
		return "", err
	}
	delete(m, "title")
	delete(m, "toolbox")
	m["color"] = palette
	m["animation"] = false
	if series, ok := m["series"].([]any); ok {
		for _, s := range series {
			if sm, ok := s.(map[string]any); ok && sm["data"] == nil {
				delete(sm, "data")
			}
		}
	}
	if zs, ok := m["dataZoom"].([]any); ok {
		for _, z := range zs {
			if zm, ok := z.(map[string]any); ok && zm["type"] == "slider" {
				zm["height"], zm["bottom"] = 18, 6
			}
		}
	}
	// The x axis stays at the bottom: a line at y = 0 inside the plot
	// reads as data (a limit, a margin of zero).
	if xs, ok := m["xAxis"].([]any); ok {
		for _, x := range xs {
			if xm, ok := x.(map[string]any); ok {
				xm["axisLine"] = map[string]any{"onZero": false}
			}
		}
	}
	if lg, ok := m["legend"].(map[string]any); ok && lg["orient"] == "vertical" {
		lg["itemGap"], lg["itemHeight"], lg["itemWidth"] = 4, 9, 18
	}
	for k, v := range extra {
		m[k] = v
	}
	if private != nil {
		m["gtpack"] = private
	}
	out, err := json.Marshal(m)
	if err != nil {
		return "", err
	}
	return template.JS(out), nil
}

// freqGrid leaves room on the right for the vertical legend of beams.
var freqGrid = opts.Grid{Left: "64", Right: "170", Top: "36", Bottom: "70"}

func commonFreqOpts(c *charts.Line, yName string, legend bool, grid opts.Grid) {
	c.SetGlobalOptions(
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "axis"}),
		charts.WithDataZoomOpts(
			opts.DataZoom{Type: "inside", XAxisIndex: []int{0}, FilterMode: "none"},
			opts.DataZoom{Type: "slider", XAxisIndex: []int{0}, FilterMode: "none"},
		),
		charts.WithXAxisOpts(opts.XAxis{Type: "value", Name: "Frequency (GHz)", NameLocation: "middle", NameGap: 26, Min: "dataMin", Max: "dataMax"}),
		charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: yName, Scale: opts.Bool(true)}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(legend), Type: "scroll", Orient: "vertical", Right: "0", Top: "middle"}),
		charts.WithGridOpts(grid),
	)
}

// csvCols is the column index of each header name of the unit's CSV.
type csvCols map[string]int

// col is the column of a beam's quantity (by its key in beamQuantities):
// the beam's own, else the shared one.
func (c csvCols) col(beam, key string) (int, bool) {
	if i, ok := c.beam(beam, key); ok {
		return i, ok
	}
	return c.shared(key)
}

// beam is the column of a beam's quantity, shared the column of a shared
// quantity.
func (c csvCols) beam(beam, key string) (int, bool) {
	i, ok := c[beam+"_"+quantityOf(key).csv]
	return i, ok
}

func (c csvCols) shared(key string) (int, bool) {
	i, ok := c[quantityOf(key).csv]
	return i, ok
}

// beamLines adds one line per beam for a quantity of the CSV (by its key);
// it returns the number of series added.
func beamLines(c *charts.Line, u *reduce.Unit, cols csvCols, key string) int {
	n := 0
	for _, b := range u.Beams {
		i, ok := cols.col(b.ID, key)
		if !ok {
			continue
		}
		c.AddSeries(b.ID, nil,
			charts.WithSeriesId("beam-"+b.ID),
			charts.WithEncodeOpts(opts.Encode{X: 0, Y: i}),
			charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
			charts.WithLineStyleOpts(opts.LineStyle{Width: 1.2}),
		)
		n++
	}
	return n
}

// gtChart is G/T against frequency for every beam, with the U band and the
// limit line of one beam in focus (the beam of the worst limit at first;
// the page offers the others).
func gtChart(u *reduce.Unit, cols csvCols, focus int) (chartSpec, error) {
	c := charts.NewLine()
	commonFreqOpts(c, "G/T (dB/K)", true, freqGrid)
	c.AddDataset(opts.Dataset{Source: []any{}})
	beamLines(c, u, cols, "gt_db_per_k")

	type limitLine struct {
		Name string       `json:"name"`
		Data [][2]compact `json:"data"`
		// Point is true when only the worst point's limit is known.
		Point bool `json:"point"`
	}
	type focusBeam struct {
		ID     string      `json:"id"`
		GT     int         `json:"gt"`
		U      int         `json:"u"`
		Limits []limitLine `json:"limits"`
	}
	var beams []focusBeam
	maxLimits := 0
	var choices []focusChoice
	for _, b := range u.Beams {
		gi, ok1 := cols.col(b.ID, "gt_db_per_k")
		ui, ok2 := cols.col(b.ID, "gt_expanded_uncertainty_db")
		if !ok1 || !ok2 {
			continue
		}
		fb := focusBeam{ID: b.ID, GT: gi, U: ui}
		for _, l := range u.Limits {
			if l.Beam != b.ID || l.Quantity != reduce.QuantityGT {
				continue
			}
			ll := limitLine{Name: "limit: " + l.Name}
			if len(l.LimitCurve) > 0 {
				for _, v := range l.LimitCurve {
					ll.Data = append(ll.Data, [2]compact{ghz(v.FrequencyHz), r3(v.ValueDB)})
				}
			} else {
				ll.Point = true
				ll.Name += " (at the worst point)"
				ll.Data = [][2]compact{{ghz(l.AtFrequencyHz), r3(l.LimitDB)}}
			}
			fb.Limits = append(fb.Limits, ll)
		}
		if len(fb.Limits) > maxLimits {
			maxLimits = len(fb.Limits)
		}
		choices = append(choices, focusChoice{Index: len(beams), Label: b.ID})
		beams = append(beams, fb)
	}
	if len(beams) > 0 {
		// The band of the beam in focus: a transparent lower edge and the
		// stacked width 2U. Without a beam that has G/T there is no band:
		// a series without data would draw the page's dataset columns.
		c.AddSeries("U band (k = 2)", nil, charts.WithSeriesId("band-lo"),
			charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false), Stack: "uband"}),
			charts.WithLineStyleOpts(opts.LineStyle{Opacity: opts.Float(0)}))
		c.AddSeries("U band (k = 2)", nil, charts.WithSeriesId("band-w"),
			charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false), Stack: "uband"}),
			charts.WithLineStyleOpts(opts.LineStyle{Opacity: opts.Float(0)}),
			charts.WithItemStyleOpts(opts.ItemStyle{Color: "rgba(27,79,114,0.45)"}),
			charts.WithAreaStyleOpts(opts.AreaStyle{Color: "rgba(27,79,114,0.28)", Opacity: opts.Float(1)}))
	}
	for i := 0; i < maxLimits; i++ {
		c.AddSeries(fmt.Sprintf("limit %d", i+1), nil, charts.WithSeriesId(fmt.Sprintf("limit-%d", i)),
			charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false)}),
			charts.WithLineStyleOpts(opts.LineStyle{Color: "#000000", Width: 2, Type: "dashed"}),
			charts.WithItemStyleOpts(opts.ItemStyle{Color: "#000000"}))
	}
	fi := 0
	for i, fb := range beams {
		if focus >= 0 && focus < len(u.Beams) && fb.ID == u.Beams[focus].ID {
			fi = i
		}
	}
	opt, err := finish(c, map[string]any{"csv": true, "unit": "dB/K", "focus": beams, "focusDefault": fi, "limitSeries": maxLimits}, nil)
	return chartSpec{ID: "chart-gt", Title: "G/T against frequency", Height: 420, Option: opt, Focus: choices,
		Caption: "Every beam; the beam in focus is drawn heavier with its expanded uncertainty U (k = 2) as a band and its limit as a dashed black line. " +
			"Scroll or drag the slider to zoom."}, err
}

// quantityChart is one CSV quantity (by its key) against frequency for
// every beam.
func quantityChart(u *reduce.Unit, cols csvCols, id, title, key, yName, unit, caption string) (chartSpec, bool, error) {
	c := charts.NewLine()
	commonFreqOpts(c, yName, true, freqGrid)
	c.AddDataset(opts.Dataset{Source: []any{}})
	if beamLines(c, u, cols, key) == 0 {
		return chartSpec{}, false, nil
	}
	opt, err := finish(c, map[string]any{"csv": true, "unit": unit}, nil)
	return chartSpec{ID: id, Title: title, Height: 340, Option: opt, Caption: caption}, true, err
}

// rangeChart is the range loss (one line when every beam shares it) and,
// on a second axis, the pre/post drift.
func rangeChart(u *reduce.Unit, cols csvCols) (chartSpec, bool, error) {
	c := charts.NewLine()
	commonFreqOpts(c, "Range loss (dB)", true, opts.Grid{Left: "64", Right: "64", Top: "48", Bottom: "70"})
	c.ExtendYAxis(opts.YAxis{Type: "value", Name: "Drift |pre − post| (dB)", Scale: opts.Bool(true), Position: "right"})
	c.SetGlobalOptions(charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Type: "scroll", Orient: "horizontal", Top: "0"}))
	c.AddDataset(opts.Dataset{Source: []any{}})
	n := 0
	add := func(name string, col, axis int, dashed bool) {
		ls := opts.LineStyle{Width: 1.2}
		if dashed {
			ls.Type = "dashed"
		}
		c.AddSeries(name, nil, charts.WithEncodeOpts(opts.Encode{X: 0, Y: col}),
			charts.WithLineChartOpts(opts.LineChart{ShowSymbol: opts.Bool(false), YAxisIndex: axis}),
			charts.WithLineStyleOpts(ls))
		n++
	}
	if i, ok := cols.shared("range_loss_db"); ok {
		add("range loss", i, 0, false)
		if j, ok := cols.shared("range_drift_db"); ok {
			add("drift", j, 1, true)
		}
	} else {
		for _, b := range u.Beams {
			if i, ok := cols.beam(b.ID, "range_loss_db"); ok {
				add(b.ID+" range loss", i, 0, false)
			}
			if j, ok := cols.beam(b.ID, "range_drift_db"); ok {
				add(b.ID+" drift", j, 1, true)
			}
		}
	}
	if n == 0 {
		return chartSpec{}, false, nil
	}
	opt, err := finish(c, map[string]any{"csv": true, "unit": "dB"}, nil)
	return chartSpec{ID: "chart-range", Title: "Range loss and drift", Height: 320, Option: opt,
		Caption: "Range loss from the reference antenna (left axis) and, when the range was measured before and after the unit, the drift between the two (right axis, dashed)."}, true, err
}

// centreIndex is the index of the grid point nearest the middle of the grid.
func centreIndex(f []float64) int {
	if len(f) == 0 {
		return -1
	}
	mid := (f[0] + f[len(f)-1]) / 2
	best := 0
	for i, v := range f {
		if math.Abs(v-mid) < math.Abs(f[best]-mid) {
			best = i
		}
	}
	return best
}

// scanChart is G/T against scan angle at the band centre: the change from
// boresight from u.Scan when present, with the spec's scan law beside it;
// else the G/T of every beam at its grid centre.
func scanChart(u *reduce.Unit) (chartSpec, bool, error) {
	c := charts.NewScatter()
	tip := opts.Tooltip{Show: opts.Bool(true), Trigger: "item"}
	c.SetGlobalOptions(
		charts.WithTooltipOpts(tip),
		charts.WithXAxisOpts(opts.XAxis{Type: "value", Name: "Scan angle θ (deg)", NameLocation: "middle", NameGap: 26, Min: 0}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(true), Top: "0"}),
		charts.WithGridOpts(opts.Grid{Left: "64", Right: "24", Top: "48", Bottom: "48"}),
	)
	var caption, unit string
	if s := u.Scan; s != nil && len(s.Beams) > 0 && len(s.FrequencyHz) > 0 {
		k := centreIndex(s.FrequencyHz)
		c.SetGlobalOptions(charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: "G/T change from boresight (dB)", Scale: opts.Bool(true)}))
		meas := []opts.ScatterData{{Name: "boresight", Value: []any{r3(0), r3(0)}}}
		var law []opts.ScatterData
		for _, b := range s.Beams {
			if k < len(b.ScanLossDB) {
				meas = append(meas, opts.ScatterData{Name: b.ID, Value: []any{r3(b.ThetaDeg), r3(b.ScanLossDB[k])}})
			}
			if b.LawLossDB != nil {
				law = append(law, opts.ScatterData{Name: b.ID + " (law)", Value: []any{r3(b.ThetaDeg), r3(*b.LawLossDB)}})
			}
		}
		c.AddSeries("measured", meas, charts.WithScatterChartOpts(opts.ScatterChart{SymbolSize: 9}))
		if len(law) > 0 {
			c.AddSeries("spec scan law", law, charts.WithScatterChartOpts(opts.ScatterChart{Symbol: "diamond", SymbolSize: 9}))
		}
		nk := math.NaN()
		if k < len(s.ExponentN) {
			nk = s.ExponentN[k]
		}
		caption = fmt.Sprintf("At %s GHz (the centre of the scan grid). Fitted scan exponent n = %s there, %s over the band.",
			fmtGHz(s.FrequencyHz[k]), fmtFixed(nk, 2), fmtFixed(s.MeanExponentN, 2))
		unit = "dB"
	} else {
		c.SetGlobalOptions(charts.WithYAxisOpts(opts.YAxis{Type: "value", Name: "G/T (dB/K)", Scale: opts.Bool(true)}))
		var pts []opts.ScatterData
		var at []float64
		for _, b := range u.Beams {
			k := centreIndex(b.FrequencyHz)
			if k < 0 || k >= len(b.GTdBPerK) {
				continue
			}
			pts = append(pts, opts.ScatterData{Name: b.ID, Value: []any{r3(b.ThetaDeg), r3(b.GTdBPerK[k])}})
			at = append(at, b.FrequencyHz[k])
		}
		if len(pts) < 2 {
			return chartSpec{}, false, nil
		}
		c.AddSeries("G/T", pts, charts.WithScatterChartOpts(opts.ScatterChart{SymbolSize: 9}))
		sort.Float64s(at)
		caption = fmt.Sprintf("G/T of each beam at the centre of its grid (%s to %s GHz). The unit has no scan analysis.", fmtGHz(at[0]), fmtGHz(at[len(at)-1]))
		unit = "dB/K"
	}
	opt, err := finish(c, map[string]any{"unit": unit, "xunit": "deg"}, nil)
	return chartSpec{ID: "chart-scan", Title: "G/T against scan angle at the band centre", Height: 320, Option: opt, Caption: caption}, true, err
}

// elementChart is the heat map of residual element phase; absent elements
// are left blank.
func elementChart(e *reduce.ElementState) (chartSpec, error) {
	c := charts.NewHeatMap()
	// Axis labels are the row and column numbers of elements.csv: cell
	// [0][0] of the map is element (FirstRow, FirstCol).
	rows := make([]string, e.Rows)
	for i := range rows {
		rows[i] = fmt.Sprint(e.FirstRow + i)
	}
	colsLbl := make([]string, e.Cols)
	for i := range colsLbl {
		colsLbl[i] = fmt.Sprint(e.FirstCol + i)
	}
	maxAbs := 1.0
	var data []opts.HeatMapData
	for r := 0; r < e.Rows && r < len(e.ResidualPhaseDeg); r++ {
		for col := 0; col < e.Cols && col < len(e.ResidualPhaseDeg[r]); col++ {
			present := r < len(e.Present) && col < len(e.Present[r]) && e.Present[r][col]
			if !present {
				continue
			}
			v := e.ResidualPhaseDeg[r][col]
			if finite(v) && math.Abs(v) > maxAbs {
				maxAbs = math.Abs(v)
			}
			data = append(data, opts.HeatMapData{Value: [3]any{col, r, compact{v, 1}}})
		}
	}
	lim := float32(math.Ceil(maxAbs))
	c.SetGlobalOptions(
		charts.WithTooltipOpts(opts.Tooltip{Show: opts.Bool(true), Trigger: "item"}),
		charts.WithXAxisOpts(opts.XAxis{Type: "category", Name: "column", Data: colsLbl, NameLocation: "middle", NameGap: 26}),
		charts.WithYAxisOpts(opts.YAxis{Type: "category", Name: "row", Data: rows, Inverse: opts.Bool(true)}),
		charts.WithGridOpts(opts.Grid{Left: "56", Right: "110", Top: "24", Bottom: "48"}),
		charts.WithLegendOpts(opts.Legend{Show: opts.Bool(false)}),
	)
	c.SetXAxis(colsLbl)
	c.AddSeries("residual phase", data)
	extra := map[string]any{"visualMap": []any{map[string]any{
		"type": "continuous", "min": -lim, "max": lim, "calculable": true, "orient": "vertical", "right": 8, "top": "middle",
		"text":    []string{"+" + fmt.Sprint(lim) + "°", "−" + fmt.Sprint(lim) + "°"},
		"inRange": map[string]any{"color": []string{"#1b4f72", "#f4f6f6", "#922b21"}},
	}}}
	opt, err := finish(c, map[string]any{"unit": "deg", "heat": true, "firstRow": e.FirstRow, "firstCol": e.FirstCol}, extra)
	h := 60 + 22*e.Rows
	if h < 260 {
		h = 260
	}
	if h > 640 {
		h = 640
	}
	return chartSpec{ID: "chart-elements", Title: "Residual element phase", Height: h, Option: opt,
		Caption: "Phase of each element after removing the best-fit plane (the steering gradient), in degrees. Blank cells: element absent from the table."}, err
}
