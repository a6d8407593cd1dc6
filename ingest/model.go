// Package ingest turns the files of a measurement archive into typed values.
//
// It knows file formats (Touchstone, trace CSV, the YAML run descriptions),
// paths and line numbers, and nothing else: no physics beyond unit
// conversion, no rendering. Every refusal is a *Problem that names the file
// and line. Input never causes a panic, and a bad file never stops the
// reading of the files that do not depend on it.
package ingest

import (
	"fmt"
	"time"
)

// Problem is a refusal or a warning about one input file, with the position
// that caused it. Line is 0 when the problem concerns the file as a whole.
type Problem struct {
	File    string `json:"file"`
	Line    int    `json:"line"`
	Message string `json:"message"`
}

func (p *Problem) Error() string {
	if p.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", p.File, p.Line, p.Message)
	}
	if p.File != "" {
		return fmt.Sprintf("%s: %s", p.File, p.Message)
	}
	return p.Message
}

// Problemf builds a *Problem.
func Problemf(file string, line int, format string, args ...any) *Problem {
	return &Problem{File: file, Line: line, Message: fmt.Sprintf(format, args...)}
}

// Trace is a two-column CSV trace: a frequency and one value in dB (or
// dBm/Hz for noise density).
type Trace struct {
	File        string
	FrequencyHz []float64
	Values      []float64
	// Column is the header name of the value column.
	Column string
}

// Transmission is what a transmission file (Touchstone or CSV) yields for
// one path of the range: the chosen parameter in dB and, where the file has
// it, the magnitude of the reflection coefficient at the antenna's port.
type Transmission struct {
	File        string
	FrequencyHz []float64
	// ParameterDB is 20*log10|S_ij| of the chosen parameter (S21 unless the
	// run says otherwise).
	ParameterDB []float64
	// AntennaMatch is |Gamma| at the antenna's port (S22 of a 2-port file
	// measured with the antenna on port 2); nil when the file does not have
	// it (CSV, 1-port).
	AntennaMatch []float64
}

// UncertaintyTerm is one declared term of a station's budget.
type UncertaintyTerm struct {
	Name      string   `yaml:"name" json:"name"`
	AppliesTo []string `yaml:"applies_to" json:"applies_to"`
	ValueDB   float64  `yaml:"value_db" json:"value_db"`
	// Distribution is normal, rectangular, u-shaped or triangular.
	Distribution string `yaml:"distribution" json:"distribution"`
	// CoverageK is the coverage factor of ValueDB for a normal term.
	CoverageK float64 `yaml:"coverage_k" json:"coverage_k,omitempty"`
	Line      int     `yaml:"-" json:"-"`
}

// Station is a test range and the uncertainty terms it adds to every run.
type Station struct {
	File              string            `yaml:"-" json:"-"`
	Schema            int               `yaml:"schema"`
	ID                string            `yaml:"id"`
	Description       string            `yaml:"description"`
	ReceiverMatch     float64           `yaml:"receiver_match"`
	DriftToleranceDB  float64           `yaml:"drift_tolerance_db"`
	MethodToleranceDB float64           `yaml:"method_tolerance_db"`
	Uncertainty       []UncertaintyTerm `yaml:"uncertainty"`
	// CSVFormats are the station's named csv: mappings (csv_formats), which
	// a run on this station names with csv: NAME.
	CSVFormats map[string]*CSVFormat `yaml:"-"`
	// CheckUnits are the serials of the check units (golden units)
	// measured on this range: range health shows them, and they are not
	// counted in their product's yield and capability.
	CheckUnits []string `yaml:"-"`
}

// CSVFormat is a csv: mapping: how an instrument's or a spreadsheet's CSV
// file is laid out (contract, "Data files"). The zero value reads the
// contract's own form: the delimiter detected from the header line,
// decimal points, "#" and "!" comment lines, the header on the first line,
// the frequency in column 1 with its unit in the header, the value in
// column 2.
type CSVFormat struct {
	// Delimiter is ',', ';' or '\t'; 0 detects it from the header line.
	Delimiter byte
	// Decimal is the decimal separator, '.' or ','; 0 is '.'.
	Decimal byte
	// Comment is the prefix of comment lines; "" is "#" and "!".
	Comment string
	// SkipLines are the lines before the header row.
	SkipLines int
	// UnitsRow: a row of units follows the header.
	UnitsRow bool
	// FrequencyColumn, ValueColumn and UncertaintyColumn (a reference
	// table's) choose columns by header text or number; zero: 1, 2, 3.
	FrequencyColumn   CSVColumn
	ValueColumn       CSVColumn
	UncertaintyColumn CSVColumn
	// FrequencyUnit is hz, khz, mhz or ghz, for a header that does not
	// say; "" when it does.
	FrequencyUnit string
	// Line is where the mapping is written (its YAML file's line).
	Line int
}

