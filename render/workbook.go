package render

import (
	"archive/zip"
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"slices"
	"sort"
	"strings"
	"sync"
	"time"

	"github.com/klauspost/compress/flate"
	"github.com/xuri/excelize/v2"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// Workbooks: the unit workbook (units/<serial>/<serial>.xlsx) and the fleet
// workbook (fleet.xlsx). The unit workbook stores its numbers as
// result.json holds them (resultValue: to 1e-6, 15 significant digits from
// 1e9 up; frequencies the GHz of result.json's hertz, resultGHz), so that a
// cell equals the value of result.json; the fleet workbook stores each
// float64 as excelize writes it (its shortest text). Values are shown with
// a number format; a non-finite value is an empty cell. The files are deterministic: fixed
// document properties, fixed zip entry times, sheets and styles created in
// a fixed order. excelize builds the workbook; the large tables (the beam
// sheets' frequency tables, the Uncertainty rows) are written into their
// sheets when it is saved, much faster than excelize's cells
// (xlsxrows.go).

// workbookEpoch is the fixed time written into document properties and zip
// entries when no better time is known.
var workbookEpoch = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// Number formats of the workbooks.
const (
	nfDB   = "0.000"
	nfGHz  = "0.000000"
	nfDeg  = "0.0"
	nfTemp = "0.0"
	nfDiv  = "0.0000"
	nfPct  = "0.0%"
	nfCpk  = "0.00"
	nfInt  = "0"
	// nfDate and nfMonth show date cells (UTC, as the runs record them).
	nfDate  = "yyyy-mm-dd hh:mm"
	nfMonth = "yyyy-mm"
)

// Verdict fill colours of our own (light tints, dark text).
var verdictColours = []struct {
	verdict    reduce.Verdict
	fill, font string
}{
	{reduce.VerdictPass, "CCEBD4", "1D5C2E"},
	{reduce.VerdictConditionalPass, "F6EDB0", "5C4D0A"},
	{reduce.VerdictConditionalFail, "F7D9A8", "6B3C05"},
	{reduce.VerdictFail, "F3C4C4", "7A1414"},
	{reduce.VerdictIncomplete, "DEDEDE", "3A3A3A"},
}

// xlBook wraps an excelize file and keeps the first error, so that the
// builders read as a list of cells.
type xlBook struct {
	f          *excelize.File
	err        error
	numStyles  map[string]int
	header     int
	title      int
	verdictDXF []int
	used       map[string]bool // lower-case sheet names taken
	sheets     int
	// bulk holds the tables written into their sheets at save time, by
	// sheet name (see xlsxrows.go).
	bulk map[string]*bulkSheet
	// used is the last column and row set in each sheet through set, for
	// the sheet's dimension (setDimensions).
	extent map[string][2]int
}

// sortedZip is the zip writer given to excelize: it holds the entries
// until Close and then writes them sorted by name, all with the same
// modification time, each sheet of book.bulk with its table added.
// excelize writes some parts in map order, and archive/zip would otherwise
// leave the time to the caller.
type sortedZip struct {
	zipParts
	w        *zip.Writer
	modified time.Time
	book     *xlBook
}

type zipEntry struct {
	name string
	data bytes.Buffer
}

// zipParts keeps the parts excelize creates, in memory, in the order
// created.
type zipParts struct{ entries []*zipEntry }

func (z *zipParts) Create(name string) (io.Writer, error) {
	e := &zipEntry{name: name}
	z.entries = append(z.entries, e)
	return &e.data, nil
}

func (z *zipParts) AddFS(fs.FS) error {
	return errors.New("render: adding a file system to a workbook is not supported")
}

// sorted sorts the parts by name, refuses a name written twice and makes
// the x values of XY charts numbers (numericXValues).
func (z *zipParts) sorted() error {
	sort.SliceStable(z.entries, func(i, j int) bool { return z.entries[i].name < z.entries[j].name })
	for i, e := range z.entries {
		if i > 0 && e.name == z.entries[i-1].name {
			return fmt.Errorf("render: workbook part %s written twice", e.name)
		}
		if fixed := numericXValues(e.name, e.data.Bytes()); fixed != nil {
			e.data.Reset()
			if _, err := e.data.Write(fixed); err != nil {
				return err
			}
		}
	}
	return nil
}

// deflaters holds compressors between workbooks: a new one costs more to
// set up (some 1 MB of tables) than most parts cost to compress. Its New
// returns the error of flate.NewWriter, if any (none for a valid level).
var deflaters = sync.Pool{New: func() any {
	w, err := flate.NewWriter(io.Discard, flate.BestSpeed)
	if err != nil {
		return err
	}
	return w
}}

// useDeflater gives zw a pooled compressor for its deflated parts and
// returns the function that gives it back, once zw is closed.
func useDeflater(zw *zip.Writer) (release func(), err error) {
	v := deflaters.Get()
	d, ok := v.(*flate.Writer)
	if !ok {
		return nil, fmt.Errorf("render: no compressor for the workbook: %v", v)
	}
	zw.RegisterCompressor(zip.Deflate, func(out io.Writer) (io.WriteCloser, error) {
		d.Reset(out)
		return reusedDeflater{d}, nil
	})
	return func() { deflaters.Put(d) }, nil
}

// reusedDeflater is one compressor reset for each part in turn: zip.Writer
// closes a part's compressor before it starts the next.
type reusedDeflater struct{ *flate.Writer }

func (z *sortedZip) Close() error {
	// Compression is most of the time of a unit workbook even at the
	// fastest level; klauspost/compress's fastest level is both faster and
	// smaller than compress/flate's BestSpeed (DEVELOPERS.md, Measured).
	release, err := useDeflater(z.w)
	if err != nil {
		return err
	}
	defer release()
	if err := z.sorted(); err != nil {
		return err
	}
	parts, err := bulkParts(z.book.bulk, z.entries)
	if err != nil {
		return err
	}
	for _, e := range z.entries {
		method := zip.Deflate
		if e.data.Len() < 512 && parts[e.name] == nil {
			method = zip.Store // relationship parts and the like: not worth a compressor's start
		}
		w, err := z.w.CreateHeader(&zip.FileHeader{Name: e.name, Method: method, Modified: z.modified})
		if err != nil {
			return err
		}
		if t := parts[e.name]; t != nil {
			err = writeBulkSheet(w, e.data.Bytes(), t)
		} else {
			_, err = w.Write(e.data.Bytes())
		}
		if err != nil {
			return err
		}
	}
	z.entries = nil
	return z.w.Close()
}

// numericXValues returns a chart part with the x values of its XY series
// made numbers, or nil when the part is not a chart with such series:
// excelize refers to them as text (strRef), which a spreadsheet may plot as
// 1, 2, 3 instead of the frequencies.
func numericXValues(name string, part []byte) []byte {
	if !strings.HasPrefix(name, "xl/charts/chart") || !bytes.Contains(part, []byte("<xVal><strRef>")) {
		return nil
	}
	part = bytes.ReplaceAll(part, []byte("<xVal><strRef>"), []byte("<xVal><numRef>"))
	return bytes.ReplaceAll(part, []byte("</strRef></xVal>"), []byte("</numRef></xVal>"))
}

// newXLBook starts a workbook with the fleet workbook's description.
func newXLBook(title, subject string, created time.Time) *xlBook {
	return newXLBookStamped(title, subject, created.UTC().Format(time.RFC3339), created, "values to 15 significant digits, shown rounded.")
}

// newXLBookStamped starts a workbook whose document properties are dated
// stamp and whose zip entries are dated modified.
func newXLBookStamped(title, subject, stamp string, modified time.Time, precision string) *xlBook {
	b := &xlBook{f: excelize.NewFile(), numStyles: map[string]int{}, used: map[string]bool{}}
	b.f.SetZipWriter(func(w io.Writer) excelize.ZipWriter {
		if buf, ok := w.(*bytes.Buffer); ok {
			buf.Grow(128<<10 + bulkSize(b.bulk)) // the workbook, written once
		}
		return &sortedZip{w: zip.NewWriter(w), modified: modified, book: b}
	})
	b.check(b.f.SetDocProps(&excelize.DocProperties{
		Title: title, Subject: subject, Creator: "gtpack", LastModifiedBy: "gtpack",
		Created: stamp, Modified: stamp, Version: Version, Language: "en",
		Description: "Written by gtpack " + Version + " from reduced results; " + precision,
	}))
	b.check(b.f.SetAppProps(&excelize.AppProperties{Application: "gtpack", Company: ""}))
	var err error
	b.header, err = b.f.NewStyle(&excelize.Style{
		Font:      &excelize.Font{Bold: true},
		Fill:      excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{"E4E9F0"}},
		Border:    []excelize.Border{{Type: "bottom", Color: "7F8C9D", Style: 1}},
		Alignment: &excelize.Alignment{WrapText: true, Vertical: "top"},
	})
	b.check(err)
	b.title, err = b.f.NewStyle(&excelize.Style{Font: &excelize.Font{Bold: true, Size: 13}})
	b.check(err)
	for _, vc := range verdictColours {
		id, err := b.f.NewConditionalStyle(&excelize.Style{
			Font: &excelize.Font{Color: vc.font, Bold: true},
			Fill: excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{vc.fill}},
		})
		b.check(err)
		b.verdictDXF = append(b.verdictDXF, id)
	}
	return b
}

