package render

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"path"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"unicode/utf16"
	"unicode/utf8"

	"github.com/xuri/excelize/v2"

	"gtpack.example/gtpack/ingest"
)

// The frequency tables of the beam sheets are most of a unit workbook (16
// beams x 801 points x some 15 columns: 190,000 cells). excelize spends
// about 2 us on a cell, through its stream writer as well, so the large
// tables are written here instead: excelize makes the sheet (panes, chart,
// conditional formats, a header row where it wrote one), and when the
// package is saved the rows are added at the end of that sheet's XML,
// straight into the compressor. Numbers are written as result.json writes
// them (appendJSONFloat: to 1e-6, 15 significant digits from 1e9 up), so
// that a cell holds the value of result.json; frequencies, which
// result.json holds in Hz, are its text with the decimal point moved to
// GHz (appendResultGHz). Text is written as inline strings.
//
// A cell that follows the previous one of its row leaves out its r
// attribute (optional in ECMA-376 Part 1, 18.3.1.4: a reader places such a
// cell in the next column); a cell after a gap states it. openpyxl and
// LibreOffice read such sheets cell for cell as they read fully referenced
// ones.

// bulkSheet is what is written into a sheet at save time: rows of cells
// from row first on, then one row per index of the numeric columns.
type bulkSheet struct {
	first int
	rows  [][]bulkCell
	cols  []bulkColumn
	n     int // rows of cols
	width int // columns, for the dimension
	// widths are the column widths from column A (0: the default), for
	// a sheet that excelize gave no widths.
	widths []float64
	// lastRow is the last row of cells excelize wrote beside the bulk
	// rows (a small table at the side), for the dimension.
	lastRow int
}

// bulkCell is one cell of a bulk row: empty, a number, a frequency or a
// text.
type bulkCell struct {
	kind  byte // 0: empty, 'n': number, 'f': a frequency in Hz, shown in GHz, 'd': a date (serial day number), 's': text
	num   float64
	text  string
	style int
}

// bulkColumn is one numeric column: values[k-start] is on row k of the
// column rows, an index outside values or a non-finite value is an empty
// cell. The values of an hz column are frequencies in Hz, written in GHz.
type bulkColumn struct {
	values []float64
	start  int
	style  int
	hz     bool
}

// numCell is a number cell, empty when v is not finite.
func numCell(v float64, style int) bulkCell {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return bulkCell{}
	}
	return bulkCell{kind: 'n', num: v, style: style}
}

// freqCell is a frequency cell: hz is written in GHz, empty when not
// finite.
func freqCell(hz float64, style int) bulkCell {
	if math.IsNaN(hz) || math.IsInf(hz, 0) {
		return bulkCell{}
	}
	return bulkCell{kind: 'f', num: hz, style: style}
}

// textCell is a text cell, empty when s is.
func textCell(s string, style int) bulkCell {
	if s == "" {
		return bulkCell{}
	}
	return bulkCell{kind: 's', text: s, style: style}
}

// bulkSize is a guess, on the high side, at the compressed size of the
// bulk tables: 7 bytes a cell, where 16 beam sheets of 801 points of
// result.json's values took 5.9 (of 15-digit values, 7.6).
func bulkSize(tables map[string]*bulkSheet) int {
	cells := 0
	for _, t := range tables {
		cells += t.n*len(t.cols) + len(t.rows)*t.width
	}
	return 7 * cells
}

// addBulk registers what is written into sheet at save time.
func (b *xlBook) addBulk(sheet string, t *bulkSheet) {
	if b.bulk == nil {
		b.bulk = map[string]*bulkSheet{}
	}
	b.bulk[sheet] = t
}

// bulkParts maps the zip part of each bulk sheet to its table.
func bulkParts(bulk map[string]*bulkSheet, entries []*zipEntry) (map[string]*bulkSheet, error) {
	if len(bulk) == 0 {
		return nil, nil
	}
	sheets, err := sheetParts(entries)
	if err != nil {
		return nil, err
	}
	parts := map[string]*bulkSheet{}
	for name, t := range bulk {
		if p, ok := sheets[name]; ok {
			parts[p] = t
		}
	}
	if len(parts) != len(bulk) {
		return nil, fmt.Errorf("render: %d of %d tables have no sheet part", len(bulk)-len(parts), len(bulk))
	}
	return parts, nil
}