// CSVColumn is a column of a CSV file: by its header text, or by its
// number counted from 1. The zero value is the column's default.
type CSVColumn struct {
	Name   string
	Number int
}

// CSVRef is the csv: of a data file: a mapping (Format), or the name of
// one of the run's station's csv_formats (Name; Format is nil until Load
// finds it).
type CSVRef struct {
	Name   string
	Format *CSVFormat
	// Line is the line of csv: in its YAML file.
	Line int
}

// ReferencePoint is one row of a reference antenna's calibration table.
type ReferencePoint struct {
	FrequencyHz           float64
	GainDBi               float64
	ExpandedUncertaintyDB float64
	Line                  int
}

// Reference is a reference antenna's calibration.
type Reference struct {
	File        string
	Schema      int
	ID          string
	Description string
	// GainKind is "realized" or "gain" (then the measured mismatch loss is
	// applied by reduce).
	GainKind    string
	Calibrated  time.Time
	Due         time.Time
	Certificate string
	CoverageK   float64
	// TableFile is the CSV the table came from, relative to the archive
	// root, or "" for an inline table.
	TableFile string
	// TableCSV is the csv: of TableFile, nil for the contract's form.
	TableCSV *CSVFormat
	Table    []ReferencePoint
}

// BeamSelector chooses the beams a limit applies to: by id, or by scan
// angle range (inclusive). Nil bounds are open.
type BeamSelector struct {
	IDs         []string
	MinThetaDeg *float64
	MaxThetaDeg *float64
}

// LimitPoint is one vertex of a piecewise-linear lower limit.
type LimitPoint struct {
	FrequencyHz float64
	Value       float64
}

// Limit is one acceptance limit of a spec.
type Limit struct {
	Name string
	// Quantity is "gt" (dB/K) or "gain" (dBi).
	Quantity string
	Beams    BeamSelector
	// BandHz is the band [low, high] the limit judges.
	BandHz [2]float64
	// Statistic is "min" or "mean".
	Statistic string
	Points    []LimitPoint
	// ScanExponent, when set, makes the limit follow
	// limit(f) + 10*n*log10(cos theta).
	ScanExponent *float64
	Line         int
}

// Spec is the acceptance specification of a product.
type Spec struct {
	File   string
	Schema int
	// Product is the product code runs refer to.
	Product      string
	Title        string
	DecisionRule string // simple | guarded
	Limits       []Limit
	// OperatingAntennaK is the antenna temperature the projected G/T is
	// stated at (optional).
	OperatingAntennaK *float64
	// ElementPhaseRMSToleranceDeg flags a unit whose residual element phase
	// rms exceeds it (optional).
	ElementPhaseRMSToleranceDeg *float64
	// Customer is who the product's units are tested for (optional; a
	// run's customer overrides it).
	Customer *Customer
	// BeamPlan is the beams every unit is measured in (optional).
	BeamPlan *BeamPlan
}

// BeamPlan is a spec's beam_plan: the beams of the product, and where a
// run finds each beam's files ({beam} stands for the beam id).
type BeamPlan struct {
	// Transmission is a glob in the run folder that must match exactly
	// one file; "" when the plan names none.
	Transmission    string
	TransmissionCSV *CSVRef
	// Noise are noise entries whose File has {beam}; each whose file is
	// in the run folder is used.
	Noise []NoiseInput
	// Beams are the plan's beams; Line is their line in the spec.
	Beams []Beam
	// Line is the line of beam_plan in the spec, FilesLine of its files.
	Line      int
	FilesLine int
}

// NoiseInput names one noise trace of a beam.
type NoiseInput struct {
	File string
	// Quantity is noise-density-dbm-hz, noise-relative-kt0-db or
	// system-noise-figure-db.
	Quantity         string
	NoiseBandwidthHz *float64
	IntegrationS     *float64
	// CSV is how the file is laid out, nil for the contract's form.
	CSV  *CSVRef
	Line int
}

