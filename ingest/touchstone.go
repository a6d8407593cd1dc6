package ingest

import (
	"errors"
	"io"

	"gtpack.example/gtpack/ingest/touchstone"
)

// ReadTouchstone reads a Touchstone file (version 1 or 2) under the limits
// of a build (MaxTracePoints, MaxNetworkValues). name is the file's name
// as it should appear in errors; its extension (.sNp / .ts) gives the
// port count for version 1. Errors are *Problem with File and Line.
func ReadTouchstone(r io.Reader, name string) (*touchstone.Network, error) {
	n, err := touchstone.Read(r, name, touchstone.Limits{Points: MaxTracePoints, Values: MaxNetworkValues})
	if err != nil {
		var e *touchstone.Error
		if errors.As(err, &e) {
			return nil, Problemf(name, e.Line, "%s", e.Msg)
		}
		return nil, Problemf(name, 0, "%v", err)
	}
	return n, nil
}