// sheetParts maps each sheet name to its zip part, reading them from
// xl/workbook.xml and its relationships.
func sheetParts(entries []*zipEntry) (map[string]string, error) {
	var workbook, rels []byte
	for _, e := range entries {
		switch e.name {
		case "xl/workbook.xml":
			workbook = e.data.Bytes()
		case "xl/_rels/workbook.xml.rels":
			rels = e.data.Bytes()
		}
	}
	var wb struct {
		Sheets []struct {
			Name string `xml:"name,attr"`
			ID   string `xml:"http://schemas.openxmlformats.org/officeDocument/2006/relationships id,attr"`
		} `xml:"sheets>sheet"`
	}
	if err := xml.Unmarshal(workbook, &wb); err != nil {
		return nil, fmt.Errorf("render: reading the workbook part: %v", err)
	}
	var rs struct {
		Rel []struct {
			ID     string `xml:"Id,attr"`
			Target string `xml:"Target,attr"`
		} `xml:"Relationship"`
	}
	if err := xml.Unmarshal(rels, &rs); err != nil {
		return nil, fmt.Errorf("render: reading the workbook relationships: %v", err)
	}
	target := map[string]string{}
	for _, r := range rs.Rel {
		if strings.HasPrefix(r.Target, "/") {
			target[r.ID] = strings.TrimPrefix(r.Target, "/")
		} else {
			target[r.ID] = path.Join("xl", r.Target)
		}
	}
	sheets := map[string]string{}
	for _, s := range wb.Sheets {
		if p, ok := target[s.ID]; ok {
			sheets[s.Name] = p
		}
	}
	return sheets, nil
}

// checkBounds returns an error when t would not fit a sheet: a row past
// the row limit (ingest.MaxSheetRows) or a column past the column limit
// (excelize.MaxColumns, 16,384: column XFD). Such a sheet is not written:
// its dimension could not be stated, and a spreadsheet application would
// refuse or cut the file.
func (t *bulkSheet) checkBounds() error {
	last := t.first + len(t.rows) + t.n - 1
	if len(t.rows)+t.n > 0 && (t.first < 1 || last > ingest.MaxSheetRows) {
		return fmt.Errorf("render: a table of %d rows from row %d would end at row %d, past the %d rows of a sheet", len(t.rows)+t.n, t.first, last, ingest.MaxSheetRows)
	}
	width := max(t.width, len(t.cols))
	for _, r := range t.rows {
		width = max(width, len(r))
	}
	if width > excelize.MaxColumns {
		return fmt.Errorf("render: a table of %d columns is wider than the %d columns of a sheet", width, excelize.MaxColumns)
	}
	return nil
}

// writeBulkSheet writes the sheet XML that excelize made, with the rows of
// t added at the end of its sheetData and the dimension set to cover them.
// A table that does not fit a sheet is an error, before anything is
// written.
func writeBulkSheet(w io.Writer, sheetXML []byte, t *bulkSheet) error {
	if err := t.checkBounds(); err != nil {
		return err
	}
	head, tail, ok := bytes.Cut(sheetXML, []byte("</sheetData>"))
	if ok {
		tail = sheetXML[len(head):]
	} else if head, tail, ok = bytes.Cut(sheetXML, []byte("<sheetData/>")); ok {
		head = append(head[:len(head):len(head)], "<sheetData>"...)
		tail = append([]byte("</sheetData>"), tail...)
	} else {
		return fmt.Errorf("render: sheet part without sheetData")
	}
	if d := bytes.Index(head, []byte(`<dimension ref="`)); d >= 0 {
		d += len(`<dimension ref="`)
		if q := bytes.IndexByte(head[d:], '"'); q >= 0 {
			last, err := excelize.CoordinatesToCellName(max(t.width, 1), max(t.first+len(t.rows)+t.n-1, t.lastRow, 1))
			if err != nil {
				return err
			}
			if _, err := w.Write(head[:d]); err != nil {
				return err
			}
			if _, err := io.WriteString(w, "A1:"+last); err != nil {
				return err
			}
			head = head[d+q:]
		}
	}
	if cols := colsXML(t.widths); cols != "" {
		at := bytes.Index(head, []byte("<sheetData"))
		if at < 0 || bytes.Contains(head, []byte("<cols>")) {
			return fmt.Errorf("render: cannot place the column widths in the sheet part")
		}
		if _, err := w.Write(head[:at]); err != nil {
			return err
		}
		if _, err := io.WriteString(w, cols); err != nil {
			return err
		}
		head = head[at:]
	}
	if _, err := w.Write(head); err != nil {
		return err
	}
	if err := writeBulkRows(w, t); err != nil {
		return err
	}
	_, err := w.Write(tail)
	return err
}