// Beam is one beam state of a run.
type Beam struct {
	ID           string
	ThetaDeg     float64
	PhiDeg       float64
	Polarization string
	Transmission string
	// TransmissionCSV is the csv: of a CSV transmission file, nil for
	// the contract's form.
	TransmissionCSV *CSVRef
	Noise           []NoiseInput
	PassiveGainDBi  *float64
	Line            int
	// FromPlan says the beam is one of the spec's beam_plan (its keys
	// that the run's entry does not set come from there).
	FromPlan bool

	// given holds the keys the beam's entry sets (beamKey bits), so that
	// a run's entry inherits the others from the plan; lines are the
	// lines of its files in the entry's YAML file.
	given beamKeys
	lines beamLines
}

type beamLines struct {
	transmission int
	noise        []int
}

// Run is one run.yaml: one test run of one unit.
type Run struct {
	// File is the run.yaml path relative to the archive root, with '/'.
	File string
	// Dir is the run's folder relative to the archive root, with '/'.
	Dir       string
	Schema    int
	Serial    string
	Product   string
	Station   string
	Reference string
	Started   time.Time
	Operator  string
	AmbientC  float64
	Firmware  string
	// RangePre and RangePost are the reference measurement files, relative
	// to the archive root; RangePost may be "".
	RangePre       string
	RangePost      string
	RangeParameter string // S21 unless stated
	// RangePreCSV and RangePostCSV are the csv: of CSV reference
	// measurements, nil for the contract's form.
	RangePreCSV  *CSVRef
	RangePostCSV *CSVRef
	// Beams are the run's beams as resolved against the spec's beam_plan
	// (Open and Full resolve them; ParseRun gives them as written).
	Beams []Beam
	// Elements and Notes are relative to the archive root, or "".
	Elements string
	Notes    string
	// Customer overrides the spec's customer for this run (optional).
	Customer *Customer
	// KeyLines gives the run.yaml line of each key's value by key path
	// ("station", "reference", "product", "started", "range_reference.pre",
	// "range_reference.post", "beams[0].transmission",
	// "beams[0].noise[1].file", "elements", "notes"), so that a problem
	// found later (a missing file, an unknown station) points at the line
	// that names it.
	KeyLines map[string]int
	// Source is the run.yaml as it was read for this Run: its size,
	// SHA-256 and stat.
	Source InputFile

	// lean marks a run that OpenLean holds without its beams and with only
	// the key lines discovery reports on; Archive.Full reads it whole.
	lean bool
	// noBeams: the run.yaml has no beams key (it measured the plan).
	noBeams bool
	// resolved holds what resolving the beams against the plan found
	// wrong (a glob that matches no file, a beam of the run alone that
	// is not complete); Load reports it.
	resolved []keyedProblem
}

// Lean says whether r is held without its beams (see OpenLean).
func (r *Run) Lean() bool { return r.lean }

// Element is one row of elements.csv.
type Element struct {
	Row, Col    int
	AmplitudeDB float64
	PhaseDeg    float64
}

// InputFile is one file an output depends on: the size and SHA-256 of
// the bytes that were parsed, and the file's stat as it was when they
// were read. The stat is for the build's own record, never an output: it
// differs between two copies of one archive.
type InputFile struct {
	Path   string   `json:"path"`
	Size   int64    `json:"size"`
	SHA256 string   `json:"sha256"`
	Stat   FileStat `json:"-"`
}

// BeamData is the measured data of one beam.
type BeamData struct {
	// Transmission is nil when the file was refused.
	Transmission *Transmission
	// Noise has one entry per NoiseInput of the beam; an entry is nil when
	// its file was refused.
	Noise []*Trace
}

// RunData is everything a run's files hold, read and checked.
type RunData struct {
	RangePre  *Transmission
	RangePost *Transmission
	Beams     []BeamData // parallel to Run.Beams
	Elements  []Element
	Notes     string
	// Inputs lists every file the run used, the run.yaml, station,
	// reference and spec included, sorted by path. The shared documents
	// and the run.yaml are those discovery parsed (Archive.Documents,
	// Run.Source): the bytes the reduction used are the bytes hashed.
	Inputs []InputFile
	// Causes holds, by run.yaml key path ("beams[0].transmission",
	// "beams[0].noise[1].file", "range_reference.pre"), the problem that
	// refused that key's file (or found none), so that reduce names what
	// follows from it under that problem rather than as another.
	Causes map[string]*Problem
	// Absent lists the files the run names that could not be read
	// (missing, a link out of the archive, not a regular file, no
	// permission), sorted: a build must redo the unit when one of them
	// can be read.
	Absent []string
}

