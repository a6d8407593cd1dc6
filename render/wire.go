package render

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"
	"time"

	"gtpack.example/gtpack/ingest"
)

// The wire form of result.json, fleet.json and the build's cache records:
// structs of render's own (resultwire.go, fleetwire.go), which
// encoding/json writes and reads, with the types of this file for what it
// does not do as the contract wants:
//
//   - num is a number rounded as appendJSONFloat says, null when it is not
//     finite (NaN, +Inf, -Inf have no JSON form; a unit is not refused for
//     one bad point), and null reads back as NaN;
//   - nums is a list of them, written and read as a whole (a result.json
//     holds some 400,000 numbers, nearly all in such lists), and beamNums
//     the same for a beam's lists, which can skip encoding/json's copy;
//   - stamp is a time as RFC 3339 in UTC, day a date (YYYY-MM-DD), both ""
//     for the zero time.
//
// The cache records' numbers are exact and exacts (fleetwire.go).
// appendIndented lays the compact encoding out with indentJSON: two spaces
// a level, each list of numbers on one line.

// num is a float64 of the wire form.
type num float64

func (x num) MarshalJSON() ([]byte, error) { return appendJSONFloat(nil, float64(x)), nil }

func (x *num) UnmarshalJSON(b []byte) error {
	f, err := parseNumber(b)
	*x = num(f)
	return err
}

// nums is a list of float64 of the wire form, written on one line. A nil
// list is written as [].
type nums []float64

func (xs nums) MarshalJSON() ([]byte, error) {
	return appendFloatList(make([]byte, 0, 2+len(xs)*jsonFloatSize), xs), nil
}

func (xs *nums) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*xs = nil
		return nil
	}
	if len(b) == 0 || b[0] != '[' {
		return &wireValueError{text: b, what: "a JSON " + jsonKind(b), want: "a list of numbers"}
	}
	// b is a JSON list (encoding/json checked the syntax): its items are
	// separated by commas, and an item that is no number is refused at its
	// first byte (a string's commas do not matter then).
	out := make([]float64, 0, bytes.Count(b, []byte{','})+1)
	rest := bytes.TrimSpace(b[1 : len(b)-1])
	for len(rest) > 0 {
		item := rest
		if i := bytes.IndexByte(rest, ','); i >= 0 {
			item, rest = rest[:i], rest[i+1:]
		} else {
			rest = nil
		}
		f, err := parseNumber(bytes.TrimSpace(item))
		if err != nil {
			return err
		}
		out = append(out, f)
	}
	*xs = out
	return nil
}

// beamNums is a list of numbers of a beam in result.json: the bulk of the
// file (some 400,000 numbers for 16 beams). encoding/json checks and
// copies again every byte a MarshalJSON returns, which for these lists
// cost more than writing them, so with a sink the list is left to it:
// MarshalJSON writes listMark in its place, and indentJSON writes the
// sink's lists where the marks are, in order (encoding/json writes the
// fields in order). Without a sink it is written as nums.
type beamNums struct {
	xs   []float64
	sink *listSink
}

// listSink holds the lists of beamNums whose MarshalJSON has run, in order.
type listSink struct {
	lists  [][]float64
	points int
}

// listMark stands for a list of a sink in encoding/json's output: valid
// JSON that no number of the wire form is written as (num writes no
// exponent below 1e21, and e+21 above).
const listMark = "[0e0]"

func (l beamNums) MarshalJSON() ([]byte, error) {
	if l.sink == nil {
		return nums(l.xs).MarshalJSON()
	}
	l.sink.lists = append(l.sink.lists, l.xs)
	l.sink.points += len(l.xs)
	return []byte(listMark), nil
}

func (l *beamNums) UnmarshalJSON(b []byte) error { return (*nums)(&l.xs).UnmarshalJSON(b) }

// IsZero makes omitzero leave out an empty list, as omitempty does a nums.
func (l beamNums) IsZero() bool { return len(l.xs) == 0 }

// parseNumber reads one JSON value that should be a number or null (NaN).
func parseNumber(b []byte) (float64, error) {
	if string(b) == "null" {
		return math.NaN(), nil
	}
	if len(b) > 0 && (b[0] == '-' || b[0] >= '0' && b[0] <= '9') {
		if f, err := strconv.ParseFloat(string(b), 64); err == nil {
			return f, nil
		}
		return 0, &wireValueError{text: b, what: "a number beyond the range of float64", want: "a number"}
	}
	return 0, &wireValueError{text: b, what: "a JSON " + jsonKind(b), want: "a number or null"}
}