func (b *xlBook) check(err error) {
	if err != nil && b.err == nil {
		b.err = err
	}
}

// bytes writes the workbook.
func (b *xlBook) bytes() ([]byte, error) {
	if b.err != nil {
		return nil, b.err
	}
	// excelize adds the image content types from a map: sort them, or the
	// order of [Content_Types].xml changes from one run to the next.
	if ct := b.f.ContentTypes; ct != nil {
		sort.SliceStable(ct.Defaults, func(i, j int) bool { return ct.Defaults[i].Extension < ct.Defaults[j].Extension })
	}
	buf, err := b.f.WriteToBuffer()
	if err != nil {
		return nil, err
	}
	if err := b.f.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// addSheet creates a sheet with a valid, unique name derived from want and
// returns the name used.
func (b *xlBook) addSheet(want string) string {
	name := uniqueSheetName(want, b.used)
	if b.sheets == 0 {
		b.check(b.f.SetSheetName("Sheet1", name))
	} else {
		_, err := b.f.NewSheet(name)
		b.check(err)
	}
	b.sheets++
	return name
}

// sheetNameReplacer removes the characters a sheet name may not hold; the
// apostrophe goes too, so that names quote simply in formulas.
var sheetNameReplacer = strings.NewReplacer("[", "(", "]", ")", ":", "-", "*", "_", "?", "_", "/", "_", "\\", "_", "'", "_")

// uniqueSheetName makes want a valid sheet name (at most 31 characters,
// none of []:*?/\, not empty, not the reserved "History") that is not in
// used (compared without case, as spreadsheet programs do), and records it.
func uniqueSheetName(want string, used map[string]bool) string {
	base := sheetNameReplacer.Replace(want)
	base = strings.Map(func(r rune) rune {
		if r < 0x20 || r == 0x7f {
			return '_'
		}
		return r
	}, base)
	base = strings.TrimSpace(base)
	if base == "" {
		base = "Sheet"
	}
	if strings.EqualFold(base, "History") {
		base += " (data)"
	}
	name := truncateRunes(base, 31)
	for i := 2; used[strings.ToLower(name)]; i++ {
		suffix := fmt.Sprintf(" (%d)", i)
		name = truncateRunes(base, 31-len(suffix)) + suffix
	}
	used[strings.ToLower(name)] = true
	return name
}

func truncateRunes(s string, n int) string {
	r := []rune(s)
	if len(r) > n {
		r = r[:n]
	}
	return string(r)
}

// ref is an absolute range reference to column col (1-based) rows r0..r1
// of sheet, for chart series. A column or row outside the sheet is the
// book's error (and the reference is not valid).
func (b *xlBook) ref(sheet string, col, r0, r1 int) string {
	c := b.colName(col)
	for _, r := range []int{r0, r1} {
		if r < 1 || r > ingest.MaxSheetRows {
			b.check(fmt.Errorf("render: sheet %q: row %d is outside the sheet's rows 1 to %d", sheet, r, ingest.MaxSheetRows))
		}
	}
	return fmt.Sprintf("'%s'!$%s$%d:$%s$%d", sheet, c, r0, c, r1)
}

// cellName is the name of the cell at col and row (1-based), e.g. B7; a
// cell outside a sheet is the book's error.
func (b *xlBook) cellName(col, row int) string {
	s, err := excelize.CoordinatesToCellName(col, row)
	b.check(err)
	return s
}

// colName is the name of column col (1-based), e.g. AB; a column outside
// a sheet is the book's error.
func (b *xlBook) colName(col int) string {
	s, err := excelize.ColumnNumberToName(col)
	b.check(err)
	return s
}

// numStyle returns the style of a number format, made once.
func (b *xlBook) numStyle(format string) int {
	if id, ok := b.numStyles[format]; ok {
		return id
	}
	if b.f == nil { // a unit's cells: the styles are the skeleton's
		b.check(fmt.Errorf("render: number format %q has no style in the workbook skeleton", format))
		return 0
	}
	f := format
	id, err := b.f.NewStyle(&excelize.Style{CustomNumFmt: &f})
	b.check(err)
	b.numStyles[format] = id
	return id
}

// set writes one cell: a float64 that is not finite stays empty, as does nil;
// a text longer than a cell holds is cut with a note (cellText), where
// excelize would cut it without one.
func (b *xlBook) set(sheet string, col, row int, v any) {
	switch x := v.(type) {
	case nil:
		return
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return
		}
	case string:
		v = cellText(x)
	case xlDate:
		if !x.ok {
			v = cellText(x.text)
		} else {
			v = x.serial
		}
	}
	if b.extent == nil {
		b.extent = map[string][2]int{}
	}
	e := b.extent[sheet]
	b.extent[sheet] = [2]int{max(e[0], col), max(e[1], row)}
	b.check(b.f.SetCellValue(sheet, b.cellName(col, row), v))
}

