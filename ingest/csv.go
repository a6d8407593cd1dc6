package ingest

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// The CSV files of the archive (traces, elements.csv, reference tables) as
// instruments and spreadsheets write them (contract, "Data files"):
// fields may be quoted as RFC 4180 allows (a quoted field may hold the
// delimiter, a doubled quote and line breaks), a trailing empty field is
// ignored, blank lines are skipped, CRLF or LF, an optional UTF-8
// byte-order mark. A csv: mapping (CSVFormat) says the rest of a file's
// layout; without one a trace is the contract's form. Every refusal names
// the line and, where it can tell, the mapping that would read the file.

// maxLineBytes bounds one CSV line, so that a binary file given by mistake
// is refused instead of being held in memory whole.
const maxLineBytes = 1 << 20

// csvReader yields the records of a CSV file.
type csvReader struct {
	data    []byte
	name    string
	pos     int
	line    int // physical lines read so far
	delim   byte
	comment []string // prefixes of comment lines
	fields  []string
	buf     []byte
}

func newCSVReader(data []byte, name string, f *CSVFormat) *csvReader {
	c := &csvReader{data: data, name: name, delim: ','}
	if f != nil && f.Delimiter != 0 {
		c.delim = f.Delimiter
	}
	c.comment = []string{"#", "!"}
	if f != nil && f.Comment != "" {
		c.comment = []string{f.Comment}
	}
	if bytes.HasPrefix(c.data, []byte("\ufeff")) {
		c.pos = 3
	}
	return c
}

// rawLine returns the next physical line without its line ending.
func (c *csvReader) rawLine() ([]byte, bool, error) {
	if c.pos >= len(c.data) {
		return nil, false, nil
	}
	rest := c.data[c.pos:]
	i := bytes.IndexByte(rest, '\n')
	var ln []byte
	if i < 0 {
		ln, c.pos = rest, len(c.data)
	} else {
		ln, c.pos = rest[:i], c.pos+i+1
	}
	c.line++
	if len(ln) > maxLineBytes {
		return nil, false, Problemf(c.name, c.line, "line longer than %d bytes; expected a text line of a CSV file", maxLineBytes)
	}
	return bytes.TrimSuffix(ln, []byte("\r")), true, nil
}

// skip passes n physical lines (the lines before the header).
func (c *csvReader) skip(n int) error {
	for i := 0; i < n; i++ {
		if _, ok, err := c.rawLine(); err != nil || !ok {
			return err
		}
	}
	return nil
}

func (c *csvReader) isComment(t []byte) bool {
	for _, p := range c.comment {
		if bytes.HasPrefix(t, []byte(p)) {
			return true
		}
	}
	return false
}

// peekHeader returns the next record's first line without reading it:
// the line delimiter detection looks at.
func (c *csvReader) peekLine() []byte {
	save, saveLine := c.pos, c.line
	defer func() { c.pos, c.line = save, saveLine }()
	for {
		ln, ok, err := c.rawLine()
		if err != nil || !ok {
			return nil
		}
		t := bytes.TrimSpace(ln)
		if len(t) == 0 || c.isComment(t) {
			continue
		}
		return ln
	}
}

// detectDelimiter chooses the delimiter of a header line: the one of
// tab, ";" and "," found most often outside quotes (tab first on a tie,
// then ";"); "," when there is none.
func detectDelimiter(line []byte) byte {
	counts := map[byte]int{}
	quoted := false
	for _, b := range line {
		switch {
		case b == '"':
			quoted = !quoted
		case !quoted && (b == ',' || b == ';' || b == '\t'):
			counts[b]++
		}
	}
	best := byte(',')
	n := 0
	for _, d := range []byte{'\t', ';', ','} {
		if counts[d] > n {
			best, n = d, counts[d]
		}
	}
	return best
}

// next returns the fields of the next record and the line it starts on,
// or io.EOF. The slice of fields is reused by the next record.
func (c *csvReader) next() ([]string, int, error) {
	for {
		ln, ok, err := c.rawLine()
		if err != nil {
			return nil, c.line, err
		}
		if !ok {
			return nil, c.line, io.EOF
		}
		t := bytes.TrimSpace(ln)
		if len(t) == 0 || c.isComment(t) {
			continue
		}
		start := c.line
		if !utf8.Valid(ln) {
			return nil, start, Problemf(c.name, start, "line is not UTF-8 text; expected a text line of a CSV file")
		}
		fields, err := c.split(ln, start)
		if err != nil {
			return nil, start, err
		}
		// A trailing empty field (a delimiter at the end of the line) is
		// ignored, as spreadsheets and some instruments write one.
		if n := len(fields); n > 1 && fields[n-1] == "" {
			fields = fields[:n-1]
		}
		c.fields = fields
		return fields, start, nil
	}
}