// stamp is a time of the wire form: RFC 3339 in UTC, "" for the zero
// time.
type stamp time.Time

// IsZero makes omitzero leave out the zero time.
func (t stamp) IsZero() bool { return time.Time(t).IsZero() }

func (t stamp) MarshalText() ([]byte, error) {
	if time.Time(t).IsZero() {
		return []byte{}, nil
	}
	return time.Time(t).UTC().AppendFormat(nil, time.RFC3339), nil
}

func (t *stamp) UnmarshalText(b []byte) error {
	if len(b) == 0 {
		*t = stamp{}
		return nil
	}
	v, err := time.Parse(time.RFC3339, string(b))
	if err != nil {
		return &wireValueError{text: strconv.AppendQuote(nil, string(b)), what: "the text " + strconv.Quote(string(b)), want: "an RFC 3339 time"}
	}
	*t = stamp(v.UTC())
	return nil
}

// day is a date of the wire form: YYYY-MM-DD in UTC, "" for the zero
// time.
type day time.Time

// IsZero makes omitzero leave out the zero time.
func (t day) IsZero() bool { return time.Time(t).IsZero() }

func (t day) MarshalText() ([]byte, error) { return []byte(dateOf(time.Time(t))), nil }

func (t *day) UnmarshalText(b []byte) error {
	if len(b) == 0 {
		*t = day{}
		return nil
	}
	v, err := time.Parse(time.DateOnly, string(b))
	if err != nil {
		return &wireValueError{text: strconv.AppendQuote(nil, string(b)), what: "the text " + strconv.Quote(string(b)), want: "a date YYYY-MM-DD"}
	}
	*t = day(v)
	return nil
}

// wireValueError is a value that num, nums, stamp or day refuse. encoding/json
// does not say where a value it hands them stands, so text is that value's
// JSON text, for wireProblem to find.
type wireValueError struct {
	text       []byte
	what, want string
}

func (e *wireValueError) Error() string { return fmt.Sprintf("%s, expected %s", e.what, e.want) }

// jsonKind names the kind of a JSON value from its first byte.
func jsonKind(b []byte) string {
	if len(b) == 0 {
		return "nothing"
	}
	switch b[0] {
	case '"':
		return "string"
	case '{':
		return "object"
	case '[':
		return "list"
	case 't', 'f':
		return "boolean"
	case '-', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		return "number"
	}
	return "value"
}

// appendIndented appends the JSON of the wire struct v, indented as
// indentJSON says from depth on, and then suffix.
func appendIndented(dst []byte, v any, depth int, suffix string) ([]byte, error) {
	return appendIndentedLists(dst, v, depth, suffix, nil)
}

// appendIndentedLists is appendIndented of a v whose beamNums go to sink.
func appendIndentedLists(dst []byte, v any, depth int, suffix string, sink *listSink) ([]byte, error) {
	compact, err := json.Marshal(v)
	if err != nil {
		return nil, err
	}
	if dst == nil {
		n := len(compact) + len(compact)/8
		if sink != nil {
			n += sink.points * jsonFloatSize
		}
		dst = make([]byte, 0, n)
	}
	dst, rest := indentJSON(dst, compact, depth, sink)
	if rest != 0 {
		return nil, fmt.Errorf("render: %d lists of numbers not written", rest)
	}
	return append(dst, suffix...), nil
}

// indentJSON appends src, JSON as json.Marshal writes it (no space outside
// strings), laid out as json.MarshalIndent(v, "", "  ") would, except that
// a list whose first item is a number, a boolean or null stands on one
// line as it is: its items are separated by a comma alone. The wire
// structs make every list hold items of one kind, so such a list holds no
// list, object or string. depth is the level src stands at. Each
// listMark is replaced by the next list of sink (nil: none); rest is how
// many lists were left.
func indentJSON(dst, src []byte, depth int, sink *listSink) (out []byte, rest int) {
	var lists [][]float64
	if sink != nil {
		lists = sink.lists
	}
	for i := 0; i < len(src); i++ {
		c := src[i]
		switch c {
		case '"':
			j := i + 1
			for ; src[j] != '"'; j++ {
				if src[j] == '\\' {
					j++
				}
			}
			dst = append(dst, src[i:j+1]...)
			i = j
		case '{', '[':
			next := src[i+1]
			if next == '}' || next == ']' {
				dst = append(dst, c, next)
				i++
				continue
			}
			if c == '[' && next != '{' && next != '[' && next != '"' {
				if len(lists) > 0 && bytes.HasPrefix(src[i:], []byte(listMark)) {
					dst = appendFloatList(dst, lists[0])
					lists = lists[1:]
					i += len(listMark) - 1
					continue
				}
				n := bytes.IndexByte(src[i:], ']')
				dst = append(dst, src[i:i+n+1]...)
				i += n
				continue
			}
			depth++
			dst = appendNewline(append(dst, c), depth)
		case '}', ']':
			depth--
			dst = append(appendNewline(dst, depth), c)
		case ',':
			dst = appendNewline(append(dst, ','), depth)
		case ':':
			dst = append(dst, ':', ' ')
		default:
			dst = append(dst, c)
		}
	}
	return dst, len(lists)
}