// colsXML is the cols element of the widths, one col for each run of
// equal widths; "" when every width is the default.
func colsXML(widths []float64) string {
	var b []byte
	for i := 0; i < len(widths); {
		j := i + 1
		for j < len(widths) && widths[j] == widths[i] {
			j++
		}
		if widths[i] > 0 {
			b = append(b, `<col min="`...)
			b = strconv.AppendInt(b, int64(i+1), 10)
			b = append(b, `" max="`...)
			b = strconv.AppendInt(b, int64(j), 10)
			b = append(b, `" width="`...)
			b = strconv.AppendFloat(b, widths[i], 'f', -1, 64)
			b = append(b, `" customWidth="1"/>`...)
		}
		i = j
	}
	if len(b) == 0 {
		return ""
	}
	return "<cols>" + string(b) + "</cols>"
}

// cellWriter appends the cells of one row, stating a cell's reference
// only after a gap.
type cellWriter struct {
	names []string // column names, from A
	row   int
	next  int   // index of the column that follows without a reference
	err   error // a column without a name (checkBounds prevents it)
}

func (c *cellWriter) open(buf []byte, col, style int, text bool) []byte {
	buf = append(buf, `<c`...)
	if col != c.next {
		for len(c.names) <= col {
			name, err := excelize.ColumnNumberToName(len(c.names) + 1)
			if err != nil {
				if c.err == nil {
					c.err = err
				}
				name = "A"
			}
			c.names = append(c.names, name)
		}
		buf = append(buf, ` r="`...)
		buf = append(buf, c.names[col]...)
		buf = strconv.AppendInt(buf, int64(c.row), 10)
		buf = append(buf, '"')
	}
	c.next = col + 1
	if style != 0 {
		buf = append(buf, ` s="`...)
		buf = strconv.AppendInt(buf, int64(style), 10)
		buf = append(buf, '"')
	}
	if text {
		return append(buf, ` t="inlineStr"><is><t`...)
	}
	return append(buf, `><v>`...)
}

// rowBuffers holds the buffers rows are written into before the
// compressor takes them.
var rowBuffers = sync.Pool{New: func() any { b := make([]byte, 0, 72<<10); return &b }}

