package ingest

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// padTo appends comment lines (prefix, then x's) to content until it is
// exactly size bytes, ending in a line feed.
func padTo(t *testing.T, content, prefix string, size int) string {
	t.Helper()
	var b strings.Builder
	b.WriteString(content)
	for b.Len() < size {
		n := min(4096, size-b.Len())
		if n < len(prefix)+1 {
			t.Fatalf("cannot pad to %d bytes: %d left", size, n)
		}
		if left := size - b.Len() - n; left > 0 && left < len(prefix)+1 {
			n -= len(prefix) + 1 // leave room for a whole last line
		}
		b.WriteString(prefix + strings.Repeat("x", n-len(prefix)-1) + "\n")
	}
	if b.Len() != size {
		t.Fatalf("padded to %d bytes, want %d", b.Len(), size)
	}
	return b.String()
}

// A data file of MaxFileBytes is read; one byte more is refused, at the
// run.yaml line that names it, and the run's other files are still read.
func TestLoadFileSizeLimit(t *testing.T) {
	for _, c := range []struct {
		size int
		want string // "" when the file is read
	}{
		{MaxFileBytes, ""},
		{MaxFileBytes + 1, "u/a/b00-noise.csv is 33,554,433 bytes; expected at most 33,554,432 bytes (a data file is read whole"},
	} {
		f := baseArchive(t)
		f["u/a/b00-noise.csv"] = padTo(t, f["u/a/b00-noise.csv"], "# padding ", c.size)
		a, err := Open(writeArchive(t, f))
		if err != nil || len(a.Problems) != 0 {
			t.Fatalf("open: %v %v", err, a.Problems)
		}
		d, probs := a.Load(a.Units[0].Runs[0])
		if c.want == "" {
			if len(probs) != 0 || d.Beams[0].Noise[0] == nil {
				t.Errorf("%d bytes: got %v, want the file read", c.size, probs)
			}
			continue
		}
		if len(probs) != 1 || probs[0].File != "u/a/run.yaml" || probs[0].Line != 16 || !strings.Contains(probs[0].Message, c.want) {
			t.Fatalf("%d bytes: got %v, want u/a/run.yaml:16 containing %q", c.size, probs, c.want)
		}
		if d.Beams[0].Noise[0] != nil || d.Beams[0].Transmission == nil || d.RangePre == nil {
			t.Errorf("the refused file must be nil and the others read: %+v", d)
		}
	}
}

// A YAML document of MaxDocumentBytes is parsed; one byte more is refused
// before it is read, naming the file.
func TestOpenDocumentSizeLimit(t *testing.T) {
	for _, size := range []int{MaxDocumentBytes, MaxDocumentBytes + 1} {
		f := baseArchive(t)
		f["u/a/run.yaml"] = padTo(t, f["u/a/run.yaml"], "# padding ", size)
		a, err := OpenLean(writeArchive(t, f))
		if err != nil {
			t.Fatal(err)
		}
		if size == MaxDocumentBytes {
			if len(a.Problems) != 0 || len(a.Units) != 1 || len(a.Units[0].Runs) != 1 {
				t.Errorf("%d bytes: %v, want the run", size, a.Problems)
			}
			continue
		}
		want := "file is 262,145 bytes; expected at most 262,144 bytes (a YAML document is parsed whole"
		if len(a.Problems) != 1 || a.Problems[0].File != "u/a/run.yaml" || !strings.Contains(a.Problems[0].Message, want) {
			t.Errorf("%d bytes: got %v, want u/a/run.yaml: %q", size, a.Problems, want)
		}
	}
}

// traceCSV is a trace of n points from 1 GHz, 1 kHz apart.
func traceCSV(n int) []byte {
	var b bytes.Buffer
	b.WriteString("frequency_hz,noise_dbm_hz\n")
	for k := 0; k < n; k++ {
		b.WriteString(strconv.Itoa(1_000_000_000 + 1000*k))
		b.WriteString(",-140\n")
	}
	return b.Bytes()
}

