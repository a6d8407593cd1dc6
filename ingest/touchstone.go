package ingest

import (
	"errors"
	"io"
)

// ReadTouchstone reads a Touchstone file (version 1 or 2). name is the file's name as it should
// appear in errors; its extension (.sNp / .ts) gives the port count for version 1.
// Errors are *Problem with File and Line.
func ReadTouchstone(r io.Reader, name string) (*Network, error) {
	return nil, Problemf(name, 0, "Touchstone reader is not finished yet")
}

// NetworkJSON is the `gtpack inspect --json` form of the contract:
// {"ports": N, "frequency_hz": [...], "z0": [...], "s": [[[[re, im], ...]...]...]}
func NetworkJSON(n *Network) any {
	return nil
}

var errUnfinished = errors.New("unfinished")
