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
)

// The frequency tables of the beam sheets are most of a unit workbook (16
// beams x 801 points x some 15 columns: 190,000 cells). excelize spends
// about 2 us on a cell, through its stream writer as well, so the large
// tables are written here instead: excelize makes the sheet (panes, chart,
// conditional formats, a header row where it wrote one), and when the
// package is saved the rows are added at the end of that sheet's XML,
// straight into the compressor. Numbers are written to 15 significant
// digits, text as inline strings.
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
}

// bulkCell is one cell of a bulk row: empty, a number or a text.
type bulkCell struct {
	kind  byte // 0: empty, 'n': number, 's': text
	num   float64
	text  string
	style int
}

// bulkColumn is one numeric column: values[k-start] is on row k of the
// column rows, an index outside values or a non-finite value is an empty
// cell.
type bulkColumn struct {
	values []float64
	start  int
	style  int
}

// numCell is a number cell, empty when v is not finite.
func numCell(v float64, style int) bulkCell {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return bulkCell{}
	}
	return bulkCell{kind: 'n', num: v, style: style}
}

// textCell is a text cell, empty when s is.
func textCell(s string, style int) bulkCell {
	if s == "" {
		return bulkCell{}
	}
	return bulkCell{kind: 's', text: s, style: style}
}

// bulkSize is a guess, on the high side, at the compressed size of the
// bulk tables: 9 bytes a cell, where beam sheets of 15-digit values took
// 7.6.
func (b *xlBook) bulkSize() int {
	cells := 0
	for _, t := range b.bulk {
		cells += t.n*len(t.cols) + len(t.rows)*t.width
	}
	return 9 * cells
}

// addBulk registers what is written into sheet at save time.
func (b *xlBook) addBulk(sheet string, t *bulkSheet) {
	if b.bulk == nil {
		b.bulk = map[string]*bulkSheet{}
	}
	b.bulk[sheet] = t
}

// bulkParts maps the zip part of each bulk sheet to its table, reading the
// sheet names and their parts from xl/workbook.xml and its relationships.
func bulkParts(bulk map[string]*bulkSheet, entries []*zipEntry) (map[string]*bulkSheet, error) {
	if len(bulk) == 0 {
		return nil, nil
	}
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
	parts := map[string]*bulkSheet{}
	for _, s := range wb.Sheets {
		if t, ok := bulk[s.Name]; ok {
			parts[target[s.ID]] = t
		}
	}
	if len(parts) != len(bulk) {
		return nil, fmt.Errorf("render: %d of %d tables have no sheet part", len(bulk)-len(parts), len(bulk))
	}
	return parts, nil
}

// writeBulkSheet writes the sheet XML that excelize made, with the rows of
// t added at the end of its sheetData and the dimension set to cover them.
func writeBulkSheet(w io.Writer, sheetXML []byte, t *bulkSheet) error {
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
			last, _ := excelize.CoordinatesToCellName(max(t.width, 1), max(t.first+len(t.rows)+t.n-1, 1))
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
	var b strings.Builder
	for i := 0; i < len(widths); {
		j := i + 1
		for j < len(widths) && widths[j] == widths[i] {
			j++
		}
		if widths[i] > 0 {
			fmt.Fprintf(&b, `<col min="%d" max="%d" width="%s" customWidth="1"/>`, i+1, j, strconv.FormatFloat(widths[i], 'f', -1, 64))
		}
		i = j
	}
	if b.Len() == 0 {
		return ""
	}
	return "<cols>" + b.String() + "</cols>"
}

// cellWriter appends the cells of one row, stating a cell's reference
// only after a gap.
type cellWriter struct {
	names []string // column names, from A
	row   int
	next  int // index of the column that follows without a reference
}

func (c *cellWriter) open(buf []byte, col, style int, text bool) []byte {
	buf = append(buf, `<c`...)
	if col != c.next {
		for len(c.names) <= col {
			name, _ := excelize.ColumnNumberToName(len(c.names) + 1)
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
				buf = appendXLNumber(buf, c.num)
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
			buf = appendXLNumber(buf, v)
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

// appendXLText writes the closing of a <t> start tag and s as its text:
// XML-escaped, characters XML 1.0 does not allow replaced by U+FFFD (as
// encoding/xml does), spaces kept at either end, at most 32,767 UTF-16
// units (a cell's limit).
func appendXLText(b []byte, s string) []byte {
	if s == "" {
		return append(b, '>')
	}
	if len(s) > 32767 {
		units := 0
		for i, r := range s {
			units += utf16.RuneLen(r)
			if units > 32767 {
				s = s[:i]
				break
			}
		}
	}
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

// pow10 holds 1e0 to 1e22, the powers of ten a float64 holds exactly;
// decade[i] is 10^(i-5) for i in 0..20 (from 1e-5, the float64 nearest).
var pow10, decade = func() (p [23]float64, d [21]float64) {
	p[0] = 1
	for i := 1; i < len(p); i++ {
		p[i] = p[i-1] * 10
	}
	for i := range d {
		if i < 5 {
			d[i] = 1 / p[5-i]
		} else {
			d[i] = p[i-5]
		}
	}
	return p, d
}()

// appendXLNumber writes a finite v to 15 significant digits (the precision
// of a spreadsheet number), without trailing zeros. Between 1e-5 and 1e15,
// where all the tables' values lie, the digits come from one exact scaling
// and one rounded product: the stored number is within 0.6 units of the
// 15th digit of v (0.5 when not near a tie). Elsewhere strconv formats it.
func appendXLNumber(b []byte, v float64) []byte {
	if v == 0 {
		return append(b, '0')
	}
	a := math.Abs(v)
	if a < 1e-5 || a >= 1e15 {
		return strconv.AppendFloat(b, v, 'g', 15, 64)
	}
	// e = floor(log10(a)) in -5..14: log10(2) is about 78913/2^18, which
	// gives it from the binary exponent to within one, then the decades
	// correct it.
	e2 := int(math.Float64bits(a)>>52&0x7ff) - 1023
	e := min(max((e2*78913)>>18, -5), 14)
	if a >= decade[e+6] && e < 14 {
		e++
	} else if a < decade[e+5] && e > -5 {
		e--
	}
	// m holds the 15 significant digits: a * 10^(14-e), 14-e in 0..19,
	// rounded half up (a * 10^(14-e) < 1e15, where adding 0.5 is exact).
	m := int64(a*pow10[14-e] + 0.5)
	if m >= 1e15 { // rounded up to the next power of ten
		m /= 10
		e++
	}
	if v < 0 {
		b = append(b, '-')
	}
	var d [15]byte
	putDigits(d[7:15], uint32(m%1e8), 8)
	putDigits(d[0:7], uint32(m/1e8), 7)
	n := 15
	for n > 1 && d[n-1] == '0' {
		n--
	}
	switch {
	case e < 0: // 0.000ddd
		b = append(b, '0', '.')
		for i := -1; i > e; i-- {
			b = append(b, '0')
		}
		return append(b, d[:n]...)
	case e+1 >= n: // a whole number
		b = append(b, d[:n]...)
		for i := n; i <= e; i++ {
			b = append(b, '0')
		}
		return b
	}
	b = append(b, d[:e+1]...)
	b = append(b, '.')
	return append(b, d[e+1:n]...)
}