// appendNewline starts a new line indented to depth.
func appendNewline(b []byte, depth int) []byte {
	b = append(b, '\n')
	for i := 0; i < depth; i++ {
		b = append(b, ' ', ' ')
	}
	return b
}

// readJSON decodes data into the wire struct v; a problem names file and
// line.
func readJSON(file string, data []byte, v any) error {
	if err := json.Unmarshal(data, v); err != nil {
		return jsonProblem(file, data, err)
	}
	return nil
}

// jsonProblem turns a decoding error into a *ingest.Problem with the line.
func jsonProblem(file string, data []byte, err error) error {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	var we *wireValueError
	switch {
	case errors.As(err, &se):
		return ingest.Problemf(file, lineOf(data, se.Offset), "%v; expected JSON", se)
	case errors.As(err, &te):
		return ingest.Problemf(file, lineOf(data, te.Offset), "field %s holds a JSON %s, expected %s", te.Field, te.Value, te.Type)
	case errors.As(err, &we):
		// The first place the refused text stands is where the decoder,
		// which stops at the first error, refused it.
		line := 0
		if at := bytes.Index(data, we.text); at >= 0 {
			line = lineOf(data, int64(at))
		}
		return ingest.Problemf(file, line, "%v", we)
	}
	return ingest.Problemf(file, 0, "%v", err)
}

func lineOf(data []byte, offset int64) int {
	if offset > int64(len(data)) {
		offset = int64(len(data))
	}
	if offset < 0 {
		offset = 0
	}
	return 1 + bytes.Count(data[:offset], []byte{'\n'})
}

// appendFloatList writes a list of floats on one line.
func appendFloatList(b []byte, xs []float64) []byte {
	b = append(b, '[')
	for i, x := range xs {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendJSONFloat(b, x)
	}
	return append(b, ']')
}

// jsonFloatSize is the room a float of a list takes on average with its
// separator: 8.8 bytes in a result.json of the sample archive, some 9.5 in
// the test fixtures; 10 so that the buffer does not have to grow.
const jsonFloatSize = 10

// appendJSONFloat writes f rounded to 6 decimal places, in the shortest
// form of the rounded value, without exponent: 1e-6 dB (or degree, or
// kelvin) is far below the uncertainty of any range measurement (tenths of
// a dB), and the full float64 digits tripled the size of result.json.
// From 1e9 up (frequencies in Hz) 6 decimals would be finer than a float64
// holds, so there the value is rounded to 15 significant digits instead,
// which makes a frequency grid computed in floating point come out as the
// whole hertz it stands for. A value of 1e21 or more, which the model does
// not hold, is written as encoding/json writes it. NaN and infinities are
// null.
func appendJSONFloat(b []byte, f float64) []byte {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return append(b, "null"...)
	}
	abs := math.Abs(f)
	switch {
	case abs < 1<<53 && f == math.Trunc(f):
		// A whole number (a frequency grid in Hz, mostly) is its own
		// rounding.
		if f < 0 {
			return appendUint(append(b, '-'), uint64(-f))
		}
		return appendUint(b, uint64(f))
	case abs < 1e9:
		// |f*1e6| < 1e15: appendDecimal writes the digits of the rounded
		// value straight from the whole number of micro-units.
		return appendDecimal(b, f, 6)
	case abs < 1e21:
		var tmp [32]byte
		r, err := strconv.ParseFloat(string(strconv.AppendFloat(tmp[:0], f, 'e', 14, 64)), 64)
		if err != nil { // cannot happen: the text was just formatted
			r = f
		}
		return strconv.AppendFloat(b, r, 'f', -1, 64)
	}
	return strconv.AppendFloat(b, f, 'e', -1, 64)
}

// timeText is t as the wire writes it: RFC 3339 in UTC, "" for the zero
// time.
func timeText(t time.Time) string {
	b, _ := stamp(t).MarshalText()
	return string(b)
}