// split splits one record starting with line ln (RFC 4180: a field that
// starts with a quote runs to the closing quote, "" is a quote, and may
// go on over the next lines). Fields are trimmed of spaces outside quotes.
func (c *csvReader) split(ln []byte, start int) ([]string, error) {
	fields := c.fields[:0]
	i := 0
	for {
		// One field from ln[i:].
		for i < len(ln) && (ln[i] == ' ' || (ln[i] == '\t' && c.delim != '\t')) {
			i++
		}
		if i < len(ln) && ln[i] == '"' {
			c.buf = c.buf[:0]
			i++
			for {
				j := bytes.IndexByte(ln[i:], '"')
				if j < 0 {
					// The field goes on over the next line.
					c.buf = append(c.buf, ln[i:]...)
					next, ok, err := c.rawLine()
					if err != nil {
						return nil, err
					}
					if !ok {
						return nil, Problemf(c.name, start, "a quoted field that starts on this line has no closing quote; expected each \" to be closed (a quote inside a field is written \"\")")
					}
					c.buf = append(c.buf, '\n')
					ln, i = next, 0
					continue
				}
				c.buf = append(c.buf, ln[i:i+j]...)
				i += j + 1
				if i < len(ln) && ln[i] == '"' {
					c.buf = append(c.buf, '"')
					i++
					continue
				}
				break
			}
			for i < len(ln) && (ln[i] == ' ' || (ln[i] == '\t' && c.delim != '\t')) {
				i++
			}
			fields = append(fields, string(c.buf))
			if i >= len(ln) {
				return fields, nil
			}
			if ln[i] != c.delim {
				return nil, Problemf(c.name, c.line, "text %q after a quoted field; expected the delimiter %s or the end of the line", clip(string(ln[i:])), delimName(c.delim))
			}
			i++
			continue
		}
		j := bytes.IndexByte(ln[i:], c.delim)
		if j < 0 {
			fields = append(fields, strings.TrimSpace(string(ln[i:])))
			return fields, nil
		}
		fields = append(fields, strings.TrimSpace(string(ln[i:i+j])))
		i += j + 1
	}
}

func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

func delimName(d byte) string {
	switch d {
	case '\t':
		return "tab"
	case ';':
		return `";"`
	}
	return `","`
}

// frequencyUnits maps the header names of the frequency column to the power
// of ten that turns them into hertz.
var frequencyUnits = map[string]int{
	"frequency_hz":  0,
	"frequency_khz": 3,
	"frequency_mhz": 6,
	"frequency_ghz": 9,
}

var unitExponents = map[string]int{"hz": 0, "khz": 3, "mhz": 6, "ghz": 9}

// words splits a header text into lower-case words of letters and digits.
func words(s string) []string {
	return strings.FieldsFunc(strings.ToLower(s), func(r rune) bool { return !unicode.IsLetter(r) && !unicode.IsDigit(r) })
}

// headerUnit returns the frequency unit a header text names (frequency_ghz,
// "Freq(Hz)", "Frequency [MHz]", freq_mhz), and whether it names a
// frequency at all (its first word is f, freq or frequency).
func headerUnit(s string) (exp int, unit, frequency bool) {
	w := words(s)
	if len(w) == 0 {
		return 0, false, false
	}
	switch w[0] {
	case "f", "freq", "frequency", "frequencies":
		frequency = true
	}
	for _, x := range w {
		if e, ok := unitExponents[x]; ok {
			return e, true, frequency || len(w) == 1
		}
	}
	return 0, false, frequency
}

// traceQuantityColumns are the contract's names of value columns, by
// quantity (the header-and-quantity rule).
var traceQuantityColumns = map[string]string{
	"noise-density-dbm-hz":   "noise_density_dbm_hz",
	"noise-relative-kt0-db":  "noise_relative_kt0_db",
	"system-noise-figure-db": "system_noise_figure_db",
	"s21":                    "s21_db",
}

// plausible are the ranges of method.md section 13: a value outside is
// almost always a wrong column or a wrong declared quantity.
var plausible = map[string]struct {
	lo, hi float64
	unit   string
}{
	"noise-density-dbm-hz":   {-200, -60, "dBm/Hz"},
	"noise-relative-kt0-db":  {-5, 120, "dB"},
	"system-noise-figure-db": {-5, 120, "dB"},
}

