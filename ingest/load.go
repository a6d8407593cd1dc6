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
	l := &loader{fs: newArchiveFS(a.Root), run: r, inputs: map[string]InputFile{}, station: a.Stations[r.Station], causes: map[string]*Problem{}}
	d := &RunData{Beams: make([]BeamData, len(r.Beams)), Causes: l.causes}
	for _, kp := range r.resolved {
		l.problems = append(l.problems, kp.p)
		l.causes[kp.key] = kp.p
	}

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
		d.RangePre = l.transmission(r.RangePre, r.RangePreCSV, "range_reference.pre")
	}
	if r.RangePost != "" {
		d.RangePost = l.transmission(r.RangePost, r.RangePostCSV, "range_reference.post")
	}
	for i, b := range r.Beams {
		key := fmt.Sprintf("beams[%d]", i)
		if b.Transmission != "" {
			d.Beams[i].Transmission = l.transmission(b.Transmission, b.TransmissionCSV, key+".transmission")
		}
		d.Beams[i].Noise = make([]*Trace, len(b.Noise))
		for k, n := range b.Noise {
			nk := fmt.Sprintf("%s.noise[%d].file", key, k)
			format, ok := l.format(n.CSV, nk)
			if !ok {
				continue
			}
			data, ok := l.read(n.File, nk)
			if !ok {
				continue
			}
			t, _, err := readTrace(data, n.File, traceSpec{quantity: n.Quantity, format: format, where: "the noise entry in " + l.entryFile(n.CSV)})
			if err != nil {
				l.refuse(nk, Problems(err))
				continue
			}
			d.Beams[i].Noise[k] = t
		}
	}
	if r.Elements != "" {
		if data, ok := l.read(r.Elements, "elements"); ok {
			els, err := readElements(data, r.Elements)
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
	// A run's beams are reduced, charted and written point by point: the
	// beams past MaxRunBeamPoints are refused here, so that a unit's
	// memory stays bounded.
	l.problems = append(l.problems, LimitBeamPoints(r, d)...)
	return d, SortProblems(l.problems)
}

type loader struct {
	fs       *archiveFS
	run      *Run
	station  *Station
	inputs   map[string]InputFile
	absent   map[string]bool
	problems []*Problem
	causes   map[string]*Problem
}

// refuse records the problems that refused the file of a run.yaml key;
// the first is its cause.
func (l *loader) refuse(key string, ps []*Problem) {
	l.problems = append(l.problems, ps...)
	if len(ps) > 0 && l.causes[key] == nil {
		l.causes[key] = ps[0]
	}
}

// entryFile is the YAML file where a csv: mapping of a data file goes.
func (l *loader) entryFile(ref *CSVRef) string {
	if ref != nil && ref.Name != "" && l.station != nil {
		return l.station.File + " (csv_formats: " + ref.Name + ")"
	}
	return l.run.File
}

// format returns the layout of a data file: nil for the contract's form,
// the mapping, or the station's csv_formats entry of that name. ok is
// false when a name cannot be found (reported here, or, for a station
// that is unknown or refused, by discovery: the file is not read).
func (l *loader) format(ref *CSVRef, key string) (*CSVFormat, bool) {
	if ref == nil {
		return nil, true
	}
	if ref.Format != nil {
		return ref.Format, true
	}
	if l.station == nil {
		return nil, false
	}
	if f := l.station.CSVFormats[ref.Name]; f != nil {
		return f, true
	}
	var names []string
	for n := range l.station.CSVFormats {
		names = append(names, n)
	}
	sort.Strings(names)
	known := "it has none"
	if len(names) > 0 {
		known = "it has " + strings.Join(names, ", ")
	}
	line := ref.Line
	if line == 0 {
		line = l.run.KeyLines[key]
	}
	l.refuse(key, []*Problem{Problemf(l.run.File, line, "%s: csv format %q is not in the csv_formats of station %s (%s; %s); expected one of its names, or a csv: mapping", key, ref.Name, l.station.ID, l.station.File, known)})
	return nil, false
}

// read returns a data file named by the run.yaml key, and lists it among
// the inputs (or the absent files).
func (l *loader) read(rel, key string) ([]byte, bool) {
	data, in, p := l.fs.read(rel, l.run.File, l.run.KeyLines[key])
	if p != nil {
		p.Message = key + ": " + p.Message
		l.refuse(key, []*Problem{p})
		if l.absent == nil {
			l.absent = map[string]bool{}
		}
		l.absent[rel] = true
		return nil, false
	}
	l.inputs[rel] = in
	return data, true
}

func (l *loader) transmission(rel string, ref *CSVRef, key string) *Transmission {
	isCSV := strings.EqualFold(path.Ext(rel), ".csv")
	if ref != nil && !isCSV {
		line := ref.Line
		if line == 0 {
			line = l.run.KeyLines[key]
		}
		l.refuse(key, []*Problem{Problemf(l.run.File, line, "%s: csv: is given for %s, which is not a .csv file; expected csv: only beside a CSV file (a Touchstone file needs none)", key, rel)})
		return nil
	}
	format, ok := l.format(ref, key)
	if !ok {
		return nil
	}
	data, ok := l.read(rel, key)
	if !ok {
		return nil
	}
	if isCSV {
		t, _, err := readTrace(data, rel, traceSpec{quantity: "s21", format: format, where: "the file's entry in " + l.entryFile(ref) + " ({file, csv})"})
		if err != nil {
			l.refuse(key, Problems(err))
			return nil
		}
		return &Transmission{File: rel, FrequencyHz: t.FrequencyHz, ParameterDB: t.Values}
	}
	n, err := ReadTouchstone(bytes.NewReader(data), rel)
	if err != nil {
		l.refuse(key, Problems(err))
		return nil
	}
	line := l.run.KeyLines[key]
	if n.Ports < 2 {
		l.refuse(key, []*Problem{Problemf(l.run.File, line, "%s: %s has %d port; expected a transmission file with at least 2 ports (it must hold %s)", key, rel, n.Ports, l.run.RangeParameter)})
		return nil
	}
	param := l.run.RangeParameter
	if param == "" {
		param = "S21"
	}
	i, j, ok := sParameterPorts(param)
	if !ok || i > n.Ports || j > n.Ports {
		l.refuse(key, []*Problem{Problemf(l.run.File, line, "%s: %s has %d ports, so it holds no %s; expected a file with that parameter", key, rel, n.Ports, param)})
		return nil
	}
	t := &Transmission{File: rel, FrequencyHz: append([]float64(nil), n.FrequencyHz...), ParameterDB: make([]float64, len(n.FrequencyHz))}
	for k := range n.FrequencyHz {
		m := cmplx.Abs(n.At(k, i-1, j-1))
		if !(m > 0) || math.IsInf(m, 0) {
			l.refuse(key, []*Problem{Problemf(rel, 0, "%s is %v at %g Hz; expected a measured, non-zero transmission", param, m, n.FrequencyHz[k])})
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
