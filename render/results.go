package render

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"reflect"
	"sort"
	"strconv"
	"strings"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// The machine-readable outputs: result.json, fleet.json and results.csv.
//
// A number that is not finite (NaN, +Inf, -Inf) has no JSON form. Rather
// than refuse a whole unit for one bad point, it is written as null, and
// the parsers read null back as NaN where the field is a float64. The CSV
// and the workbooks leave such a value empty.

// ResultJSON returns result.json of a unit: indented, fields in the order
// of reduce.Unit, a trailing newline. Empty lists are written as [] (not
// null), so that readers can take the length of any list the contract
// names.
func ResultJSON(u *reduce.Unit) ([]byte, error) {
	if u == nil {
		return nil, errors.New("render: ResultJSON of a nil unit")
	}
	return encodeIndented(u)
}

// FleetJSON returns fleet.json: the same encoding as ResultJSON.
func FleetJSON(f *reduce.Fleet) ([]byte, error) {
	if f == nil {
		return nil, errors.New("render: FleetJSON of a nil fleet")
	}
	return encodeIndented(f)
}

// ParseResultJSON reads a result.json written by ResultJSON, as `gtpack
// index` does to rebuild the fleet pages from a site. It checks the schema
// and that every per-frequency list of a beam has one value per frequency,
// so that a hand-edited file cannot make a renderer index out of range.
func ParseResultJSON(data []byte) (*reduce.Unit, error) {
	const file = "result.json"
	u := new(reduce.Unit)
	if err := decodeWithNaN(file, data, u); err != nil {
		return nil, err
	}
	if u.Schema != reduce.ResultSchema {
		return nil, ingest.Problemf(file, 0, "schema %d, expected %d", u.Schema, reduce.ResultSchema)
	}
	if u.Serial == "" {
		return nil, ingest.Problemf(file, 0, "serial is empty, expected the unit's serial number")
	}
	for i := range u.Beams {
		b := &u.Beams[i]
		expandBudget(&b.GainBudget, len(b.FrequencyHz), b.GainExpandedUncertaintyDB)
		expandBudget(&b.GTBudget, len(b.FrequencyHz), b.GTExpandedUncertaintyDB)
		if err := checkBeamLengths(&u.Beams[i]); err != nil {
			return nil, ingest.Problemf(file, 0, "beams[%d] (%q): %v", i, u.Beams[i].ID, err)
		}
		restoreBudgetValues(&u.Beams[i].GainBudget)
		restoreBudgetValues(&u.Beams[i].GTBudget)
	}
	if err := checkUnitShapes(u); err != nil {
		return nil, ingest.Problemf(file, 0, "%v", err)
	}
	return u, nil
}

// expandBudget undoes the short form of a budget in result.json: a term
// written as one constant_standard_db gets it at each of the n frequencies,
// and the expanded uncertainty is the beam's list (the same one in reduce).
func expandBudget(b *reduce.Budget, n int, expanded []float64) {
	for i := range b.Terms {
		t := &b.Terms[i]
		if t.ConstantStandardDB == nil {
			continue
		}
		t.StandardDB = make([]float64, n)
		for k := range t.StandardDB {
			t.StandardDB[k] = *t.ConstantStandardDB
		}
		t.ConstantStandardDB = nil
	}
	if len(b.Terms) > 0 || len(b.CombinedDB) > 0 {
		b.ExpandedDB = expanded
	}
}

// shortBudgetTerm is the form result.json writes a budget term in: a
// StandardDB that holds one finite value at every frequency becomes
// ConstantStandardDB.
func shortBudgetTerm(t reduce.BudgetTerm) reduce.BudgetTerm {
	if len(t.StandardDB) == 0 {
		return t
	}
	x := t.StandardDB[0]
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return t
	}
	for _, y := range t.StandardDB[1:] {
		if y != x {
			return t
		}
	}
	t.ConstantStandardDB, t.StandardDB = &x, nil
	return t
}

// restoreBudgetValues fills each term's stated values, which result.json
// leaves out because they follow from what it keeps: reduce makes
// StandardDB = |ValueDB| / Divisor, so ValueDB = StandardDB * Divisor (the
// stated values are magnitudes, never negative).
func restoreBudgetValues(b *reduce.Budget) {
	for i := range b.Terms {
		t := &b.Terms[i]
		if t.StandardDB == nil {
			continue
		}
		t.ValueDB = make([]float64, len(t.StandardDB))
		for k, s := range t.StandardDB {
			t.ValueDB[k] = s * t.Divisor
		}
	}
}

