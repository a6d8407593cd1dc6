package render

import (
	"errors"
	"io"
	"reflect"
	"strconv"

	"gtpack.example/gtpack/reduce"
)

// WriteFleetJSON writes fleet.json to w: the bytes of FleetJSON, written
// one unit at a time so that the file of a large fleet is never held
// whole.
func WriteFleetJSON(w io.Writer, f *reduce.Fleet) error {
	if f == nil {
		return errors.New("render: FleetJSON of a nil fleet")
	}
	// The layout of appendJSON for reduce.Fleet's fields (notices only when there are any).
	b := append(make([]byte, 0, 64<<10), '{')
	b = appendNewline(b, 1)
	b = appendJSONString(b, "schema")
	b = append(b, ':', ' ')
	b = strconv.AppendInt(b, int64(f.Schema), 10)
	b = append(b, ',')
	b = appendNewline(b, 1)
	b = appendJSONString(b, "units")
	b = append(b, ':', ' ', '[')
	var err error
	for i := range f.Units {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendNewline(b, 2)
		if b, err = appendJSON(b, reflect.ValueOf(&f.Units[i]), 2); err != nil {
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
	b = append(b, ']', ',')
	b = appendNewline(b, 1)
	b = appendJSONString(b, "products")
	b = append(b, ':', ' ')
	if b, err = appendJSON(b, reflect.ValueOf(f.Products), 1); err != nil {
		return err
	}
	for _, part := range []struct {
		name string
		v    any
	}{{"stations", f.Stations}, {"references", f.References}, {"check_units", f.CheckUnits}} {
		b = append(b, ',')
		b = appendNewline(b, 1)
		b = appendJSONString(b, part.name)
		b = append(b, ':', ' ')
		if b, err = appendJSON(b, reflect.ValueOf(part.v), 1); err != nil {
			return err
		}
	}
	if len(f.Notices) > 0 {
		b = append(b, ',')
		b = appendNewline(b, 1)
		b = appendJSONString(b, "notices")
		b = append(b, ':', ' ')
		if b, err = appendJSON(b, reflect.ValueOf(f.Notices), 1); err != nil {
			return err
		}
	}
	b = appendNewline(b, 0)
	b = append(b, '}', '\n')
	_, err = w.Write(b)
	return err
}
