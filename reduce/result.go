package reduce

import (
	"math"
	"time"

	"gtpack.example/gtpack/ingest"
)

// Verdict is the verdict of a limit, a run or a unit.
type Verdict string

// Verdicts, best first. A unit's verdict is the worst of its limits', and
// VerdictIncomplete when inputs were missing or refused.
const (
	VerdictPass            Verdict = "pass"
	VerdictConditionalPass Verdict = "conditional-pass"
	VerdictConditionalFail Verdict = "conditional-fail"
	VerdictFail            Verdict = "fail"
	VerdictIncomplete      Verdict = "incomplete"
)

// GTForm says which noise form a G/T was computed from.
type GTForm string

// The G/T forms (method.md sections 4 and 5).
const (
	FormNoiseDensity      GTForm = "noise-density"
	FormSystemNoiseFigure GTForm = "system-noise-figure"
)

// Quantity is what a limit judges: G/T (dB/K) or gain (dBi).
type Quantity string

// The quantities of the spec's limits (archive-format.md, specs).
const (
	QuantityGT   Quantity = "gt"
	QuantityGain Quantity = "gain"
)

// FlagKind says what a Flag is about.
type FlagKind string

// The kinds of flags.
const (
	FlagNoise            FlagKind = "noise"
	FlagGrid             FlagKind = "grid"
	FlagMethod           FlagKind = "method"
	FlagReferenceExpired FlagKind = "reference-expired"
	FlagBudget           FlagKind = "budget"
	FlagDrift            FlagKind = "drift"
	FlagProjection       FlagKind = "projection"
	FlagImplausible      FlagKind = "implausible"
	FlagElements         FlagKind = "elements"
)

// TermSource says where a budget term comes from.
type TermSource string

// The sources of budget terms.
const (
	SourceData    TermSource = "data"    // the run's own data (scatter, mismatch, drift...)
	SourceStation TermSource = "station" // the station's declared terms
)

// Unit is the reduced result of one unit's acceptance run: what
// result.json holds.
type Unit struct {
	Serial       string
	Product      string
	Run          string
	Started      time.Time // zero when the run states none
	Verdict      Verdict
	DecisionRule string
	SpecTitle    string

	Station   StationInfo
	Reference ReferenceInfo
	Operator  string
	AmbientC  float64
	Firmware  string

	Beams  []Beam
	Limits []LimitResult

	// Flags are conditions worth a reader's attention that do not by
	// themselves refuse an input: drift, method disagreement, an expired
	// reference, element state, fleet watch.
	Flags    []Flag
	Problems []ingest.Problem
	History  []HistoryEntry

	Scan     *Scan
	Elements *ElementState
	Notes    string
	Inputs   []ingest.InputFile

	// Lab and Customer are who issues the report and for whom (nil when
	// not stated); Issue is the report's issue state, set by the caller
	// (IssueOf) once every input of the unit is known.
	// RangeCheck is the run's check of its range: the range loss at band
	// centre and its drift (nil when there is no range loss).
	RangeCheck *RangeCheck
	// CheckUnit is set for a check unit (golden unit) of its station:
	// range health shows it, and its product's yield leaves it out.
	CheckUnit bool

	Lab      *LabInfo
	Customer *CustomerInfo
	Issue    Issue
}

// LabInfo is the issuing laboratory, as lab.yaml states it.
type LabInfo struct {
	Name          string
	Address       []string
	Contact       string
	Accreditation string
}

// CustomerInfo is who the unit was tested for: the run's customer, else
// the spec's.
type CustomerInfo struct {
	Name    string
	Address []string
	Order   string
}

// StationInfo is what the report shows of the station.
type StationInfo struct {
	ID                string
	Description       string
	ReceiverMatch     float64
	DriftToleranceDB  float64
	MethodToleranceDB float64
}

// ReferenceInfo is what the report shows of the reference antenna.
type ReferenceInfo struct {
	ID          string
	Description string
	Certificate string
	Calibrated  time.Time // dates, zero when not stated
	Due         time.Time
	GainKind    string
	// Expired is true when the run started after the due date.
	Expired bool
}

