package render

import (
	"errors"
	"io"
	"strconv"

	"gtpack.example/gtpack/reduce"
)

// WriteFleetJSON writes fleet.json to w (fleetwire.go), one unit at a
// time so that the file of a large fleet is never held whole.
func WriteFleetJSON(w io.Writer, f *reduce.Fleet) error {
	if f == nil {
		return errors.New("render: FleetJSON of a nil fleet")
	}
	b := append(make([]byte, 0, 64<<10), "{\n  \"schema\": "...)
	b = strconv.AppendInt(b, FleetSchema, 10)
	b = append(b, ",\n  \"units\": ["...)
	var err error
	for i := range f.Units {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendNewline(b, 2)
		if b, err = appendIndented(b, fleetUnitToWire(f.Units[i]), 2, ""); err != nil {
			return err
		}
		if len(b) >= 48<<10 {
			if _, err := w.Write(b); err != nil {
				return err
			}
			b = b[:0]
		}
	}
	if len(f.Units) > 0 {
		b = appendNewline(b, 1)
	}
	b = append(b, ']')
	parts := []struct {
		name string
		v    any
	}{
		{"products", list(convert(f.Products, productFleetToWire))},
		{"stations", list(convert(f.Stations, rangeChartToWire))},
		{"references", list(convert(f.References, referenceHealthToWire))},
		{"check_units", list(convert(f.CheckUnits, checkUnitChartToWire))},
	}
	if len(f.Notices) > 0 {
		parts = append(parts, struct {
			name string
			v    any
		}{"notices", f.Notices})
	}
	for _, part := range parts {
		b = append(b, ",\n  \""...)
		b = append(b, part.name...)
		b = append(b, "\": "...)
		if b, err = appendIndented(b, part.v, 1, ""); err != nil {
			return err
		}
	}
	b = append(b, "\n}\n"...)
	_, err = w.Write(b)
	return err
}