// setDimensions states the used range of every sheet written through set
// in its dimension element: excelize leaves it "A1", and a reader that
// trusts it (openpyxl in read-only mode) then reads one row. Sheets with
// bulk rows get theirs when the rows are written.
func (b *xlBook) setDimensions() {
	for sheet, e := range b.extent {
		if t := b.bulk[sheet]; t != nil {
			t.width, t.lastRow = max(t.width, e[0]), max(t.lastRow, e[1])
			continue
		}
		b.check(b.f.SetSheetDimension(sheet, "A1:"+b.cellName(max(e[0], 1), max(e[1], 1))))
	}
}

// setRow writes values from column 1 of row.
func (b *xlBook) setRow(sheet string, row int, values ...any) {
	for i, v := range values {
		b.set(sheet, i+1, row, v)
	}
}

// setMonth writes a month (monthCell) as a date cell with a date format;
// a text that is not a month is written as text.
func (b *xlBook) setMonth(sheet string, col, row int, s, format string) {
	d := monthCell(s)
	if !d.ok {
		b.set(sheet, col, row, d.text)
		return
	}
	b.setNum(sheet, col, row, d.serial, format)
}

// setNum writes a number with a format.
func (b *xlBook) setNum(sheet string, col, row int, v float64, format string) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return
	}
	b.set(sheet, col, row, v)
	c := b.cellName(col, row)
	b.check(b.f.SetCellStyle(sheet, c, c, b.numStyle(format)))
}

// xlColumn is one column of a table: its header, number format (empty for
// text) and width.
type xlColumn struct {
	header string
	format string
	width  float64
}

// table starts a table at row: header cells, column formats and widths,
// and frozen rows above the data when freeze is true. Data rows follow from
// row+1. Column formats are set before the data so that every value
// written later takes them.
func (b *xlBook) table(sheet string, row int, cols []xlColumn, freeze bool) {
	for i, c := range cols {
		name := b.colName(i + 1)
		if c.format != "" && freeze {
			b.check(b.f.SetColStyle(sheet, name, b.numStyle(c.format)))
		}
		if c.width > 0 {
			b.check(b.f.SetColWidth(sheet, name, name, c.width))
		}
		b.set(sheet, i+1, row, c.header)
	}
	if len(cols) > 0 {
		b.check(b.f.SetCellStyle(sheet, b.cellName(1, row), b.cellName(len(cols), row), b.header))
	}
	if freeze {
		b.check(b.f.SetPanes(sheet, &excelize.Panes{
			Freeze: true, YSplit: row, TopLeftCell: b.cellName(1, row+1), ActivePane: "bottomLeft",
			Selection: []excelize.Selection{{SQRef: b.cellName(1, row+1), ActiveCell: b.cellName(1, row+1), Pane: "bottomLeft"}},
		}))
	}
}