// traceSpec says what a trace file holds: the quantity the YAML declares
// ("s21" for a CSV transmission, "" when unknown, as for inspect), where
// the YAML names it (for messages), and its csv: mapping.
type traceSpec struct {
	quantity string
	format   *CSVFormat
	// mapping says where a csv: mapping goes, for messages ("the noise
	// entry in run.yaml").
	where string
}

// ReadTrace reads a trace CSV of the archive contract: a header
// `frequency_<hz|khz|mhz|ghz>,<value column>`, then one frequency and one
// value per line, frequencies positive and strictly increasing. It stops at
// the first mistake and returns it as a *Problem naming name and the line.
func ReadTrace(r io.Reader, name string) (*Trace, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxFileBytes+1))
	if err != nil {
		return nil, Problemf(name, 0, "read error: %v", err)
	}
	t, _, err := readTrace(data, name, traceSpec{})
	return t, err
}

// ReadTraceCSV reads a trace in the layout f (nil: the contract's form)
// that holds quantity (a noise quantity, "s21", or "" when not known).
func ReadTraceCSV(data []byte, name string, f *CSVFormat, quantity string) (*Trace, error) {
	t, _, err := readTrace(data, name, traceSpec{quantity: quantity, format: f})
	return t, err
}

// readTrace reads a trace and the line of each point.
func readTrace(data []byte, name string, ts traceSpec) (*Trace, []int, error) {
	f := ts.format
	where := ts.where
	if where == "" {
		where = "the file's entry in its YAML"
	}
	c := newCSVReader(data, name, f)
	if f != nil {
		if err := c.skip(f.SkipLines); err != nil {
			return nil, nil, err
		}
	}
	if f == nil || f.Delimiter == 0 {
		if ln := c.peekLine(); ln != nil {
			c.delim = detectDelimiter(ln)
		}
	}
	header, hl, err := c.next()
	if err == io.EOF {
		return nil, nil, Problemf(name, 0, "file is empty; expected a header frequency_<hz|khz|mhz|ghz>,<value column> and data lines")
	}
	if err != nil {
		return nil, nil, err
	}
	header = append([]string(nil), header...)
	hint := func() string { return layoutHint(data, name, f, c.delim, where) }
	if f == nil && len(header) != 2 {
		return nil, nil, Problemf(name, hl, "header %q has %s; expected 2: frequency_<hz|khz|mhz|ghz>,<value column>%s", strings.Join(header, string(c.delim)), countFields(len(header)), hint())
	}
	col := func(cc CSVColumn, def int, what string) (int, error) {
		switch {
		case cc.Number > 0:
			if cc.Number > len(header) {
				return 0, Problemf(name, hl, "the csv: mapping's %s is column %d, but the header has %s (%s); expected a column of the header", what, cc.Number, countFields(len(header)), strings.Join(quoteAll(header), ", "))
			}
			return cc.Number - 1, nil
		case cc.Name != "":
			for i, h := range header {
				if strings.EqualFold(strings.TrimSpace(h), strings.TrimSpace(cc.Name)) {
					return i, nil
				}
			}
			return 0, Problemf(name, hl, "the csv: mapping's %s %q is not in the header (%s); expected one of its fields, or a column number", what, cc.Name, strings.Join(quoteAll(header), ", "))
		}
		if def > len(header) {
			return 0, Problemf(name, hl, "header %q has %s; expected at least %d (frequency, value)%s", strings.Join(header, string(c.delim)), countFields(len(header)), def, hint())
		}
		return def - 1, nil
	}
	var fc, vc CSVColumn
	if f != nil {
		fc, vc = f.FrequencyColumn, f.ValueColumn
	}
	fi, err := col(fc, 1, "frequency_column")
	if err != nil {
		return nil, nil, err
	}
	vi, err := col(vc, 2, "value_column")
	if err != nil {
		return nil, nil, err
	}
	if fi == vi {
		return nil, nil, Problemf(name, hl, "the frequency and the value are both column %d; expected two columns", fi+1)
	}
	var units []string
	if f != nil && f.UnitsRow {
		u, _, err := c.next()
		if err == io.EOF {
			return nil, nil, Problemf(name, hl, "header but no units row; expected the row of units the csv: mapping's units_row says follows the header")
		}
		if err != nil {
			return nil, nil, err
		}
		units = append([]string(nil), u...)
	}
	fh := strings.TrimSpace(header[fi])
	exp, hasUnit, isFreq := headerUnit(fh)
	if f == nil {
		if e, ok := frequencyUnits[strings.ToLower(fh)]; ok {
			exp, hasUnit, isFreq = e, true, true
		}
		if !isFreq || !hasUnit {
			return nil, nil, Problemf(name, hl, "first header field %q is not a frequency column with its unit; expected frequency_hz, frequency_khz, frequency_mhz or frequency_ghz%s", fh, hint())
		}
	} else {
		if !hasUnit && fi < len(units) {
			if e, ok := unitExponents[strings.Join(words(units[fi]), "")]; ok {
				exp, hasUnit = e, true
			}
		}
		if f.FrequencyUnit != "" {
			e := unitExponents[f.FrequencyUnit]
			if hasUnit && e != exp {
				return nil, nil, Problemf(name, hl, "the frequency column %q says %s, but the csv: mapping's frequency_unit is %s; expected one unit (leave frequency_unit out when the header says it)", fh, unitName(exp), f.FrequencyUnit)
			}
			exp, hasUnit = e, true
		}
		if !hasUnit {
			return nil, nil, Problemf(name, hl, "the frequency column %q does not say its unit; expected frequency_unit: hz, khz, mhz or ghz in the csv: mapping", fh)
		}
	}
	column := strings.TrimSpace(header[vi])
	if column == "" {
		return nil, nil, Problemf(name, hl, "the value column's header (column %d) is empty; expected the name of the value column", vi+1)
	}
	if strings.IndexFunc(column, unicode.IsControl) >= 0 {
		return nil, nil, Problemf(name, hl, "value column name %q holds a control character; expected a printable name", column)
	}
	if p := quantityAgrees(name, hl, column, ts.quantity); p != nil {
		return nil, nil, p
	}
	decimal := byte('.')
	if f != nil && f.Decimal != 0 {
		decimal = f.Decimal
	}
	t := &Trace{File: name, Column: column}
	var lines []int
	var prevText string
	width := len(header)
	for {
		fields, ln, err := c.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, nil, err
		}
		if len(fields) != width {
			return nil, nil, Problemf(name, ln, "%s in %q; expected %d as in the header: %s", countFields(len(fields)), strings.Join(fields, string(c.delim)), width, strings.Join(header, string(c.delim)))
		}
		ftext, vtext := fields[fi], fields[vi]
		fnum, err := decimalText(ftext, decimal)
		if err == nil {
			var v float64
			if v, err = parseScaled(fnum, exp); err == nil {
				if v <= 0 {
					return nil, nil, Problemf(name, ln, "frequency %s is not positive; expected a frequency above 0", ftext)
				}
				if n := len(t.FrequencyHz); n > 0 && v <= t.FrequencyHz[n-1] {
					return nil, nil, Problemf(name, ln, "frequency %s is not above the previous %s; expected strictly increasing frequencies", ftext, prevText)
				}
				t.FrequencyHz = append(t.FrequencyHz, v)
			}
		}
		if err != nil {
			return nil, nil, Problemf(name, ln, "frequency %q: %v%s", ftext, err, numberHint(ftext, decimal, c.delim, where))
		}
		vnum, err := decimalText(vtext, decimal)
		var v float64
		if err == nil {
			v, err = parseDecimal(vnum)
		}
		if err != nil {
			return nil, nil, Problemf(name, ln, "%s %q: %v%s", t.Column, vtext, err, numberHint(vtext, decimal, c.delim, where))
		}
		if r, ok := plausible[ts.quantity]; ok && (v < r.lo || v > r.hi) {
			return nil, nil, Problemf(name, ln, "%s %s at %s is outside %g to %g %s, which no antenna range produces (method.md section 13); expected a %s: is the value column right, and is the quantity declared in the YAML (%s) the one the file holds?",
				t.Column, vtext, ghzText(t.FrequencyHz[len(t.FrequencyHz)-1]), r.lo, r.hi, r.unit, quantityWords(ts.quantity), ts.quantity)
		}
		if len(t.Values) >= MaxTracePoints {
			return nil, nil, pointLimit(name, ln, len(t.Values)+1, "point")
		}
		t.Values = append(t.Values, v)
		lines = append(lines, ln)
		prevText = ftext
	}
	if len(t.FrequencyHz) == 0 {
		return nil, nil, Problemf(name, hl, "header but no data lines; expected at least one frequency, value line")
	}
	return t, lines, nil
}