// writeBulkRows writes the rows of t in pieces of some 64 kB.
func writeBulkRows(w io.Writer, t *bulkSheet) error {
	pooled := rowBuffers.Get().(*[]byte)
	defer rowBuffers.Put(pooled)
	buf := (*pooled)[:0]
	defer func() { *pooled = buf[:0] }()
	cw := &cellWriter{}
	startRow := func(row int) {
		buf = append(buf, `<row r="`...)
		buf = strconv.AppendInt(buf, int64(row), 10)
		buf = append(buf, `">`...)
		cw.row, cw.next = row, 0
	}
	flush := func() error {
		if cw.err != nil {
			return cw.err
		}
		if len(buf) < 64<<10 {
			return nil
		}
		_, err := w.Write(buf)
		buf = buf[:0]
		return err
	}
	row := t.first
	for _, cells := range t.rows {
		startRow(row)
		for i, c := range cells {
			switch c.kind {
			case 'n':
				buf = cw.open(buf, i, c.style, false)
				buf = appendJSONFloat(buf, c.num)
				buf = append(buf, `</v></c>`...)
			case 'f':
				buf = cw.open(buf, i, c.style, false)
				buf = appendResultGHz(buf, c.num)
				buf = append(buf, `</v></c>`...)
			case 'd':
				// A date: its serial day number to full precision, so
				// that a time of day reads back to the second.
				buf = cw.open(buf, i, c.style, false)
				buf = strconv.AppendFloat(buf, c.num, 'f', -1, 64)
				buf = append(buf, `</v></c>`...)
			case 's':
				buf = cw.open(buf, i, c.style, true)
				buf = appendXLText(buf, c.text)
				buf = append(buf, `</t></is></c>`...)
			}
		}
		buf = append(buf, `</row>`...)
		row++
		if err := flush(); err != nil {
			return err
		}
	}
	// The numeric columns: the opening of each column's cell when it
	// follows the previous one.
	open := make([]string, len(t.cols))
	for i, c := range t.cols {
		open[i] = `<c s="` + strconv.Itoa(c.style) + `"><v>`
	}
	for k := 0; k < t.n; k++ {
		startRow(row)
		for i, c := range t.cols {
			j := k - c.start
			if j < 0 || j >= len(c.values) {
				continue
			}
			v := c.values[j]
			if math.IsNaN(v) || math.IsInf(v, 0) {
				continue
			}
			if i == cw.next {
				buf = append(buf, open[i]...)
				cw.next++
			} else {
				buf = cw.open(buf, i, c.style, false)
			}
			if c.hz {
				buf = appendResultGHz(buf, v)
			} else {
				buf = appendJSONFloat(buf, v)
			}
			buf = append(buf, `</v></c>`...)
		}
		buf = append(buf, `</row>`...)
		row++
		if err := flush(); err != nil {
			return err
		}
	}
	_, err := w.Write(buf)
	return err
}

// xlEscapedChar matches the text ECMA-376 reads as an escaped character
// (_xHHHH_); its underscore is escaped in turn, as _x005F_, so that the
// text reads back as written.
var xlEscapedChar = regexp.MustCompile(`_x[0-9A-Fa-f]{4}_`)

// cellText is s as a cell holds it: s itself when it fits a cell
// (ingest.MaxCellChars UTF-16 units), else its beginning and a note that
// says how much is not shown, within the limit, so that a cut text never
// reads as the whole. The texts of a workbook come from the results,
// which the report and result.json show whole.
func cellText(s string) string {
	if len(s) <= ingest.MaxCellChars { // at most one UTF-16 unit a byte
		return s
	}
	units := 0
	for _, r := range s {
		units += utf16.RuneLen(r)
	}
	if units <= ingest.MaxCellChars {
		return s
	}
	// The note with the widest count it could need (the whole text's).
	note := func(n int) string { return fmt.Sprintf(" … [cut: %d characters not shown; see the report]", n) }
	keep := ingest.MaxCellChars - utf16Len(note(utf8.RuneCountInString(s)))
	kept, cut := 0, len(s)
	for i, r := range s {
		if kept+utf16.RuneLen(r) > keep {
			cut = i
			break
		}
		kept += utf16.RuneLen(r)
	}
	return s[:cut] + note(utf8.RuneCountInString(s[cut:]))
}

// utf16Len is the length of s in UTF-16 units.
func utf16Len(s string) int {
	n := 0
	for _, r := range s {
		n += utf16.RuneLen(r)
	}
	return n
}