// verdictRules colours the verdict cells in rangeRef by conditional
// formatting, one rule per verdict.
func (b *xlBook) verdictRules(sheet, rangeRef string) {
	var opts []excelize.ConditionalFormatOptions
	for i, vc := range verdictColours {
		dxf := b.verdictDXF[i]
		opts = append(opts, excelize.ConditionalFormatOptions{
			Type: "cell", Criteria: "==", Value: `"` + string(vc.verdict) + `"`, Format: &dxf,
		})
	}
	b.check(b.f.SetConditionalFormat(sheet, rangeRef, opts))
}

// chartSeries is one series of a chart: name is a reference to the cell
// holding its name (a chart series name is a formula), values a range.
type chartSeries struct {
	name, values string
	dash         bool
}

// chartX is the horizontal axis of a chart: categories (points of them,
// their labels in format, "0.00" when empty), or, when numeric, values
// (frequencies) on an axis from min to max.
type chartX struct {
	points   int
	format   string
	numeric  bool
	min, max float64
}

// lineChart adds a native chart of series, drawn as lines without
// markers, over the categories range at cell. On a numeric axis it is an
// XY chart, so that the axis is labelled at round values whatever the
// number of points; on a category axis about eight labels are shown. The
// labels stand below the plot, not where the value axis crosses zero.
func (b *xlBook) lineChart(sheet, cell, title, xTitle, yTitle, categories string, x chartX, series []chartSeries) {
	if len(series) == 0 {
		return
	}
	c := &excelize.Chart{
		Type:         excelize.Line,
		Title:        excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: title}}},
		Dimension:    excelize.ChartDimension{Width: 760, Height: 400},
		Legend:       excelize.ChartLegend{Position: "bottom"},
		ShowBlanksAs: "gap",
		XAxis: excelize.ChartAxis{
			Title:             excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: xTitle}}},
			NumFmt:            excelize.ChartNumFmt{CustomNumFmt: "0.00"},
			TickLabelPosition: excelize.ChartTickLabelLow,
			TickLabelSkip:     max(1, x.points/8),
		},
		YAxis: excelize.ChartAxis{
			Title:          excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: yTitle}}},
			MajorGridLines: true,
			NumFmt:         excelize.ChartNumFmt{CustomNumFmt: "0.0"},
			// The frequency labels below the plot on an XY chart too.
			TickLabelPosition: excelize.ChartTickLabelLow,
		},
	}
	if x.format != "" {
		c.XAxis.NumFmt.CustomNumFmt = x.format
	}
	if x.numeric {
		c.Type = excelize.Scatter
		c.XAxis.TickLabelSkip = 0
		c.XAxis.NumFmt.CustomNumFmt = "0.0"
		c.XAxis.MajorGridLines = true
		if x.max > x.min {
			c.XAxis.Minimum, c.XAxis.Maximum = &x.min, &x.max
		}
	}
	for _, s := range series {
		cs := excelize.ChartSeries{
			Name: s.name, Categories: categories, Values: s.values,
			Marker: excelize.ChartMarker{Symbol: "none"},
			Line:   excelize.LineOptions{Width: 1.5},
		}
		if s.dash {
			cs.Line.Dash = excelize.LineDashDash
		}
		if x.numeric {
			cs.Line.Type = excelize.LineSolid // an XY series has no line unless asked
		}
		c.Series = append(c.Series, cs)
	}
	b.check(b.f.AddChart(sheet, cell, c))
}

// xySeries is one series of an XY chart: x and y ranges of its own;
// markers draws its points without a line (the individuals), else a line
// without markers.
type xySeries struct {
	name, x, y    string
	dash, markers bool
}

// dateChart adds a native XY chart of series against dates (date cells
// on a numeric axis labelled as dates).
func (b *xlBook) dateChart(sheet, cell, title, xTitle, yTitle string, series []xySeries) {
	c := &excelize.Chart{
		Type:      excelize.Scatter,
		Title:     excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: title}}},
		Dimension: excelize.ChartDimension{Width: 760, Height: 400},
		Legend:    excelize.ChartLegend{Position: "bottom"},
		XAxis: excelize.ChartAxis{
			Title:             excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: xTitle}}},
			NumFmt:            excelize.ChartNumFmt{CustomNumFmt: "yyyy-mm-dd"},
			TickLabelPosition: excelize.ChartTickLabelLow,
			MajorGridLines:    true,
		},
		YAxis: excelize.ChartAxis{
			Title:             excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: yTitle}}},
			MajorGridLines:    true,
			NumFmt:            excelize.ChartNumFmt{CustomNumFmt: "0.0"},
			TickLabelPosition: excelize.ChartTickLabelLow,
		},
	}
	for _, s := range series {
		cs := excelize.ChartSeries{Name: s.name, Categories: s.x, Values: s.y, Line: excelize.LineOptions{Width: 1.5, Type: excelize.LineSolid},
			Marker: excelize.ChartMarker{Symbol: "none"}}
		if s.markers {
			cs.Line = excelize.LineOptions{Type: excelize.LineNone}
			cs.Marker = excelize.ChartMarker{Symbol: "circle", Size: 3}
		}
		if s.dash {
			cs.Line.Dash = excelize.LineDashDash
		}
		c.Series = append(c.Series, cs)
	}
	b.check(b.f.AddChart(sheet, cell, c))
}

// at returns xs[k], or NaN when k is outside xs.
func valueAt(xs []float64, k int) float64 {
	if k < 0 || k >= len(xs) {
		return math.NaN()
	}
	return xs[k]
}

