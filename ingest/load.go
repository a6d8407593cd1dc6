package ingest

import (
	"bytes"
	"fmt"
	"math"
	"math/cmplx"
	"path"
	"sort"
	"strings"
	"unicode/utf8"
)

// Load reads every data file of r: the range reference measurements, each
// beam's transmission and noise traces, the elements table and the notes,
// and lists every input (run.yaml, data files, station, reference and its
// table file, spec) with its size, SHA-256 and stat. Each data file is
// read once, and hashed and parsed from the same bytes; the run.yaml and
// the shared documents are not read again (their inputs are those of the
// bytes discovery parsed, Run.Source and Archive.Documents), so the
// inputs listed are always the bytes the reduction used, even when a file
// changes during the build. It never stops at the first
// problem: a refused file leaves a nil entry and a problem, and all other
// files are still read. The returned RunData is never nil.
//
// A refused path (outside the archive, missing, a link out) is reported at
// the run.yaml line that names it; a refused content at the data file's
// own line. Problems already reported by Open (an unknown station,
// reference or spec) are not repeated.
//
// Transmission files ending in .csv are trace CSVs whose value column is
// the transmission in dB (AntennaMatch nil); any other file is Touchstone,
// which must have at least 2 ports. The parameter is the run's
// range_reference.parameter (S21 by default) for every transmission file
// of the run; for a 2-port file AntennaMatch is |S_ii| of the receiving
// port i of S_ij (|S22| for S21).
//
// Load only reads the archive and a, so several goroutines may call it at
// once.
func (a *Archive) Load(r *Run) (*RunData, []*Problem) {
	if r.lean {
		return nil, []*Problem{Problemf(r.File, 0, "internal: this run was discovered without its beams (OpenLean); expected the whole run from Archive.Full")}
	}
	l := &loader{fs: newArchiveFS(a.Root), run: r, inputs: map[string]InputFile{}}
	d := &RunData{Beams: make([]BeamData, len(r.Beams))}

	// The run.yaml and the shared documents are not read again: their
	// inputs are the bytes that were parsed.
	for _, doc := range RunDocuments(a, r) {
		if doc == r.File {
			l.inputs[doc] = r.Source
		} else {
			l.inputs[doc] = a.Documents[doc]
		}
	}

	if r.RangePre != "" {
		d.RangePre = l.transmission(r.RangePre, "range_reference.pre")
	}
	if r.RangePost != "" {
		d.RangePost = l.transmission(r.RangePost, "range_reference.post")
	}
	for i, b := range r.Beams {
		key := fmt.Sprintf("beams[%d]", i)
		if b.Transmission != "" {
			d.Beams[i].Transmission = l.transmission(b.Transmission, key+".transmission")
		}
		d.Beams[i].Noise = make([]*Trace, len(b.Noise))
		for k, n := range b.Noise {
			data, ok := l.read(n.File, fmt.Sprintf("%s.noise[%d].file", key, k))
			if !ok {
				continue
			}
			t, err := ReadTrace(bytes.NewReader(data), n.File)
			if err != nil {
				l.problems = append(l.problems, Problems(err)...)
				continue
			}
			d.Beams[i].Noise[k] = t
		}
	}
	if r.Elements != "" {
		if data, ok := l.read(r.Elements, "elements"); ok {
			els, err := ReadElements(bytes.NewReader(data), r.Elements)
			if err != nil {
				l.problems = append(l.problems, Problems(err)...)
			} else {
				d.Elements = els
			}
		}
	}
	if r.Notes != "" {
		if data, ok := l.read(r.Notes, "notes"); ok {
			if !utf8.Valid(data) {
				l.problems = append(l.problems, Problemf(r.Notes, 0, "notes are not UTF-8 text; expected a Markdown file"))
			} else {
				d.Notes = strings.TrimPrefix(string(data), "\ufeff")
			}
		}
	}

	for _, in := range l.inputs {
		d.Inputs = append(d.Inputs, in)
	}
	sort.Slice(d.Inputs, func(i, j int) bool { return d.Inputs[i].Path < d.Inputs[j].Path })
	for p := range l.absent {
		d.Absent = append(d.Absent, p)
	}
	sort.Strings(d.Absent)
	return d, SortProblems(l.problems)
}

type loader struct {
	fs       *archiveFS
	run      *Run
	inputs   map[string]InputFile
	absent   map[string]bool
	problems []*Problem
}

// read returns a data file named by the run.yaml key, and lists it among
// the inputs (or the absent files).
func (l *loader) read(rel, key string) ([]byte, bool) {
	data, in, p := l.fs.read(rel, l.run.File, l.run.KeyLines[key])
	if p != nil {
		p.Message = key + ": " + p.Message
		l.problems = append(l.problems, p)
		if l.absent == nil {
			l.absent = map[string]bool{}
		}
		l.absent[rel] = true
		return nil, false
	}
	l.inputs[rel] = in
	return data, true
}

func (l *loader) transmission(rel, key string) *Transmission {
	data, ok := l.read(rel, key)
	if !ok {
		return nil
	}
	if strings.EqualFold(path.Ext(rel), ".csv") {
		t, err := ReadTrace(bytes.NewReader(data), rel)
		if err != nil {
			l.problems = append(l.problems, Problems(err)...)
			return nil
		}
		return &Transmission{File: rel, FrequencyHz: t.FrequencyHz, ParameterDB: t.Values}
	}
	n, err := ReadTouchstone(bytes.NewReader(data), rel)
	if err != nil {
		l.problems = append(l.problems, Problems(err)...)
		return nil
	}
	line := l.run.KeyLines[key]
	if n.Ports < 2 {
		l.problems = append(l.problems, Problemf(l.run.File, line, "%s: %s has %d port; expected a transmission file with at least 2 ports (it must hold %s)", key, rel, n.Ports, l.run.RangeParameter))
		return nil
	}
	param := l.run.RangeParameter
	if param == "" {
		param = "S21"
	}
	i, j, ok := sParameterPorts(param)
	if !ok || i > n.Ports || j > n.Ports {
		l.problems = append(l.problems, Problemf(l.run.File, line, "%s: %s has %d ports, so it holds no %s; expected a file with that parameter", key, rel, n.Ports, param))
		return nil
	}
	t := &Transmission{File: rel, FrequencyHz: append([]float64(nil), n.FrequencyHz...), ParameterDB: make([]float64, len(n.FrequencyHz))}
	for k := range n.FrequencyHz {
		m := cmplx.Abs(n.At(k, i-1, j-1))
		if !(m > 0) || math.IsInf(m, 0) {
			l.problems = append(l.problems, Problemf(rel, 0, "%s is %v at %g Hz; expected a measured, non-zero transmission", param, m, n.FrequencyHz[k]))
			return nil
		}
		t.ParameterDB[k] = 20 * math.Log10(m)
	}
	if n.Ports == 2 {
		t.AntennaMatch = make([]float64, len(n.FrequencyHz))
		for k := range n.FrequencyHz {
			t.AntennaMatch[k] = cmplx.Abs(n.At(k, i-1, i-1))
		}
	}
	return t
}