// touchstone1Port is a version-1 1-port file of n points from 1 GHz, 1 kHz
// apart, after two header lines.
func touchstone1Port(n int) []byte {
	var b bytes.Buffer
	b.WriteString("! demo data\n# Hz S RI R 50\n")
	for k := 0; k < n; k++ {
		b.WriteString(strconv.Itoa(1_000_000_000 + 1000*k))
		b.WriteString(" 0.1 0.2\n")
	}
	return b.Bytes()
}

// Every reader of a trace takes MaxTracePoints points and refuses the next
// at its line, where it stops; likewise the elements table at
// MaxElements.
func TestTracePointLimit(t *testing.T) {
	refTable := func(n int) []byte {
		var b bytes.Buffer
		b.WriteString("frequency_ghz,gain_dbi,uncertainty_db\n")
		for k := 0; k < n; k++ {
			fmt.Fprintf(&b, "%d.%06d,20,0.3\n", 1+k/1_000_000, k%1_000_000)
		}
		return b.Bytes()
	}
	elements := func(n int) []byte {
		var b bytes.Buffer
		b.WriteString("row,col,amplitude_db,phase_deg\n")
		for k := 0; k < n; k++ {
			fmt.Fprintf(&b, "%d,%d,0,0\n", k/128, k%128)
		}
		return b.Bytes()
	}
	els, err := ReadElements(bytes.NewReader(elements(MaxElements)), "elements.csv")
	if err != nil || len(els) != MaxElements {
		t.Errorf("elements at the limit: %d, %v", len(els), err)
	}
	_, err = ReadElements(bytes.NewReader(elements(MaxElements+1)), "elements.csv")
	if p, ok := err.(*Problem); !ok || p.Line != MaxElements+2 || !strings.Contains(p.Message, "element 16,385 is past the limit of an elements table; expected at most 16,384") {
		t.Errorf("elements one past the limit: got %v", err)
	}
	readers := []struct {
		name string
		make func(n int) []byte
		read func(data []byte) (int, error)
		line int // of point MaxTracePoints+1
	}{
		{"trace CSV", traceCSV, func(data []byte) (int, error) {
			tr, err := ReadTrace(bytes.NewReader(data), "t.csv")
			if err != nil {
				return 0, err
			}
			return len(tr.FrequencyHz), nil
		}, MaxTracePoints + 2},
		{"reference table", refTable, func(data []byte) (int, error) {
			tab, err := readReferenceTable(bytes.NewReader(data), "t.csv")
			return len(tab), err
		}, MaxTracePoints + 2},
		{"Touchstone", touchstone1Port, func(data []byte) (int, error) {
			n, err := ReadTouchstone(bytes.NewReader(data), "t.s1p")
			if err != nil {
				return 0, err
			}
			return len(n.FrequencyHz), nil
		}, MaxTracePoints + 3},
	}
	for _, r := range readers {
		t.Run(r.name, func(t *testing.T) {
			if n, err := r.read(r.make(MaxTracePoints)); err != nil || n != MaxTracePoints {
				t.Errorf("at the limit: %d points, %v; want %d", n, err, MaxTracePoints)
			}
			_, err := r.read(r.make(MaxTracePoints + 1))
			p, ok := err.(*Problem)
			if !ok || p.File != "t."+map[bool]string{true: "s1p", false: "csv"}[strings.HasPrefix(r.name, "Touchstone")] || p.Line != r.line ||
				!strings.Contains(p.Message, "point 100,002 is past the limit of a trace; expected at most 100,001 points") {
				t.Errorf("one past the limit: got %v, want line %d: point 100,002 is past the limit", err, r.line)
			}
		})
	}

	// A version-2 file that declares more points than a trace may have is
	// refused at the keyword, before its data.
	v2 := "[Version] 2.0\n# GHz S RI R 50\n[Number of Ports] 1\n[Number of Frequencies] 100002\n[Network Data]\n1 0 0\n"
	_, err = ReadTouchstone(strings.NewReader(v2), "t.ts")
	if p, ok := err.(*Problem); !ok || p.Line != 4 || !strings.Contains(p.Message, "[Number of Frequencies] 100,002 is past the limit") {
		t.Errorf("declared count: got %v, want t.ts:4 [Number of Frequencies] 100,002 is past the limit", err)
	}
}