func toGHz(hz float64) float64 { return hz / 1e9 }

// startedTime is the run's start, or the epoch when it is not known or
// outside what a zip file can date (1980 on): it dates the workbook, so
// that the file does not depend on when it was written.
func startedTime(t time.Time) time.Time {
	if t.IsZero() || t.Year() < 1980 || t.Year() > 9999 {
		return workbookEpoch
	}
	return t.UTC().Truncate(time.Second)
}

// UnitWorkbook returns the unit workbook: Summary, one sheet per beam with
// a G/T chart, Limits, Uncertainty, Flags and Inputs. Its skeleton is made
// once per shape (unitbook.go); the unit's cells are written into it.
func UnitWorkbook(u *reduce.Unit) ([]byte, error) {
	if u == nil {
		return nil, fmt.Errorf("render: UnitWorkbook of a nil unit")
	}
	shape := unitShape{limits: len(u.Limits), beams: make([]beamShape, len(u.Beams))}
	cols := make([][]beamColumn, len(u.Beams))
	for i := range u.Beams {
		bm := &u.Beams[i]
		cols[i] = beamColumns(bm)
		bs := beamShape{id: bm.ID, theta: bm.ThetaDeg, phi: bm.PhiDeg, n: len(bm.FrequencyHz),
			lo: bandEdge(bm.FrequencyHz, false), hi: bandEdge(bm.FrequencyHz, true),
			firstGrid: slices.Equal(bm.FrequencyHz, u.Beams[0].FrequencyHz), cols: make([]sheetColumn, len(cols[i]))}
		for j, c := range cols[i] {
			bs.cols[j] = c.sheetColumn
		}
		shape.beams[i] = bs
	}
	sk, err := skeletonFor(&shape)
	if err != nil {
		return nil, err
	}
	b := sk.cells()
	for i := range u.Beams {
		beamTable(b, sk.beams[i], cols[i], len(u.Beams[i].FrequencyHz))
	}
	summaryTable(b, sk.summary, u, sk.beams)
	limitsTable(b, sk.limits, u.Limits)
	uncertaintyTable(b, sk.uncertainty, u)
	flagsTable(b, sk.flags, u)
	inputsTable(b, sk.inputs, u)
	if b.err != nil {
		return nil, b.err
	}
	return sk.write(b.bulk, "G/T acceptance workbook, unit "+u.Serial, "Unit "+u.Serial+", product "+u.Product, startedTime(u.Started))
}

// summaryFields are the key/value rows of the Summary sheet, from row 2.
func summaryFields(u *reduce.Unit) [][2]any {
	ref := u.Reference
	refText := ref.ID
	if ref.Description != "" {
		refText += " - " + ref.Description
	}
	due := dateOf(ref.Due)
	if ref.Expired {
		due += " (expired before the run)"
	}
	station := u.Station.ID
	if u.Station.Description != "" {
		station += " - " + u.Station.Description
	}
	is := issueShown(u)
	var sigs []string
	if is.Issued {
		for _, sg := range u.Issue.Signatures {
			who := sg.By
			if sg.Role != "" {
				who += ", " + sg.Role
			}
			sigs = append(sigs, who+", "+timeText(sg.Date))
		}
	}
	signatures := strings.Join(sigs, "; ")
	notIssued := ""
	if !is.Issued {
		notIssued = is.Why
		if is.Void != "" {
			notIssued = "approval void: " + is.Void + "; " + is.Why
		}
	}
	var lab, customer, order string
	if u.Lab != nil {
		lab = u.Lab.Name
	}
	if u.Customer != nil {
		customer, order = u.Customer.Name, u.Customer.Order
	}
	first := u.Verdict
	if len(u.History) > 0 {
		first = u.History[0].Verdict
	}
	var revision any // none before a first revision is known
	if is.Revision > 0 {
		revision = is.Revision
	}
	return [][2]any{
		{"Unit", u.Serial},
		{"Product", u.Product},
		{"Specification", u.SpecTitle},
		{"Run", u.Run},
		{"Started", timeText(u.Started)},
		{"Verdict", string(u.Verdict)},
		{"Decision rule", u.DecisionRule},
		{"Station", station},
		{"Reference", refText},
		{"Reference certificate", ref.Certificate},
		{"Reference calibrated", dateOf(ref.Calibrated)},
		{"Reference due", due},
		{"Operator", u.Operator},
		{"Ambient (°C)", u.AmbientC},
		{"Firmware", u.Firmware},
		{"Tool version", "gtpack " + Version},
		// The issue state, as the report's first page shows it; after the
		// rows above, which keep their places.
		{"Issue state", string(is.State)},
		{"Revision", revision},
		{"Report number", is.ReportNumber},
		{"Date of issue", is.IssueDate},
		{"Signatures", signatures},
		{"Replaces", is.Replaces},
		{"Not issued because", notIssued},
		{"Laboratory", lab},
		{"Customer", customer},
		{"Order", order},
		{"Runs", len(u.History) + 1},
		{"First run verdict", string(first)},
	}
}

// summaryLayout gives the rows of the Summary sheet that do not depend on
// a unit's values: its title in row 1, the key/value rows (the verdict's
// is verdictRow), a blank row, the Limits title and header (limitsHeader),
// a row per limit, a blank row, the Beams title and header (beamsHeader),
// a row per beam.
func summaryLayout(limits int) (verdictRow, limitsHeader, beamsHeader int) {
	fields := summaryFields(&reduce.Unit{})
	for i, kv := range fields {
		if kv[0] == "Verdict" {
			verdictRow = 2 + i
		}
	}
	limitsHeader = 2 + len(fields) + 2
	return verdictRow, limitsHeader, limitsHeader + limits + 3
}

