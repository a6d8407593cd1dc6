package ingest

import (
	"bytes"
	"errors"
	"fmt"
	"path"
	"strconv"
	"sync"
)

// The limits of what one input may hold. Past each, the input is refused
// with its file and line, and the build goes on with the other units: a
// build must stay within a few hundred megabytes whatever it is given
// (issue 13). Each figure was chosen by building an archive at the limit
// (testdata/scripts/bench-limits.sh, peak resident memory from
// /usr/bin/time -v on the project's 2-core machine with two workers, the
// default) so that the worst accepted archive stays under 250 MB, a
// margin below the 300 MB bound; the script's comment has the figures.
// The README states the limits for users.
const (
	// MaxFileBytes bounds a data file (Touchstone, trace CSV, elements,
	// notes, a reference's table file). The size is checked before the
	// file is read, since a file is read whole. A 2-port Touchstone file of
	// MaxTracePoints points written at full precision takes some 16 to 18
	// MB (the demo archive's files at 100,001 points); 32 MiB leaves room
	// for comments and wider numbers.
	MaxFileBytes = 32 << 20

	// MaxDocumentBytes bounds a YAML document (run.yaml, stations,
	// references, specs). The YAML parser holds the whole document as a
	// tree of some 200 bytes a value (measured: a 1 MiB list of one-digit
	// values took 100 MB, a 2.5 MB run.yaml of 10,000 beams 53 MB), and a
	// worker parses its run.yaml again while the other renders, so a
	// document is bounded much more tightly than a data file. A run of
	// MaxRunBeams beams, each with two noise entries, takes some 60 kB; a
	// reference table of 256 kB some 10,000 rows.
	MaxDocumentBytes = 256 << 10

	// MaxTracePoints bounds the frequency points of one trace: the
	// frequencies of a Touchstone file (and its noise block), the data
	// lines of a trace CSV, the rows of a reference table. General
	// knowledge, not a published figure: network analysers sweep at most
	// some tens of thousands of points, the largest about 100,001; an
	// acceptance sweep is usually 201 to 1,601. It also keeps every beam
	// sheet of a workbook far below the row limit of a sheet (1,048,576
	// rows, MaxSheetRows).
	MaxTracePoints = 100001

	// MaxNetworkValues bounds the S-parameter values of one Touchstone
	// file, ports squared times frequencies: the reader holds them all
	// (16 bytes each, so 16 MiB at the limit), and a value takes as little
	// as two bytes of text, so without this bound a file of MaxFileBytes
	// with many ports could ask for four times its size. 2^20 values: a
	// 2-port file of MaxTracePoints points (400,004 values), a 4-port file
	// of 65,536 points, a 16-port file of 4,096, a 32-port file of 1,024.
	MaxNetworkValues = 1 << 20

	// MaxRunBeams bounds the beams of one run. A unit workbook has a
	// sheet and a chart per beam, and the report a chart per beam, so a
	// beam costs memory beyond its points while the unit is written: two
	// units of 256 beams of 625 points (160,000 beam points each) built at
	// once peaked at 219-259 MB, where two of 16 beams of 10,000 points
	// took 161-163 MB and two of 128 beams of 1,250 points 169-182 MB.
	// General knowledge: an acceptance beam plan is some tens of beam
	// states.
	MaxRunBeams = 128

	// MaxRunBeamPoints bounds the sum over a run's beams of the points of
	// their transmission traces: the grid every reduced value, report
	// chart, workbook row and result.json list of the unit is on. A unit
	// takes some 430 bytes of memory a beam point while it is reduced and
	// written (its result.json alone some 160 bytes: 126 MB for 16 beams
	// of 50,001 points), and a build holds a unit's report, workbook and
	// result.json at once. 160,000 beam points: 16 beams of 10,000
	// points, 128 beams of 1,250; two such units built at once peaked at
	// 161-182 MB.
	MaxRunBeamPoints = 160000

	// MaxRunLines bounds the lines of all the data files one run reads
	// (each point of a trace takes at least a line, so it bounds the
	// points held while the run is loaded: some 24 bytes a point, 24 MB
	// at the limit), where the other limits would let 128 beams with
	// three traces of MaxTracePoints points each take 38 million.
	// 1,000,000 lines: 128 beams of 1,250 points with three traces each
	// are 480,000; 16 beams of 10,000 with three traces each and two range
	// references of 100,001 points are 680,000.
	MaxRunLines = 1000000

	// MaxElements bounds the rows of an elements table. A unit's element
	// state (the fit, the heat map in the report and result.json) takes
	// some 600 bytes of memory an element while it is written: one unit of
	// 16 beams of 801 points peaked at 39 MB with 256 elements, 90 MB with
	// 65,536, 339 MB with 490,000 (one worker). 16,384 elements (128 x
	// 128) add some 10 MB. General knowledge: a flat-panel terminal has
	// some hundreds to a few thousand elements.
	MaxElements = 16384

	// MaxSheetRows is the row limit of a worksheet: 1,048,576 rows
	// (Microsoft, "Excel specifications and limits": worksheet size
	// 1,048,576 rows by 16,384 columns; other spreadsheet applications
	// read no more).
	MaxSheetRows = 1048576

	// MaxCellChars is the most characters a cell holds: 32,767
	// (Microsoft, "Excel specifications and limits": total number of
	// characters that a cell can contain), counted as UTF-16 units.
	MaxCellChars = 32767
)