// appendXLText writes the closing of a <t> start tag and s as its text:
// cut with a note past a cell's limit (cellText), XML-escaped, characters
// XML 1.0 does not allow replaced by U+FFFD (as encoding/xml does), spaces
// kept at either end.
func appendXLText(b []byte, s string) []byte {
	if s == "" {
		return append(b, '>')
	}
	s = cellText(s)
	if strings.Contains(s, "_x") {
		s = xlEscapedChar.ReplaceAllString(s, "_x005F$0")
	}
	if c0, c1 := s[0], s[len(s)-1]; c0 == ' ' || c0 == '\t' || c0 == '\n' || c0 == '\r' || c1 == ' ' || c1 == '\t' || c1 == '\n' || c1 == '\r' {
		b = append(b, ` xml:space="preserve">`...)
	} else {
		b = append(b, '>')
	}
	for i := 0; i < len(s); {
		c := s[i]
		if c >= 0x20 && c < 0x80 {
			switch c {
			case '&':
				b = append(b, "&amp;"...)
			case '<':
				b = append(b, "&lt;"...)
			case '>':
				b = append(b, "&gt;"...)
			default:
				b = append(b, c)
			}
			i++
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == '\t' || r == '\n':
			b = append(b, c)
		case r == '\r':
			b = append(b, "&#xD;"...)
		case r == utf8.RuneError && size == 1, r < 0x20, r >= 0xD800 && r <= 0xDFFF, r == 0xFFFE, r == 0xFFFF:
			b = utf8.AppendRune(b, '\uFFFD')
		default:
			b = append(b, s[i:i+size]...)
		}
		i += size
	}
	return b
}

// pow10 holds 1e0 to 1e22, the powers of ten a float64 holds exactly.
var pow10 = func() (p [23]float64) {
	p[0] = 1
	for i := 1; i < len(p); i++ {
		p[i] = p[i-1] * 10
	}
	return p
}()

// resultValue is the float64 that result.json's text of v reads back to
// (appendJSONFloat): v rounded to 1e-6 below 1e9, to 15 significant
// digits from 1e9 up, a whole number as it is. A value that rounds to zero
// is 0 (not -0); a non-finite v is returned as it is.
func resultValue(v float64) float64 {
	a := math.Abs(v)
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return v
	case v == 0:
		return 0
	case a < 1<<53 && v == math.Trunc(v):
		return v
	case a < 1e9:
		// appendDecimal writes the digits of x = round(v*1e6), which for
		// |x| < 1e15 are the shortest text of x/1e6.
		r := math.Round(v*1e6) / 1e6
		if r == 0 {
			return 0
		}
		return r
	}
	var tmp [40]byte
	r, err := strconv.ParseFloat(string(appendJSONFloat(tmp[:0], v)), 64)
	if err != nil { // cannot happen: the text of a finite float
		return v
	}
	return r
}

// resultGHz is the float64 of the frequency hz as a GHz cell holds it
// (appendResultGHz); a non-finite hz is returned as it is.
func resultGHz(hz float64) float64 {
	if math.IsNaN(hz) || math.IsInf(hz, 0) {
		return hz
	}
	var tmp [48]byte
	r, err := strconv.ParseFloat(string(appendResultGHz(tmp[:0], hz)), 64)
	if err != nil { // cannot happen: a decimal number
		return hz / 1e9
	}
	return r
}

// appendResultGHz writes a finite frequency hz in GHz: the text
// result.json holds for hz (appendJSONFloat) with the decimal point moved
// nine places to the left, trailing zeros dropped. The cell is then the
// decimal of result.json, to the hertz and below, where hz/1e9 written to
// 1e-6 would drop everything under a kilohertz.
func appendResultGHz(b []byte, hz float64) []byte {
	var tmp [40]byte
	t := appendJSONFloat(tmp[:0], hz)
	if bytes.ContainsAny(t, "eE") { // 1e21 Hz or more: not a frequency of the model
		return strconv.AppendFloat(b, hz/1e9, 'g', -1, 64)
	}
	if len(t) > 0 && t[0] == '-' {
		b = append(b, '-')
		t = t[1:]
	}
	whole, frac, _ := bytes.Cut(t, []byte{'.'})
	if len(whole) > 9 {
		b = append(b, whole[:len(whole)-9]...)
		whole = whole[len(whole)-9:]
	} else {
		b = append(b, '0')
	}
	// The fraction: nine digits from the whole hertz, then result.json's
	// own fraction, without trailing zeros.
	var f [48]byte
	n := copy(f[9-len(whole):], whole) + 9 - len(whole)
	for i := 0; i < 9-len(whole); i++ {
		f[i] = '0'
	}
	n += copy(f[n:], frac)
	for n > 0 && f[n-1] == '0' {
		n--
	}
	if n > 0 {
		b = append(b, '.')
		b = append(b, f[:n]...)
	}
	return b
}