func unitName(exp int) string {
	return map[int]string{0: "Hz", 3: "kHz", 6: "MHz", 9: "GHz"}[exp]
}

func quantityWords(q string) string {
	switch q {
	case "noise-density-dbm-hz":
		return "noise density in dBm/Hz"
	case "noise-relative-kt0-db":
		return "noise above kT0 in dB"
	case "system-noise-figure-db":
		return "system noise figure in dB"
	}
	return q
}

func quoteAll(s []string) []string {
	out := make([]string, len(s))
	for i, x := range s {
		out[i] = strconv.Quote(x)
	}
	return out
}

// quantityAgrees applies the header-and-quantity rule: a value column
// named with one of the contract's quantity names must hold the declared
// quantity.
func quantityAgrees(name string, line int, column, quantity string) *Problem {
	if quantity == "" {
		return nil
	}
	want := traceQuantityColumns[quantity]
	for q, c := range traceQuantityColumns {
		if strings.EqualFold(column, c) && c != want {
			what := "the YAML declares " + quantity
			if quantity == "s21" {
				what = "the YAML names it as a transmission (S21 in dB)"
			}
			held := q
			if q == "s21" {
				held = "a transmission in dB"
			}
			return Problemf(name, line, "value column %q is the contract's name of %s, but %s; expected the quantity the file holds: correct quantity: in the YAML, or the file", column, held, what)
		}
	}
	return nil
}