// tooLarge is the refusal of a file of size bytes over limit; why says what
// the limit is for.
func tooLarge(size, limit int64, why string) string {
	return fmt.Sprintf("is %s bytes; expected at most %s bytes (%s)", groupDigits(size), groupDigits(limit), why)
}

// sizeLimit is the size limit of the archive file rel, and what it is
// for.
func sizeLimit(rel string) (int64, string) {
	switch path.Ext(rel) {
	case ".yaml", ".yml":
		return MaxDocumentBytes, "a YAML document is parsed whole, at some 200 bytes of memory a value; see the README's limits"
	}
	return MaxFileBytes, "a data file is read whole; see the README's limits"
}

// readBounded reads the file at full (the archive file rel) unless it is
// larger than its size limit (sizeLimit): the size is checked before the
// file is read, and the read stops past the limit, should the file grow
// meanwhile. The string is the reason it is refused, "" when it is read.
func readBounded(full, rel string) ([]byte, string) {
	data, _, why := readStableLimited(full, rel)
	return data, why
}

// readStableLimited is readStable under the size limit of rel, with the
// reason of a refusal as the archive's problems give it ("" when read).
func readStableLimited(full, rel string) ([]byte, FileStat, string) {
	limit, why := sizeLimit(rel)
	data, st, err := readStable(full, limit)
	var big *tooLargeError
	switch {
	case errors.As(err, &big):
		return nil, FileStat{}, tooLarge(big.size, limit, why)
	case err != nil:
		return nil, FileStat{}, fmt.Sprintf("cannot be read (%v)", err)
	}
	return data, st, ""
}

// tooLargeError is a file past its size limit, found before or while it
// was read.
type tooLargeError struct{ size int64 }

func (e *tooLargeError) Error() string { return fmt.Sprintf("%d bytes, past the limit", e.size) }

// pointLimit is the problem of a trace whose point n (1-based) is past
// MaxTracePoints, at line; what names the point ("point", "frequency
// point", "noise point") or the keyword that declares n points. The
// readers stop there.
func pointLimit(name string, line, n int, what string) *Problem {
	return Problemf(name, line, "%s %s is past the limit of a trace; expected at most %s points (about the most a network analyser sweeps; see the README's limits)",
		what, groupDigits(int64(n)), groupDigits(MaxTracePoints))
}

// runLines counts the lines of the data files one run reads (a run's
// archiveFS is made by Load, one for each run): MaxRunLines bounds them.
type runLines struct {
	mu sync.Mutex
	n  int64
}

// take adds the lines of data, a data file of the run, and returns the
// reason to refuse the file, or "" when the run stays within MaxRunLines.
func (c *runLines) take(data []byte) string {
	lines := int64(countLines(data))
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.n+lines > MaxRunLines {
		// A refused file's lines are not held: they do not count.
		return fmt.Sprintf("would take the run's data files to %s lines (this file has %s); expected at most %s lines in all the data files of a run (each point is a line, and the points are held while the run is reduced; see the README's limits)",
			groupDigits(c.n+lines), groupDigits(lines), groupDigits(MaxRunLines))
	}
	c.n += lines
	return ""
}

// countLines is the number of lines of data: its line feeds, and one more
// for a last line without one.
func countLines(data []byte) int {
	n := bytes.Count(data, []byte{'\n'})
	if len(data) > 0 && data[len(data)-1] != '\n' {
		n++
	}
	return n
}

// LimitBeamPoints refuses the transmissions of the beams of r from the one
// that takes the run past MaxRunBeamPoints on: each is set to nil in d (so
// that the beam is reduced as one whose file was refused) with a problem
// at the run.yaml line that names it. It returns those problems; d is
// changed in place, its Beams slice copied first so that a caller's copy
// of d stays whole.
func LimitBeamPoints(r *Run, d *RunData) []*Problem {
	if r == nil || d == nil {
		return nil
	}
	total := 0
	var probs []*Problem
	copied := false
	for i := range d.Beams {
		t := d.Beams[i].Transmission
		if t == nil {
			continue
		}
		total += len(t.FrequencyHz)
		if total <= MaxRunBeamPoints && !copied {
			continue
		}
		if !copied {
			d.Beams = append([]BeamData(nil), d.Beams...)
			copied = true
		}
		key := fmt.Sprintf("beams[%d].transmission", i)
		id := ""
		if i < len(r.Beams) {
			id = r.Beams[i].ID
		}
		probs = append(probs, Problemf(r.File, r.KeyLines[key], "%s: %s (beam %s, %s points) takes the run to %s beam points; expected at most %s points over all the beams' transmissions of a run (each is reduced, charted and written; see the README's limits): this beam is not reduced",
			key, t.File, id, groupDigits(int64(len(t.FrequencyHz))), groupDigits(int64(total)), groupDigits(MaxRunBeamPoints)))
		d.Beams[i].Transmission = nil
	}
	return probs
}

// groupDigits writes n with a comma between groups of three digits.
func groupDigits(n int64) string {
	s := strconv.FormatInt(n, 10)
	neg := ""
	if n < 0 {
		neg, s = "-", s[1:]
	}
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return neg + s
}