var (
	summaryLimitColumns = []string{"Limit", "Beam", "Worst margin (dB)", "At (GHz)", "U (dB)", "Verdict"}
	summaryBeamColumns  = []string{"Beam", "Sheet", "Theta (deg)", "Phi (deg)", "Polarization", "G/T form", "Points"}
)

// summaryFrame is the skeleton of the Summary sheet: column widths, the
// verdict colours and the chart of the G/T of every beam on the first
// beam's grid (a beam on another grid is shown on its own sheet only).
func summaryFrame(b *xlBook, sheet string, s *unitShape, beamSheets, gtValues []string) {
	b.check(b.f.SetColWidth(sheet, "A", "A", 26))
	b.check(b.f.SetColWidth(sheet, "B", "B", 34))
	b.check(b.f.SetColWidth(sheet, "C", "F", 14))
	verdictRow, limitsHeader, beamsHeader := summaryLayout(s.limits)
	b.verdictRules(sheet, b.cellName(2, verdictRow))
	if s.limits > 0 {
		verdict := b.colName(1 + slices.Index(summaryLimitColumns, "Verdict"))
		b.verdictRules(sheet, fmt.Sprintf("%s%d:%s%d", verdict, limitsHeader+1, verdict, limitsHeader+s.limits))
	}
	var series []chartSeries
	for i, bm := range s.beams {
		if gtValues[i] != "" && bm.firstGrid {
			row := beamsHeader + 1 + i
			series = append(series, chartSeries{name: b.ref(sheet, 1, row, row), values: gtValues[i]})
		}
	}
	if len(series) > 0 {
		b.lineChart(sheet, "H2", "G/T of the beams", "Frequency (GHz)", "G/T (dB/K)",
			b.ref(beamSheets[0], 1, 2, s.beams[0].n+1), s.beams[0].axis(), series)
	}
}

// summaryTable is the unit's cells of the Summary sheet.
func summaryTable(b *xlBook, sheet string, u *reduce.Unit, beamSheets []string) {
	t := &bulkSheet{first: 1, width: len(summaryBeamColumns)}
	t.rows = append(t.rows, []bulkCell{textCell("G/T acceptance workbook", b.title)})
	for _, kv := range summaryFields(u) {
		row := []bulkCell{textCell(kv[0].(string), b.header), {}}
		switch x := kv[1].(type) {
		case float64:
			row[1] = numCell(x, b.numStyle(nfTemp))
		case int:
			row[1] = numCell(float64(x), b.numStyle(nfInt))
		case string:
			row[1] = textCell(x, 0)
		case nil:
		default:
			panic(fmt.Sprintf("render: summary field %s: a %T is not a cell value", kv[0], kv[1]))
		}
		t.rows = append(t.rows, row)
	}
	headerRow := func(title string, names []string) {
		t.rows = append(t.rows, nil, []bulkCell{textCell(title, b.title)})
		row := make([]bulkCell, len(names))
		for i, n := range names {
			row[i] = textCell(n, b.header)
		}
		t.rows = append(t.rows, row)
	}
	headerRow("Limits", summaryLimitColumns)
	dB, ghz := b.numStyle(nfDB), b.numStyle(nfGHz)
	for _, l := range u.Limits {
		t.rows = append(t.rows, []bulkCell{textCell(l.Name, 0), textCell(l.Beam, 0), numCell(l.WorstMarginDB, dB),
			freqCell(l.AtFrequencyHz, ghz), numCell(l.ExpandedUncertaintyDB, dB), textCell(string(l.Verdict), 0)})
	}
	headerRow("Beams", summaryBeamColumns)
	deg := b.numStyle(nfDeg)
	for i, bm := range u.Beams {
		t.rows = append(t.rows, []bulkCell{textCell(bm.ID, 0), textCell(beamSheets[i], 0), numCell(bm.ThetaDeg, deg),
			numCell(bm.PhiDeg, deg), textCell(bm.Polarization, 0), textCell(string(bm.GTForm), 0), numCell(float64(len(bm.FrequencyHz)), 0)})
	}
	b.addBulk(sheet, t)
}

// beamColumn is a column of a beam sheet: values from index start of the
// grid; frequencies in Hz, shown in GHz, when hz is set.
type beamColumn struct {
	sheetColumn
	values []float64
	start  int
	hz     bool
}

// sheetColumn is what a beam sheet's skeleton knows of a column: its
// header, format and width, and the key of its quantity in beamQuantities
// ("" for the frequency and the margins); a limit column has the key of
// the quantity it limits.
type sheetColumn struct {
	xlColumn
	key   string
	limit bool
}

// beamColumns lists the columns of a beam sheet: the frequency, then the
// beam's quantities on the sheet in the order of beamQuantity.sheet. The
// limit and margin columns exist only where reduce gave the limit on the
// beam's grid (Beam.LimitCurves): render evaluates no limit itself; the
// margin is the quantity minus the limit, the definition of method.md
// section 7.
func beamColumns(bm *reduce.Beam) []beamColumn {
	cols := []beamColumn{{sheetColumn{xlColumn: xlColumn{"Frequency (GHz)", nfGHz, 14}}, bm.FrequencyHz, 0, true}}
	var onSheet []*beamQuantity
	for i := range beamQuantities {
		if q := &beamQuantities[i]; q.sheet > 0 && (q.onSheet == nil || q.onSheet(bm)) {
			onSheet = append(onSheet, q)
		}
	}
	sort.SliceStable(onSheet, func(i, j int) bool { return onSheet[i].sheet < onSheet[j].sheet })
	pairs := limitColumns(bm)
	for _, q := range onSheet {
		if q.sheet > sheetLimits {
			cols, pairs = append(cols, pairs...), nil
		}
		cols = append(cols, beamColumn{sheetColumn: sheetColumn{xlColumn{q.header(bm), q.format, q.width}, q.key, false}, values: q.get(bm)})
	}
	return append(cols, pairs...)
}