// Unit is one serial number and its runs, oldest first: the last run is the
// acceptance run, the others are its history.
//
// Refused lists the run.yaml files of this serial that were refused (see
// RefusedRun). A unit may have Refused and no Runs at all: its only run.yaml
// is broken. Such a unit is still listed, so that it is shown as a unit
// that cannot be judged rather than missing from the archive.
type Unit struct {
	Serial  string
	Runs    []*Run
	Refused []*RefusedRun // in the order of their run.yaml paths
}

// Acceptance returns the run with the latest start, or nil when the unit
// has only refused runs.
func (u *Unit) Acceptance() *Run {
	if len(u.Runs) == 0 {
		return nil
	}
	return u.Runs[len(u.Runs)-1]
}

// AcceptanceRefused returns the refused run that stands where the
// acceptance run would be, or nil. A refused run whose start is unknown,
// or not before the start of the latest good run, may be the unit's real
// acceptance test: judging the older good run in its place would be wrong.
// A refused run that started before the latest good run is only broken
// history. When several stand there, an unknown start wins (it may be the
// newest), then the latest start.
func (u *Unit) AcceptanceRefused() *RefusedRun {
	var best *RefusedRun
	for _, rr := range u.Refused {
		if n := len(u.Runs); n > 0 && !rr.Started.IsZero() && rr.Started.Before(u.Runs[n-1].Started) {
			continue
		}
		switch {
		case best == nil:
			best = rr
		case best.Started.IsZero():
		case rr.Started.IsZero() || rr.Started.After(best.Started):
			best = rr
		}
	}
	return best
}

// RefusedRun is a run.yaml that discovery refused: broken YAML, an unknown
// key, a bad value, a serial spelled like another unit's but for case, or a
// file (or folder) that cannot be read at all. Its problems are also in
// Archive.Problems. Serial and Started are read from the refused file
// leniently, when they can be: a refused run with a serial belongs to that
// unit (Unit.Refused); one without is in Archive.Orphans.
type RefusedRun struct {
	// File is the run.yaml path relative to the archive root, with '/';
	// "" for a folder that could not be read (it may hold a run.yaml).
	File string
	// Dir is the run's folder relative to the archive root, with '/'.
	Dir string
	// Serial is the serial as the file writes it (for a case twin, not the
	// unit's spelling), or "" when it cannot be read or is not a valid
	// identifier.
	Serial string
	// Started is the start time, zero when it cannot be read.
	Started  time.Time
	Problems []*Problem
}

// Archive is what discovery found: the shared documents, every run grouped
// by unit, and every problem met on the way. Data files of the runs are not
// read until Load is called, so that a large archive is never held in
// memory whole.
type Archive struct {
	// Root is the archive folder as given.
	Root       string
	Stations   map[string]*Station   // by id
	References map[string]*Reference // by id
	Specs      map[string]*Spec      // by product
	Units      []*Unit               // sorted by serial
	// Documents are the YAML files that discovery accepted (every good
	// run.yaml, station, reference and its table file, and spec), by path,
	// as they were read: each is read once a build, and Load lists the
	// shared ones' very bytes as a run's inputs.
	Documents map[string]InputFile
	// Lab is lab.yaml, nil when the archive has none (or it was refused:
	// see Problems); its input is in Documents under "lab.yaml".
	Lab *Lab
	// Approvals are the approvals of each serial, in date order (then by
	// file). Each file's input is in Documents.
	Approvals map[string][]*Approval
	// Orphans are refused runs that belong to no unit: their serial could
	// not be read, or their folder or run.yaml could not be read at all.
	// In the order of their paths.
	Orphans []*RefusedRun
	// Problems lists what discovery refused: broken YAML, escaping paths,
	// duplicate runs. A run whose run.yaml was refused is not in any
	// Unit's Runs; it is in its Unit's Refused, or in Orphans.
	Problems []*Problem
}