// Beam is the reduced data of one beam, all arrays on FrequencyHz.
type Beam struct {
	ID           string
	ThetaDeg     float64
	PhiDeg       float64
	Polarization string

	FrequencyHz []float64
	S21DB       []float64
	RangeLossDB []float64
	// RangeDriftDB is |RL_pre - RL_post|; nil without a post measurement.
	RangeDriftDB []float64
	GainDBi      []float64
	// GainExpandedUncertaintyDB is U (k = 2) of the gain.
	GainExpandedUncertaintyDB []float64

	// GTdBPerK is G/T in the noise-density form when the beam has it,
	// otherwise in the system-noise-figure form; GTForm says which.
	GTdBPerK                []float64
	GTExpandedUncertaintyDB []float64
	GTForm                  GTForm
	// NoiseRelativeKT0DB is the output noise density above k*T0 on this
	// grid (the form GTdBPerK was computed from).
	NoiseRelativeKT0DB []float64
	// OtherForm is the system-noise-figure G/T when the beam has both.
	OtherForm *OtherForm

	Noise []NoiseStatistics

	// Interpolated says which inputs were put on this grid, and from what.
	Interpolated []string

	GainBudget Budget
	GTBudget   Budget

	Projection *Projection

	// LimitCurves are the limits that apply to this beam, each on the part
	// of the grid inside its band, for the workbook's per-frequency limit
	// and margin columns; nil when not filled.
	LimitCurves []LimitCurve
}

// LimitCurve is one limit's lower limit L(f) on a beam's grid (the scan
// law included): LimitDB[i] is the limit at FrequencyHz[Start+i], for the
// grid points inside the limit's band. Units are dB/K for quantity "gt" and
// dBi for "gain".
type LimitCurve struct {
	Name     string
	Quantity Quantity
	Start    int
	LimitDB  []float64
}

// OtherForm is the second G/T form of a beam that has both noise forms.
type OtherForm struct {
	Form               GTForm
	GTdBPerK           []float64
	DifferenceDB       []float64 // GTdBPerK(main) - GTdBPerK(other)
	MaxAbsDifferenceDB float64
	// MeanDifferenceDB is the band mean of DifferenceDB: the systematic
	// disagreement of the two forms, which the station's method tolerance
	// judges. The point-to-point scatter of two independent noise traces
	// would otherwise decide the flag.
	MeanDifferenceDB float64
}

// NoiseStatistics describes one noise trace of a beam.
type NoiseStatistics struct {
	File     string
	Quantity string
	// ScatterDB is the robust point-to-point standard deviation of the
	// trace (method.md section 5), after smoothing.
	ScatterDB float64
	// RadiometerDB is 4.343/sqrt(B*tau), or 0 when B or tau is not given.
	RadiometerDB float64
	// SmoothingPoints is the width of the centred moving average applied
	// (1: none).
	SmoothingPoints int
}

// Budget is an uncertainty budget per frequency point (GUM): one row per
// term, each with a value per frequency of the beam's grid.
type Budget struct {
	Terms []BudgetTerm
	// CombinedDB is u_c per frequency; ExpandedDB is k*u_c (the beam's
	// GainExpandedUncertaintyDB or GTExpandedUncertaintyDB).
	CombinedDB []float64
	ExpandedDB []float64
	CoverageK  float64
}

// BudgetTerm is one row of a budget.
type BudgetTerm struct {
	Name         string
	Source       TermSource
	Distribution string
	Divisor      float64
	// ValueDB is the stated value (expanded U, or half-width) per point;
	// StandardDB is ValueDB/Divisor.
	ValueDB    []float64
	StandardDB []float64
}

// Projection is the derived G/T at an operating antenna temperature.
type Projection struct {
	PassiveGainDBi    float64
	ChamberAntennaK   float64
	OperatingAntennaK float64
	SystemNoiseK      []float64
	ReceiverNoiseK    []float64
	OperatingGTdBPerK []float64
	Assumptions       string
	// NegativeReceiverNoiseHz lists the frequencies where T_e came out
	// negative (declared passive gain too low); then OperatingGTdBPerK is
	// nil. See Usable.
	NegativeReceiverNoiseHz []float64
}