// A Touchstone file holds at most MaxNetworkValues S-parameter values:
// 65,536 points of a 4-port file are read, the next is refused at its
// line.
func TestTouchstoneNetworkValueLimit(t *testing.T) {
	file := func(n int) []byte {
		var b bytes.Buffer
		b.WriteString("# Hz S RI R 50\n")
		pairs := strings.Repeat(" 0.1 0", 16)
		for k := 0; k < n; k++ {
			b.WriteString(strconv.Itoa(1_000_000_000 + 1000*k))
			b.WriteString(pairs + "\n")
		}
		return b.Bytes()
	}
	const atLimit = MaxNetworkValues / 16
	n, err := ReadTouchstone(bytes.NewReader(file(atLimit)), "t.s4p")
	if err != nil || len(n.FrequencyHz) != atLimit {
		t.Fatalf("at the limit: %v", err)
	}
	_, err = ReadTouchstone(bytes.NewReader(file(atLimit+1)), "t.s4p")
	want := "frequency point 65,537 of this 4-port file takes it past 1,048,576 S-parameter values"
	if p, ok := err.(*Problem); !ok || p.Line != atLimit+2 || !strings.Contains(p.Message, want) {
		t.Errorf("one past the limit: got %v, want line %d: %s", err, atLimit+2, want)
	}
}

// A run lists at most MaxRunBeams beams; the first beam past the limit is
// named at its line, and the run is refused.
func TestParseRunBeamLimit(t *testing.T) {
	run := func(beams int) []byte {
		var b bytes.Buffer
		b.WriteString("schema: 1\nserial: KT-0001\nproduct: KU-TEST\nstation: range-a\nreference: horn-01\n" +
			"started: 2026-11-01T14:00:00Z\noperator: CD\nambient_c: 23.5\nrange_reference:\n  pre: ref-pre.s2p\nbeams:\n")
		for k := 0; k < beams; k++ {
			fmt.Fprintf(&b, "  - id: b%03d\n    theta_deg: 0\n    transmission: b00.s2p\n    noise: {file: n.csv, quantity: noise-density-dbm-hz}\n", k)
		}
		return b.Bytes()
	}
	r, err := ParseRun(run(MaxRunBeams), "run.yaml")
	if err != nil || len(r.Beams) != MaxRunBeams {
		t.Fatalf("at the limit: %v", err)
	}
	_, err = ParseRun(run(MaxRunBeams+1), "run.yaml")
	ps := Problems(err)
	line := 12 + 4*MaxRunBeams // the beams start at line 12, four lines each
	want := fmt.Sprintf("run: beam %d of the %d listed from line 12 is past the limit of a run; expected at most %d beams", MaxRunBeams+1, MaxRunBeams+1, MaxRunBeams)
	if len(ps) != 1 || ps[0].File != "run.yaml" || ps[0].Line != line || !strings.Contains(ps[0].Message, want) {
		t.Errorf("one past the limit: got %v, want run.yaml:%d %s", ps, line, want)
	}
	// Far past the limit, the refusal is one problem, not one a beam.
	if ps := Problems(func() error { _, err := ParseRun(run(10*MaxRunBeams), "run.yaml"); return err }()); len(ps) != 1 {
		t.Errorf("ten times the limit: %d problems, want 1", len(ps))
	}
}