// decimalText turns a number written with decimal into the text
// parseScaled reads.
func decimalText(s string, decimal byte) (string, error) {
	if decimal != ',' {
		return s, nil
	}
	if strings.IndexByte(s, '.') >= 0 {
		return "", errors.New(`holds a point, but the csv: mapping says decimal ","; expected a decimal comma (or decimal: ".")`)
	}
	return strings.Replace(s, ",", ".", 1), nil
}

// numberHint says what would read a number that did not read: a decimal
// comma is the usual reason.
func numberHint(s string, decimal, delim byte, where string) string {
	if decimal == ',' || strings.IndexByte(s, ',') < 0 {
		return ""
	}
	if _, err := parseDecimal(strings.Replace(s, ",", ".", 1)); err != nil {
		return ""
	}
	if delim == ',' {
		delim = ';'
	}
	return fmt.Sprintf(`; it looks like a decimal comma: add csv: {delimiter: %s, decimal: ","} to %s`, yamlDelim(delim), where)
}

func yamlDelim(d byte) string {
	switch d {
	case '\t':
		return "tab"
	case ';':
		return `";"`
	}
	return `","`
}

// layoutHint looks at a file the contract's form could not read and says
// which csv: mapping would: a header further down (skip_lines), a units
// row, a frequency column without its unit.
func layoutHint(data []byte, name string, f *CSVFormat, delim byte, where string) string {
	if f != nil {
		return ""
	}
	c := newCSVReader(data, name, nil)
	c.delim = delim
	for i := 0; i < 50; i++ {
		ln, ok, err := c.rawLine()
		if err != nil || !ok {
			break
		}
		t := bytes.TrimSpace(ln)
		if len(t) == 0 || c.isComment(t) {
			continue
		}
		fields, err := c.split(ln, c.line)
		if err != nil || len(fields) < 2 {
			continue
		}
		_, unit, freq := headerUnit(fields[0])
		if freq && unit && c.line > 1 {
			return fmt.Sprintf("; the header seems to be line %d: add csv: {skip_lines: %d} to %s", c.line, c.line-1, where)
		}
		if freq && !unit {
			return fmt.Sprintf("; if the frequency's unit is in the next row, add csv: {units_row: true} to %s (or frequency_unit: hz, khz, mhz or ghz)", where)
		}
	}
	return ""
}

// readReferenceTable reads a reference antenna's table_file: header
// `frequency_ghz,gain_dbi,uncertainty_db` (or the layout f), frequencies
// strictly increasing, uncertainties not negative.
func readReferenceTable(r io.Reader, name string) ([]ReferencePoint, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxFileBytes+1))
	if err != nil {
		return nil, Problemf(name, 0, "read error: %v", err)
	}
	return readReferenceTableCSV(data, name, nil)
}