// limitColumns are a beam sheet's limit and margin columns, a pair for
// each of the beam's limit curves.
func limitColumns(bm *reduce.Beam) []beamColumn {
	var cols []beamColumn
	for _, c := range bm.LimitCurves {
		q := limitQuantity(c.Quantity)
		x := q.get(bm)
		// The margin of the values as the sheet holds them, so that it is
		// the difference of the two cells to the last digit.
		margin := make([]float64, len(c.LimitDB))
		for i, l := range c.LimitDB {
			margin[i] = resultValue(valueAt(x, c.Start+i)) - resultValue(l)
		}
		cols = append(cols,
			beamColumn{sheetColumn: sheetColumn{xlColumn{fmt.Sprintf("Limit %s (%s)", c.Name, q.unit), nfDB, 14}, q.key, true}, values: c.LimitDB, start: c.Start},
			beamColumn{sheetColumn: sheetColumn{xlColumn: xlColumn{fmt.Sprintf("Margin %s (dB)", c.Name), nfDB, 14}}, values: margin, start: c.Start})
	}
	return cols
}

// beamSheetFrame is the skeleton of a beam sheet: the frozen header row
// and the G/T chart (with the beam's G/T limits). It returns the range of
// the beam's G/T values for the Summary chart ("" when the beam has no
// frequencies).
func beamSheetFrame(b *xlBook, sheet string, bm *beamShape) string {
	gt := ""
	col := 1 + slices.IndexFunc(bm.cols, func(c sheetColumn) bool { return c.key == "gt_db_per_k" && !c.limit })
	if n := bm.n; n > 0 && col > 0 {
		// Series names are formulas: they point at the header cells.
		categories := b.ref(sheet, 1, 2, n+1)
		series := []chartSeries{{name: b.ref(sheet, col, 1, 1), values: b.ref(sheet, col, 2, n+1)}}
		for ci, c := range bm.cols {
			if c.key == "gt_db_per_k" && c.limit {
				series = append(series, chartSeries{name: b.ref(sheet, ci+1, 1, 1), values: b.ref(sheet, ci+1, 2, n+1), dash: true})
			}
		}
		title := fmt.Sprintf("G/T, beam %s (theta %g deg, phi %g deg)", bm.id, bm.theta, bm.phi)
		b.lineChart(sheet, b.cellName(len(bm.cols)+2, 2), title, "Frequency (GHz)", "G/T (dB/K)", categories, bm.axis(), series)
		gt = series[0].values
	}
	b.check(b.f.SetPanes(sheet, &excelize.Panes{
		Freeze: true, YSplit: 1, TopLeftCell: "A2", ActivePane: "bottomLeft",
		Selection: []excelize.Selection{{SQRef: "A2", ActiveCell: "A2", Pane: "bottomLeft"}},
	}))
	return gt
}

// beamTable is a beam sheet's cells: the column widths, the header row and
// the frequency table of n points.
func beamTable(b *xlBook, sheet string, cols []beamColumn, n int) {
	t := &bulkSheet{first: 1, n: n, width: len(cols), rows: [][]bulkCell{make([]bulkCell, len(cols))},
		cols: make([]bulkColumn, len(cols))}
	t.widths = make([]float64, len(cols))
	for i, c := range cols {
		t.widths[i] = c.width
		t.rows[0][i] = textCell(c.header, b.header)
		t.cols[i] = bulkColumn{values: c.values, start: c.start, style: b.numStyle(c.format), hz: c.hz}
	}
	b.addBulk(sheet, t)
}

// limitsTable is the unit's rows of the Limits sheet.
func limitsTable(b *xlBook, sheet string, limits []reduce.LimitResult) {
	styles := b.columnStyles(limitsColumns)
	t := &bulkSheet{first: 2, width: len(limitsColumns)}
	for _, l := range limits {
		t.rows = append(t.rows, bulkRow(styles, l.Name, string(l.Quantity), l.Beam, l.Statistic, l.WorstMarginDB, frequencyHz(l.AtFrequencyHz),
			l.ValueDB, l.LimitDB, l.ExpandedUncertaintyDB, string(l.Verdict)))
	}
	b.addBulk(sheet, t)
}

// budgetPoint chooses the frequency index at which a beam's budget is
// shown: the worst-margin frequency of the beam's limits on that quantity,
// else of any of its limits, else the middle of the grid.
func budgetPoint(bm *reduce.Beam, limits []reduce.LimitResult, quantity reduce.Quantity) (int, string) {
	n := len(bm.FrequencyHz)
	if n == 0 {
		return -1, ""
	}
	best := -1
	for pass := 0; pass < 2 && best < 0; pass++ {
		for i, l := range limits {
			if l.Beam != bm.ID || (pass == 0 && l.Quantity != quantity) || math.IsNaN(l.WorstMarginDB) || math.IsNaN(l.AtFrequencyHz) {
				continue
			}
			if best < 0 || l.WorstMarginDB < limits[best].WorstMarginDB {
				best = i
			}
		}
	}
	if best < 0 {
		return n / 2, "middle of the band (no limit on this beam)"
	}
	return nearestIndex(bm.FrequencyHz, limits[best].AtFrequencyHz), "worst margin of " + limits[best].Name
}

// nearestIndex is the index of the grid point nearest f (grid ascending).
func nearestIndex(grid []float64, f float64) int {
	k := sort.SearchFloat64s(grid, f)
	if k >= len(grid) {
		return len(grid) - 1
	}
	if k > 0 && f-grid[k-1] <= grid[k]-f {
		return k - 1
	}
	return k
}