// checkUnitShapes verifies the scan and element lists against their own
// sizes.
func checkUnitShapes(u *reduce.Unit) error {
	if s := u.Scan; s != nil {
		n := len(s.FrequencyHz)
		if len(s.ExponentN) != 0 && len(s.ExponentN) != n {
			return fmt.Errorf("scan.exponent_n has %d values, expected %d (one per frequency)", len(s.ExponentN), n)
		}
		for i, b := range s.Beams {
			if len(b.ScanLossDB) != 0 && len(b.ScanLossDB) != n {
				return fmt.Errorf("scan.beams[%d].scan_loss_db has %d values, expected %d", i, len(b.ScanLossDB), n)
			}
		}
	}
	if e := u.Elements; e != nil {
		if e.Rows < 0 || e.Cols < 0 || len(e.ResidualPhaseDeg) != e.Rows || len(e.Present) != e.Rows {
			return fmt.Errorf("elements: %d phase rows and %d presence rows, expected %d", len(e.ResidualPhaseDeg), len(e.Present), e.Rows)
		}
		for r := 0; r < e.Rows; r++ {
			if len(e.ResidualPhaseDeg[r]) != e.Cols || len(e.Present[r]) != e.Cols {
				return fmt.Errorf("elements: row %d has %d/%d columns, expected %d", r, len(e.ResidualPhaseDeg[r]), len(e.Present[r]), e.Cols)
			}
		}
	}
	return nil
}

// checkBeamLengths verifies that the beam's per-frequency lists
// (beamQuantities) are either absent or as long as its frequency list.
func checkBeamLengths(b *reduce.Beam) error {
	n := len(b.FrequencyHz)
	for i := range beamQuantities {
		q := &beamQuantities[i]
		v := q.get(b)
		if len(v) == 0 && (q.optional || n == 0) {
			continue
		}
		if len(v) != n {
			return fmt.Errorf("%s has %d values, expected %d (one per frequency)", q.key, len(v), n)
		}
	}
	if err := checkBudgetLengths(&b.GainBudget, n); err != nil {
		return fmt.Errorf("gain_budget: %v", err)
	}
	if err := checkBudgetLengths(&b.GTBudget, n); err != nil {
		return fmt.Errorf("gt_budget: %v", err)
	}
	for i, c := range b.LimitCurves {
		if c.Start < 0 || c.Start+len(c.LimitDB) > n {
			return fmt.Errorf("limit_curves[%d] covers points %d..%d, expected within 0..%d", i, c.Start, c.Start+len(c.LimitDB)-1, n-1)
		}
	}
	return nil
}

func checkBudgetLengths(b *reduce.Budget, n int) error {
	for _, l := range [][]float64{b.CombinedDB, b.ExpandedDB} {
		if len(l) != 0 && len(l) != n {
			return fmt.Errorf("%d combined/expanded values, expected %d", len(l), n)
		}
	}
	for _, t := range b.Terms {
		if (len(t.ValueDB) != 0 && len(t.ValueDB) != n) || (len(t.StandardDB) != 0 && len(t.StandardDB) != n) {
			return fmt.Errorf("term %q has %d/%d values, expected %d", t.Name, len(t.ValueDB), len(t.StandardDB), n)
		}
	}
	return nil
}

// encodeIndented writes v as JSON indented by two spaces per level (the
// layout of json.MarshalIndent(v, "", "  ")), except that a list of
// numbers or booleans stands on one line with its items separated by a
// comma alone (a space after each was 9 % of a unit's file), and with
// a final newline;
// numbers are rounded as appendJSONFloat says, non-finite floats become
// null.
func encodeIndented(v any) ([]byte, error) {
	// A result.json of 16 beams is some 4 MB, nearly all of it lists of
	// numbers: growing the buffer to that size by doubling cost more than
	// the encoding, so it starts at a size that holds them.
	rv := reflect.ValueOf(v)
	b, err := appendJSON(make([]byte, 0, jsonSizeHint(rv)), rv, 0)
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}

// jsonFloatSize is the room a float of a list takes on average, with its
// separator and a share of the indentation: 8.8 bytes in a result.json of
// the sample archive, some 9.5 in the test fixtures; 10 so that the
// buffer does not have to grow.
const jsonFloatSize = 10