func readReferenceTableCSV(data []byte, name string, f *CSVFormat) ([]ReferencePoint, error) {
	c := newCSVReader(data, name, f)
	if f != nil {
		if err := c.skip(f.SkipLines); err != nil {
			return nil, err
		}
	}
	if f == nil || f.Delimiter == 0 {
		if ln := c.peekLine(); ln != nil {
			c.delim = detectDelimiter(ln)
		}
	}
	header, hl, err := c.next()
	if err == io.EOF {
		return nil, Problemf(name, 0, "file is empty; expected a header frequency_ghz,gain_dbi,uncertainty_db and data lines")
	}
	if err != nil {
		return nil, err
	}
	header = append([]string(nil), header...)
	idx := [3]int{0, 1, 2}
	exp := 9
	if f == nil {
		if !sameFields(header, []string{"frequency_ghz", "gain_dbi", "uncertainty_db"}) {
			return nil, Problemf(name, hl, "header %q; expected frequency_ghz,gain_dbi,uncertainty_db (or a csv: mapping beside table_file)", strings.Join(header, string(c.delim)))
		}
	} else {
		for k, cc := range []CSVColumn{f.FrequencyColumn, f.ValueColumn, f.UncertaintyColumn} {
			switch {
			case cc.Number > 0:
				idx[k] = cc.Number - 1
			case cc.Name != "":
				idx[k] = -1
				for i, h := range header {
					if strings.EqualFold(h, cc.Name) {
						idx[k] = i
					}
				}
				if idx[k] < 0 {
					return nil, Problemf(name, hl, "the csv: mapping's column %q is not in the header (%s); expected one of its fields, or a column number", cc.Name, strings.Join(quoteAll(header), ", "))
				}
			}
			if idx[k] >= len(header) {
				return nil, Problemf(name, hl, "header %q has %s; expected columns for frequency, gain and uncertainty", strings.Join(header, string(c.delim)), countFields(len(header)))
			}
		}
		var units []string
		if f.UnitsRow {
			u, _, err := c.next()
			if err != nil {
				return nil, Problemf(name, hl, "header but no units row; expected the row of units the csv: mapping's units_row says follows the header")
			}
			units = append([]string(nil), u...)
		}
		e, unit, _ := headerUnit(header[idx[0]])
		if !unit && idx[0] < len(units) {
			e, unit = unitExponents[strings.Join(words(units[idx[0]]), "")]
		}
		if f.FrequencyUnit != "" {
			e, unit = unitExponents[f.FrequencyUnit], true
		}
		if !unit {
			return nil, Problemf(name, hl, "the frequency column %q does not say its unit; expected frequency_unit: hz, khz, mhz or ghz in the csv: mapping", header[idx[0]])
		}
		exp = e
	}
	decimal := byte('.')
	if f != nil && f.Decimal != 0 {
		decimal = f.Decimal
	}
	var out []ReferencePoint
	var prevText string
	for {
		fields, ln, err := c.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(fields) != len(header) {
			return nil, Problemf(name, ln, "%s in %q; expected %d as in the header: %s", countFields(len(fields)), strings.Join(fields, string(c.delim)), len(header), strings.Join(header, string(c.delim)))
		}
		var vals [3]float64
		for k, what := range []string{"frequency", "gain_dbi", "uncertainty_db"} {
			s, err := decimalText(fields[idx[k]], decimal)
			if err == nil {
				if k == 0 {
					vals[k], err = parseScaled(s, exp)
				} else {
					vals[k], err = parseDecimal(s)
				}
			}
			if err != nil {
				return nil, Problemf(name, ln, "%s %q: %v%s", what, fields[idx[k]], err, numberHint(fields[idx[k]], decimal, c.delim, "the reference beside table_file"))
			}
		}
		p := ReferencePoint{FrequencyHz: vals[0], GainDBi: vals[1], ExpandedUncertaintyDB: vals[2], Line: ln}
		ftext := fields[idx[0]]
		if p.FrequencyHz <= 0 {
			return nil, Problemf(name, ln, "frequency %s is not positive; expected a frequency above 0", ftext)
		}
		if n := len(out); n > 0 && p.FrequencyHz <= out[n-1].FrequencyHz {
			return nil, Problemf(name, ln, "frequency %s GHz is not above the previous %s GHz; expected strictly increasing frequencies", ftext, prevText)
		}
		if p.ExpandedUncertaintyDB < 0 {
			return nil, Problemf(name, ln, "uncertainty_db %s is negative; expected an expanded uncertainty >= 0 dB", fields[idx[2]])
		}
		if len(out) >= MaxTracePoints {
			return nil, pointLimit(name, ln, len(out)+1, "point")
		}
		out = append(out, p)
		prevText = ftext
	}
	if len(out) == 0 {
		return nil, Problemf(name, hl, "header but no data lines; expected at least one frequency_ghz,gain_dbi,uncertainty_db line")
	}
	return out, nil
}