// The beams' transmissions of a run hold at most MaxRunBeamPoints points
// in all: the beam that passes the limit, and every beam after it, is
// refused at the run.yaml line of its transmission.
func TestLimitBeamPoints(t *testing.T) {
	mk := func(points ...int) (*Run, *RunData) {
		r := &Run{File: "u/a/run.yaml", KeyLines: map[string]int{}}
		d := &RunData{}
		for i, n := range points {
			r.Beams = append(r.Beams, Beam{ID: fmt.Sprintf("b%02d", i)})
			r.KeyLines[fmt.Sprintf("beams[%d].transmission", i)] = 100 + i
			d.Beams = append(d.Beams, BeamData{Transmission: &Transmission{File: fmt.Sprintf("u/a/b%02d.s2p", i), FrequencyHz: make([]float64, n)}})
		}
		return r, d
	}
	r, d := mk(MaxTracePoints, MaxRunBeamPoints-MaxTracePoints)
	if ps := LimitBeamPoints(r, d); len(ps) != 0 || d.Beams[1].Transmission == nil {
		t.Errorf("at the limit: %v", ps)
	}
	r, d = mk(MaxTracePoints, MaxRunBeamPoints-MaxTracePoints+1, 10)
	orig := d.Beams
	ps := LimitBeamPoints(r, d)
	want := "beams[1].transmission: u/a/b01.s2p (beam b01, 60,000 points) takes the run to 160,001 beam points; expected at most 160,000"
	if len(ps) != 2 || ps[0].File != "u/a/run.yaml" || ps[0].Line != 101 || !strings.Contains(ps[0].Message, want) || ps[1].Line != 102 {
		t.Fatalf("one past the limit: got %v, want u/a/run.yaml:101 %s, and line 102", ps, want)
	}
	if d.Beams[0].Transmission == nil || d.Beams[1].Transmission != nil || d.Beams[2].Transmission != nil {
		t.Errorf("beams 1 and 2 must be refused, beam 0 kept: %+v", d.Beams)
	}
	if orig[1].Transmission == nil {
		t.Error("the caller's beams were changed")
	}
}

// The data files of a run hold at most MaxRunLines lines in all: the file
// that would pass it is refused at the run.yaml line naming it, and its
// lines do not count; files read for anything else than a run do not
// count.
func TestRunLinesLimit(t *testing.T) {
	half := strings.Repeat("\n", MaxRunLines/2)
	root := writeArchive(t, map[string]string{"a.csv": half, "b.csv": half, "c.csv": "1\n2", "d.csv": "x\n"})
	fsys := newArchiveFS(root)
	for _, c := range []struct {
		file, from string
		want       string
	}{
		{"a.csv", "u/run.yaml", ""},
		{"a.csv", "", ""}, // not a run's: not counted
		{"b.csv", "u/run.yaml", ""},
		{"c.csv", "u/run.yaml", "c.csv would take the run's data files to 1,000,002 lines (this file has 2); expected at most 1,000,000 lines"},
		{"c.csv", "references/h.yaml", ""},
		{"d.csv", "u/run.yaml", "d.csv would take the run's data files to 1,000,001 lines"},
	} {
		_, _, p := fsys.read(c.file, c.from, 7)
		switch {
		case c.want == "" && p != nil:
			t.Errorf("%s from %q: %v, want it read", c.file, c.from, p)
		case c.want != "" && (p == nil || p.File != c.from || p.Line != 7 || !strings.Contains(p.Message, c.want)):
			t.Errorf("%s from %q: got %v, want %s:7 %s", c.file, c.from, p, c.from, c.want)
		}
	}
	if n := countLines([]byte("a\nb")); n != 2 {
		t.Errorf("countLines without a last line feed: %d, want 2", n)
	}
}

// inspect refuses a file past its size limit before reading it, and a
// trace past the point limit at its line.
func TestInspectLimits(t *testing.T) {
	dir := t.TempDir()
	big := filepath.Join(dir, "b00.s2p")
	f, err := os.Create(big)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(200_000_000); err != nil { // sparse: nothing is written
		t.Fatal(err)
	}
	f.Close()
	_, _, err = Inspect(big)
	if err == nil || !strings.Contains(err.Error(), "is 200,000,000 bytes; expected at most 33,554,432 bytes") {
		t.Errorf("a 200 MB file: got %v", err)
	}
	trace := filepath.Join(dir, "n.csv")
	if err := os.WriteFile(trace, traceCSV(MaxTracePoints+1), 0o644); err != nil {
		t.Fatal(err)
	}
	_, _, err = Inspect(trace)
	if p, ok := err.(*Problem); !ok || p.Line != MaxTracePoints+2 || !strings.Contains(p.Message, "point 100,002 is past the limit") {
		t.Errorf("a trace past the limit: got %v", err)
	}
}

func TestGroupDigits(t *testing.T) {
	for n, want := range map[int64]string{0: "0", 999: "999", 1000: "1,000", 33554432: "33,554,432", -1234567: "-1,234,567"} {
		if got := groupDigits(n); got != want {
			t.Errorf("groupDigits(%d) = %q, want %q", n, got, want)
		}
	}
}