// jsonSizeHint is the room for the lists of floats that appendJSON writes
// of v (fields it leaves out and budget terms in their short form are not
// counted; the walk through pointers, lists and structs stops 16 levels
// deep), plus 64 kB for the rest.
func jsonSizeHint(v reflect.Value) int {
	n := 0
	var walk func(v reflect.Value, depth int)
	walk = func(v reflect.Value, depth int) {
		if depth > 16 {
			return
		}
		switch v.Kind() {
		case reflect.Pointer, reflect.Interface:
			if !v.IsNil() {
				walk(v.Elem(), depth+1)
			}
		case reflect.Struct:
			if v.Type() == budgetTermType {
				v = reflect.ValueOf(shortBudgetTerm(v.Interface().(reduce.BudgetTerm)))
			}
			t := v.Type()
			for i := 0; i < v.NumField(); i++ {
				if _, _, skip := jsonField(t.Field(i)); !skip && t.Field(i).IsExported() {
					walk(v.Field(i), depth+1)
				}
			}
		case reflect.Slice, reflect.Array:
			switch v.Type().Elem().Kind() {
			case reflect.Float64, reflect.Float32:
				n += v.Len()
			case reflect.Struct, reflect.Pointer, reflect.Slice, reflect.Array, reflect.Interface, reflect.Map:
				for i := 0; i < v.Len(); i++ {
					walk(v.Index(i), depth+1)
				}
			}
		case reflect.Map:
			if k := v.Type().Elem().Kind(); k == reflect.Struct || k == reflect.Pointer || k == reflect.Slice {
				it := v.MapRange()
				for it.Next() {
					walk(it.Value(), depth+1)
				}
			}
		}
	}
	walk(v, 0)
	return n*jsonFloatSize + 64<<10
}

// appendNewline starts a new line indented to depth.
func appendNewline(b []byte, depth int) []byte {
	b = append(b, '\n')
	for i := 0; i < depth; i++ {
		b = append(b, ' ', ' ')
	}
	return b
}

var (
	jsonMarshaler    = reflect.TypeFor[json.Marshaler]()
	float64SliceType = reflect.TypeFor[[]float64]()
	budgetTermType   = reflect.TypeFor[reduce.BudgetTerm]()
)

// appendJSON encodes like encoding/json (field names and omitempty from
// the json tags, map keys sorted), indented at depth, except that a
// non-finite float is null, a nil slice or map outside omitempty is an
// empty list or object, a list of scalars (numbers, booleans) is written
// on one line, and floats are rounded (appendJSONFloat).
func appendJSON(b []byte, v reflect.Value, depth int) ([]byte, error) {
	// A type with its own JSON form (none in the model today) keeps it.
	if k := v.Kind(); (k == reflect.Struct || k == reflect.Pointer && !v.IsNil()) && v.Type().Implements(jsonMarshaler) {
		raw, err := json.Marshal(v.Interface())
		if err != nil {
			return nil, err
		}
		var out bytes.Buffer
		if err := json.Indent(&out, raw, strings.Repeat("  ", depth), "  "); err != nil {
			return nil, err
		}
		return append(b, out.Bytes()...), nil
	}
	switch v.Kind() {
	case reflect.Invalid:
		return append(b, "null"...), nil
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			return append(b, "null"...), nil
		}
		return appendJSON(b, v.Elem(), depth)
	case reflect.Struct:
		if v.Type() == budgetTermType {
			v = reflect.ValueOf(shortBudgetTerm(v.Interface().(reduce.BudgetTerm)))
		}
		b = append(b, '{')
		first := true
		t := v.Type()
		for i := 0; i < t.NumField(); i++ {
			sf := t.Field(i)
			if !sf.IsExported() {
				continue
			}
			name, omitEmpty, skip := jsonField(sf)
			if skip {
				continue
			}
			fv := v.Field(i)
			if omitEmpty && isEmptyValue(fv) {
				continue
			}
			if !first {
				b = append(b, ',')
			}
			first = false
			b = appendNewline(b, depth+1)
			b = appendJSONString(b, name)
			b = append(b, ':', ' ')
			var err error
			if b, err = appendJSON(b, fv, depth+1); err != nil {
				return nil, err
			}
		}
		if !first {
			b = appendNewline(b, depth)
		}
		return append(b, '}'), nil
	case reflect.Slice, reflect.Array:
		if v.Kind() == reflect.Slice && v.Type().Elem().Kind() == reflect.Uint8 {
			return nil, fmt.Errorf("render: byte slices are not part of the result model")
		}
		if v.Type() == float64SliceType {
			// The bulk of a result: per-frequency lists, without reflection.
			return appendFloatList(b, v.Interface().([]float64)), nil
		}
		if isScalarKind(v.Type().Elem().Kind()) {
			b = append(b, '[')
			for i := 0; i < v.Len(); i++ {
				if i > 0 {
					b = append(b, ',')
				}
				var err error
				if b, err = appendJSON(b, v.Index(i), depth+1); err != nil {
					return nil, err
				}
			}
			return append(b, ']'), nil
		}
		b = append(b, '[')
		for i := 0; i < v.Len(); i++ {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendNewline(b, depth+1)
			var err error
			if b, err = appendJSON(b, v.Index(i), depth+1); err != nil {
				return nil, err
			}
		}
		if v.Len() > 0 {
			b = appendNewline(b, depth)
		}
		return append(b, ']'), nil
	case reflect.Map:
		if v.Type().Key().Kind() != reflect.String {
			return nil, fmt.Errorf("render: map key type %s is not a string", v.Type().Key())
		}
		keys := make([]string, 0, v.Len())
		for _, k := range v.MapKeys() {
			keys = append(keys, k.String())
		}
		sort.Strings(keys)
		b = append(b, '{')
		for i, k := range keys {
			if i > 0 {
				b = append(b, ',')
			}
			b = appendNewline(b, depth+1)
			b = appendJSONString(b, k)
			b = append(b, ':', ' ')
			var err error
			if b, err = appendJSON(b, v.MapIndex(reflect.ValueOf(k).Convert(v.Type().Key())), depth+1); err != nil {
				return nil, err
			}
		}
		if len(keys) > 0 {
			b = appendNewline(b, depth)
		}
		return append(b, '}'), nil
	case reflect.String:
		return appendJSONString(b, v.String()), nil
	case reflect.Bool:
		return strconv.AppendBool(b, v.Bool()), nil
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return strconv.AppendInt(b, v.Int(), 10), nil
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return strconv.AppendUint(b, v.Uint(), 10), nil
	case reflect.Float32, reflect.Float64:
		return appendJSONFloat(b, v.Float()), nil
	}
	return nil, fmt.Errorf("render: cannot encode %s as JSON", v.Type())
}

