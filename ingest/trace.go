package ingest

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"gtpack.example/gtpack/ingest/touchstone"
)

// WriteTrace writes t as a trace CSV with the frequency column in
// frequencyUnit (hz, khz, mhz or ghz, case-insensitive, with or without
// the `frequency_` prefix). Numbers are written with the fewest digits that
// read back to the same float64, and the unit change is done on the decimal
// text, so ReadTrace(WriteTrace(t)) returns t exactly.
func WriteTrace(w io.Writer, t *Trace, frequencyUnit string) error {
	u := strings.ToLower(frequencyUnit)
	if !strings.HasPrefix(u, "frequency_") {
		u = "frequency_" + u
	}
	exp, ok := frequencyUnits[u]
	if !ok {
		return fmt.Errorf("frequency unit %q: expected hz, khz, mhz or ghz", frequencyUnit)
	}
	if len(t.FrequencyHz) != len(t.Values) {
		return fmt.Errorf("trace %s: %d frequencies but %d values", t.File, len(t.FrequencyHz), len(t.Values))
	}
	if t.Column == "" || strings.ContainsAny(t.Column, ",\r\n") || strings.HasPrefix(strings.TrimSpace(t.Column), "#") {
		return fmt.Errorf("trace %s: column name %q cannot stand in a CSV header", t.File, t.Column)
	}
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "%s,%s\n", u, t.Column)
	for i, f := range t.FrequencyHz {
		v := t.Values[i]
		if math.IsNaN(f) || math.IsInf(f, 0) || math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("trace %s: point %d is not finite", t.File, i)
		}
		bw.WriteString(formatScaled(f, -exp))
		bw.WriteByte(',')
		bw.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
		bw.WriteByte('\n')
	}
	return bw.Flush()
}

// parseDecimal parses a finite decimal number.
func parseDecimal(s string) (float64, error) {
	return parseScaled(s, 0)
}

// parseScaled parses the decimal s times 10^exp, rounding once: the
// exponent is added to the text, so "10.7" in GHz is exactly the float64
// nearest 10.7e9. The numbers are the Touchstone reader's
// (touchstone.ParseNumber): a plain decimal only, since strconv.ParseFloat
// alone also takes "inf", "nan", hex floats and underscores, none of which
// a measurement file should hold.
func parseScaled(s string, exp int) (float64, error) {
	v, err := touchstone.ParseNumber(s, exp)
	switch {
	case err == nil:
		return v, nil
	case s == "":
		return 0, errors.New("empty; expected a number")
	case err == strconv.ErrSyntax:
		return 0, errors.New("is not a number; expected a decimal number such as 11.7 or 1.17e10")
	}
	return 0, errors.New("out of range; expected a finite number")
}

// formatScaled writes v times 10^exp as decimal text with the shortest
// digits that round-trip v through parseScaled(text, -exp).
func formatScaled(v float64, exp int) string {
	if v == 0 || exp == 0 {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	s := strconv.FormatFloat(v, 'e', -1, 64) // [-]d[.ddd]e±XX
	i := strings.IndexByte(s, 'e')
	x, _ := strconv.Atoi(s[i+1:])
	x += exp
	mant := s[:i]
	sign := ""
	if mant[0] == '-' {
		sign, mant = "-", mant[1:]
	}
	digits := strings.Replace(mant, ".", "", 1)
	// digits is d1 d2 ... with the point after d1, times 10^x.
	point := 1 + x
	switch {
	case point <= -5 || point > 21:
		return sign + mant + "e" + strconv.Itoa(x)
	case point <= 0:
		return sign + "0." + strings.Repeat("0", -point) + digits
	case point >= len(digits):
		return sign + digits + strings.Repeat("0", point-len(digits))
	default:
		return sign + digits[:point] + "." + digits[point:]
	}
}

// ReadElements reads elements.csv: a header `row,col,amplitude_db,phase_deg`
// then one element per line, row and column non-negative integers, each
// (row, col) at most once.
func ReadElements(r io.Reader, name string) ([]Element, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxFileBytes+1))
	if err != nil {
		return nil, Problemf(name, 0, "read error: %v", err)
	}
	return readElements(data, name)
}

func readElements(data []byte, name string) ([]Element, error) {
	lines := newCSVReader(data, name, nil)
	if ln := lines.peekLine(); ln != nil {
		lines.delim = detectDelimiter(ln)
	}
	header, hl, err := lines.next()
	if err == io.EOF {
		return nil, Problemf(name, 0, "file is empty; expected a header row,col,amplitude_db,phase_deg and one line per element")
	}
	if err != nil {
		return nil, err
	}
	header = append([]string(nil), header...)
	want := []string{"row", "col", "amplitude_db", "phase_deg"}
	if !sameFields(header, want) {
		return nil, Problemf(name, hl, "header %q; expected row,col,amplitude_db,phase_deg", strings.Join(header, ","))
	}
	var out []Element
	seen := map[[2]int]int{}
	for {
		fields, ln, err := lines.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(fields) != 4 {
			return nil, Problemf(name, ln, "%s in %q; expected 4: row,col,amplitude_db,phase_deg", countFields(len(fields)), strings.Join(fields, ","))
		}
		var e Element
		for i, p := range []*int{&e.Row, &e.Col} {
			n, err := strconv.Atoi(fields[i])
			if err != nil || n < 0 || n > 1<<20 {
				return nil, Problemf(name, ln, "%s %q is not a non-negative integer; expected an element index such as 0 or 15", want[i], fields[i])
			}
			*p = n
		}
		if e.AmplitudeDB, err = parseDecimal(fields[2]); err != nil {
			return nil, Problemf(name, ln, "amplitude_db %q: %v", fields[2], err)
		}
		if e.PhaseDeg, err = parseDecimal(fields[3]); err != nil {
			return nil, Problemf(name, ln, "phase_deg %q: %v", fields[3], err)
		}
		key := [2]int{e.Row, e.Col}
		if first, dup := seen[key]; dup {
			return nil, Problemf(name, ln, "element row %d col %d is already on line %d; expected each element once", e.Row, e.Col, first)
		}
		seen[key] = ln
		if len(out) >= MaxElements {
			return nil, Problemf(name, ln, "element %s is past the limit of an elements table; expected at most %s elements (see the README's limits)",
				groupDigits(int64(len(out)+1)), groupDigits(MaxElements))
		}
		out = append(out, e)
	}
	if len(out) == 0 {
		return nil, Problemf(name, hl, "header but no elements; expected at least one row,col,amplitude_db,phase_deg line")
	}
	return out, nil
}

func countFields(n int) string {
	if n == 1 {
		return "1 field"
	}
	return fmt.Sprintf("%d fields", n)
}

func sameFields(got, want []string) bool {
	if len(got) != len(want) {
		return false
	}
	for i := range got {
		if !strings.EqualFold(got[i], want[i]) {
			return false
		}
	}
	return true
}