// LimitResult is the verdict of one limit on one beam.
type LimitResult struct {
	Name      string
	Quantity  Quantity
	Beam      string
	Statistic string
	// WorstMarginDB is x - L at the worst point (or of the band mean).
	WorstMarginDB float64
	// AtFrequencyHz is where the worst margin occurs (band centre for mean).
	AtFrequencyHz float64
	ValueDB       float64
	LimitDB       float64
	// ExpandedUncertaintyDB is U at that point.
	ExpandedUncertaintyDB float64
	Verdict               Verdict
	// LimitCurve is the limit on this beam as the vertices of a
	// piecewise-linear line over the judged band (scan law applied), so
	// that a report can draw it; nil when not filled in.
	LimitCurve []LimitVertex
}

// LimitVertex is one vertex of a limit line.
type LimitVertex struct {
	FrequencyHz float64
	ValueDB     float64
}

// Flag is a condition worth attention.
type Flag struct {
	Kind    FlagKind
	Beam    string
	Message string
}

// HistoryEntry is an earlier run of the same unit.
type HistoryEntry struct {
	Run     string
	Started time.Time
	Verdict Verdict
	// WorstLimit and WorstMarginDB are the run's worst limit result (the
	// smallest finite margin), when it has one (else "", "" and NaN);
	// Notes are its notes.
	WorstLimit    string
	WorstBeam     string
	WorstMarginDB float64
	Notes         string
	// RangeCheck is that run's range check (range health).
	RangeCheck *RangeCheck
}

// HistoryOf is what the report of a later run shows of this one.
func (u *Unit) HistoryOf() HistoryEntry {
	h := HistoryEntry{Run: u.Run, Started: u.Started, Verdict: u.Verdict, Notes: u.Notes, RangeCheck: u.RangeCheck, WorstMarginDB: math.NaN()}
	for _, l := range u.Limits {
		if math.IsNaN(l.WorstMarginDB) || math.IsInf(l.WorstMarginDB, 0) {
			continue
		}
		if math.IsNaN(h.WorstMarginDB) || l.WorstMarginDB < h.WorstMarginDB {
			h.WorstLimit, h.WorstBeam, h.WorstMarginDB = l.Name, l.Beam, l.WorstMarginDB
		}
	}
	return h
}

// Scan is the scan behaviour of a unit (method.md section 8).
type Scan struct {
	FrequencyHz []float64
	// ExponentN is the least-squares scan exponent per frequency;
	// MeanExponentN its band mean.
	ExponentN     []float64
	MeanExponentN float64
	Beams         []ScanBeam
	// Polarization and BoresightBeam say which group of beams was compared
	// (beams are compared within one polarization only).
	Polarization  string
	BoresightBeam string
	// GainExponentN is the same fit on gain instead of G/T, per frequency,
	// nil when a beam has no gain; MeanGainExponentN its band mean.
	GainExponentN     []float64
	MeanGainExponentN float64
	// LawExponentN is n_spec of the spec's scan law, when it has one.
	LawExponentN *float64
}

// ScanBeam is one scanned beam's loss against boresight.
type ScanBeam struct {
	ID       string
	ThetaDeg float64
	// ScanLossDB is G/T(theta) - G/T(0) per frequency.
	ScanLossDB []float64
	// GainLossDB is G(theta) - G(0) per frequency, nil without gain.
	GainLossDB []float64
	// LawLossDB is 10*n_spec*log10(cos theta), when the spec has a scan law.
	LawLossDB *float64
}

// ElementState is the array element analysis (method.md section 9).
type ElementState struct {
	Rows             int
	Cols             int
	ResidualPhaseDeg [][]float64 // [row][col], NaN-free; missing = 0 with Present false
	Present          [][]bool
	RMSResidualDeg   float64
	PhaseLossDB      float64
	TaperEfficiency  float64
	TaperLossDB      float64
	Worst            []ElementOutlier
	ToleranceDeg     *float64
	Flagged          bool
	// Elements is how many elements were analysed; FirstRow and FirstCol
	// are the row and column numbers of heat-map index [0][0].
	Elements int
	FirstRow int
	FirstCol int
	// RowSlopeDeg and ColSlopeDeg are the fitted plane's phase step per
	// row and per column (the steering gradient), wrapped to (-180, 180].
	RowSlopeDeg float64
	ColSlopeDeg float64
}

// ElementOutlier is an element far from the fitted plane.
type ElementOutlier struct {
	Row         int
	Col         int
	ResidualDeg float64
}