// isScalarKind says whether a list of this kind is written on one line.
func isScalarKind(k reflect.Kind) bool {
	switch k {
	case reflect.Bool, reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Float32, reflect.Float64:
		return true
	}
	return false
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

// jsonField reads a struct field's json tag.
func jsonField(sf reflect.StructField) (name string, omitEmpty, skip bool) {
	tag := sf.Tag.Get("json")
	if tag == "-" {
		return "", false, true
	}
	name, opts, _ := strings.Cut(tag, ",")
	if name == "" {
		name = sf.Name
	}
	for _, o := range strings.Split(opts, ",") {
		if o == "omitempty" {
			omitEmpty = true
		}
	}
	return name, omitEmpty, false
}

// isEmptyValue is encoding/json's definition of empty for omitempty.
func isEmptyValue(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Array, reflect.Map, reflect.Slice, reflect.String:
		return v.Len() == 0
	case reflect.Bool, reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64,
		reflect.Float32, reflect.Float64, reflect.Interface, reflect.Pointer:
		return v.IsZero()
	}
	return false
}

func appendJSONString(b []byte, s string) []byte {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c >= 0x7f || c == '"' || c == '\\' || c == '<' || c == '>' || c == '&' {
			q, _ := json.Marshal(s) // a string always marshals; HTML characters are escaped
			return append(b, q...)
		}
	}
	b = append(b, '"')
	b = append(b, s...)
	return append(b, '"')
}

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

// decodeWithNaN unmarshals data into v and then sets every float64 that
// the JSON held as null to NaN (encoding/json leaves it zero).
func decodeWithNaN(file string, data []byte, v any) error {
	if err := json.Unmarshal(data, v); err != nil {
		return jsonProblem(file, data, err)
	}
	var tree any
	if err := json.Unmarshal(data, &tree); err != nil {
		return jsonProblem(file, data, err)
	}
	restoreNaN(tree, reflect.ValueOf(v).Elem())
	return nil
}

// jsonProblem turns a decoding error into a *ingest.Problem with the line.
func jsonProblem(file string, data []byte, err error) error {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		return ingest.Problemf(file, lineOf(data, se.Offset), "%v; expected JSON", se)
	case errors.As(err, &te):
		return ingest.Problemf(file, lineOf(data, te.Offset), "field %s holds a JSON %s, expected %s", te.Field, te.Value, te.Type)
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

// restoreNaN walks the generic JSON tree beside the decoded value.
func restoreNaN(tree any, v reflect.Value) {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if tree == nil && v.CanSet() {
			v.SetFloat(math.NaN())
		}
	case reflect.Pointer:
		if !v.IsNil() {
			restoreNaN(tree, v.Elem())
		}
	case reflect.Struct:
		obj, ok := tree.(map[string]any)
		if !ok {
			return
		}
		t := v.Type()
		for i := 0; i < t.NumField(); i++ {
			sf := t.Field(i)
			if !sf.IsExported() {
				continue
			}
			name, _, skip := jsonField(sf)
			if skip {
				continue
			}
			if sub, present := obj[name]; present {
				restoreNaN(sub, v.Field(i))
			}
		}
	case reflect.Slice, reflect.Array:
		arr, ok := tree.([]any)
		if !ok {
			return
		}
		for i := 0; i < v.Len() && i < len(arr); i++ {
			restoreNaN(arr[i], v.Index(i))
		}
	}
}