// uncertaintyTable is the unit's rows of the Uncertainty sheet: every
// budget term of every beam at the frequency budgetPoint chooses, each
// number with its column's format.
func uncertaintyTable(b *xlBook, sheet string, u *reduce.Unit) {
	styles := b.columnStyles(uncertaintyColumns)
	t := &bulkSheet{first: 2, width: len(uncertaintyColumns)}
	for i := range u.Beams {
		bm := &u.Beams[i]
		for _, part := range []struct {
			name     string
			quantity reduce.Quantity
			bud      *reduce.Budget
		}{{"G/T", reduce.QuantityGT, &bm.GTBudget}, {"Gain", reduce.QuantityGain, &bm.GainBudget}} {
			k, basis := budgetPoint(bm, u.Limits, part.quantity)
			if k < 0 {
				continue
			}
			f := frequencyHz(bm.FrequencyHz[k])
			for _, tm := range part.bud.Terms {
				t.rows = append(t.rows, bulkRow(styles, bm.ID, part.name, f, basis, tm.Name, string(tm.Source), tm.Distribution, tm.Divisor,
					valueAt(tm.ValueDB, k), valueAt(tm.StandardDB, k)))
			}
			t.rows = append(t.rows, bulkRow(styles, bm.ID, part.name, f, basis, "Combined standard uncertainty u_c", nil, nil, nil,
				nil, valueAt(part.bud.CombinedDB, k)))
			t.rows = append(t.rows, bulkRow(styles, bm.ID, part.name, f, basis,
				fmt.Sprintf("Expanded uncertainty U (k = %g)", part.bud.CoverageK), nil, nil, nil,
				valueAt(part.bud.ExpandedDB, k), nil))
		}
	}
	b.addBulk(sheet, t)
}

// columnStyles are the styles of a table's columns: the number format's,
// or 0 (none) for a text column.
func (b *xlBook) columnStyles(cols []xlColumn) []int {
	styles := make([]int, len(cols))
	for i, c := range cols {
		if c.format != "" {
			styles[i] = b.numStyle(c.format)
		}
	}
	return styles
}

// xlDate is a time for bulkRow: a date cell (the spreadsheet's serial
// day number, days since 1899-12-30 in UTC) when the text parses as RFC
// 3339, else the text as it is.
type xlDate struct {
	serial float64
	ok     bool
	text   string
}

// monthCell reads a month, YYYY-MM (reduce.MonthYield), for a date cell.
func monthCell(s string) xlDate {
	if t, err := time.Parse("2006-01", s); err == nil {
		return xlDate{serial: excelSerial(t), ok: true, text: s}
	}
	return xlDate{text: s}
}

// timeCell is a time as a date cell (to the second, as its text), empty
// for the zero time.
func timeCell(t time.Time) xlDate {
	if t.IsZero() {
		return xlDate{}
	}
	return xlDate{serial: excelSerial(t.Truncate(time.Second)), ok: true, text: timeText(t)}
}

// excelSerial is t as a spreadsheet's serial day number (the 1900 date
// system: 25569 is 1970-01-01), in UTC.
func excelSerial(t time.Time) float64 {
	return float64(t.UTC().UnixMilli())/86400e3 + 25569
}

// frequencyHz is a frequency in Hz for bulkRow, written in GHz.
type frequencyHz float64

// bulkRow makes a row of cells from values as set writes them: nil, an
// empty text and a non-finite number are empty cells; numbers (float64,
// int, frequencyHz) take the column's style.
func bulkRow(styles []int, values ...any) []bulkCell {
	row := make([]bulkCell, len(values))
	for i, v := range values {
		style := 0
		if i < len(styles) {
			style = styles[i]
		}
		switch x := v.(type) {
		case float64:
			row[i] = numCell(x, style)
		case int:
			row[i] = numCell(float64(x), style)
		case frequencyHz:
			row[i] = freqCell(float64(x), style)
		case xlDate:
			if x.ok {
				row[i] = bulkCell{kind: 'd', num: x.serial, style: style}
			} else {
				row[i] = textCell(x.text, 0)
			}
		case string:
			row[i] = textCell(x, style)
		case nil:
		default:
			// A value of another type (a verdict, a time) would be
			// left out unseen: the caller converts it.
			panic(fmt.Sprintf("render: bulkRow: a %T is not a cell value", v))
		}
	}
	return row
}

// flagsTable is the unit's rows of the Flags sheet: its flags, then the
// problems of its inputs.
func flagsTable(b *xlBook, sheet string, u *reduce.Unit) {
	styles := b.columnStyles(flagsColumns)
	t := &bulkSheet{first: 2, width: len(flagsColumns)}
	for _, f := range u.Flags {
		t.rows = append(t.rows, bulkRow(styles, string(f.Kind), f.Beam, nil, nil, f.Message))
	}
	for _, p := range u.Problems {
		var line any
		if p.Line > 0 {
			line = p.Line
		}
		t.rows = append(t.rows, bulkRow(styles, "problem", nil, p.File, line, p.Message))
	}
	b.addBulk(sheet, t)
}

// inputsTable is the unit's rows of the Inputs sheet.
func inputsTable(b *xlBook, sheet string, u *reduce.Unit) {
	styles := b.columnStyles(inputsColumns)
	t := &bulkSheet{first: 2, width: len(inputsColumns)}
	for _, in := range u.Inputs {
		t.rows = append(t.rows, bulkRow(styles, in.Path, float64(in.Size), in.SHA256))
	}
	b.addBulk(sheet, t)
}
