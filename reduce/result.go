package reduce

import (
	"math"

	"gtpack.example/gtpack/ingest"
)

// ResultSchema is the version of the result.json layout. Schema 2 writes
// the budgets short: a term the same at every frequency as one value
// (BudgetTerm.ConstantStandardDB), and no expanded_db beside the beam's
// expanded uncertainty, which is the same list.
const ResultSchema = 2

// Verdicts, best first. A unit's verdict is the worst of its limits', and
// VerdictIncomplete when inputs were missing or refused.
const (
	VerdictPass            = "pass"
	VerdictConditionalPass = "conditional-pass"
	VerdictConditionalFail = "conditional-fail"
	VerdictFail            = "fail"
	VerdictIncomplete      = "incomplete"
)

// Unit is the reduced result of one unit's acceptance run: what
// result.json holds.
type Unit struct {
	Schema       int    `json:"schema"`
	Serial       string `json:"serial"`
	Product      string `json:"product"`
	Run          string `json:"run"`
	Started      string `json:"started"`
	Verdict      string `json:"verdict"`
	DecisionRule string `json:"decision_rule"`
	SpecTitle    string `json:"spec_title,omitempty"`

	Station   StationInfo   `json:"station"`
	Reference ReferenceInfo `json:"reference"`
	Operator  string        `json:"operator"`
	AmbientC  float64       `json:"ambient_c"`
	Firmware  string        `json:"firmware,omitempty"`

	Beams  []Beam        `json:"beams"`
	Limits []LimitResult `json:"limits"`

	// Flags are conditions worth a reader's attention that do not by
	// themselves refuse an input: drift, method disagreement, an expired
	// reference, element state, fleet watch.
	Flags    []Flag           `json:"flags"`
	Problems []ingest.Problem `json:"problems"`
	History  []HistoryEntry   `json:"history"`

	Scan     *Scan              `json:"scan,omitempty"`
	Elements *ElementState      `json:"elements,omitempty"`
	Notes    string             `json:"notes_markdown,omitempty"`
	Inputs   []ingest.InputFile `json:"inputs"`

	// Lab and Customer are who issues the report and for whom (nil when
	// not stated); Issue is the report's issue state, set by the caller
	// (IssueOf) once every input of the unit is known.
	// RangeCheck is the run's check of its range: the range loss at band
	// centre and its drift (nil when there is no range loss).
	RangeCheck *RangeCheck `json:"range_check,omitempty"`
	// CheckUnit is set for a check unit (golden unit) of its station:
	// range health shows it, and its product's yield leaves it out.
	CheckUnit bool `json:"check_unit,omitempty"`

	Lab      *LabInfo      `json:"lab,omitempty"`
	Customer *CustomerInfo `json:"customer,omitempty"`
	Issue    Issue         `json:"issue"`
}

// LabInfo is the issuing laboratory, as lab.yaml states it.
type LabInfo struct {
	Name          string   `json:"name"`
	Address       []string `json:"address"`
	Contact       string   `json:"contact,omitempty"`
	Accreditation string   `json:"accreditation,omitempty"`
}

// CustomerInfo is who the unit was tested for: the run's customer, else
// the spec's.
type CustomerInfo struct {
	Name    string   `json:"name"`
	Address []string `json:"address,omitempty"`
	Order   string   `json:"order,omitempty"`
}

// StationInfo is what the report shows of the station.
type StationInfo struct {
	ID                string  `json:"id"`
	Description       string  `json:"description"`
	ReceiverMatch     float64 `json:"receiver_match"`
	DriftToleranceDB  float64 `json:"drift_tolerance_db"`
	MethodToleranceDB float64 `json:"method_tolerance_db"`
}

// ReferenceInfo is what the report shows of the reference antenna.
type ReferenceInfo struct {
	ID          string `json:"id"`
	Description string `json:"description"`
	Certificate string `json:"certificate"`
	Calibrated  string `json:"calibrated"`
	Due         string `json:"due"`
	GainKind    string `json:"gain_kind"`
	// Expired is true when the run started after the due date.
	Expired bool `json:"expired"`
}

// Beam is the reduced data of one beam, all arrays on FrequencyHz.
type Beam struct {
	ID           string  `json:"id"`
	ThetaDeg     float64 `json:"theta_deg"`
	PhiDeg       float64 `json:"phi_deg"`
	Polarization string  `json:"polarization,omitempty"`

	FrequencyHz []float64 `json:"frequency_hz"`
	S21DB       []float64 `json:"s21_db"`
	RangeLossDB []float64 `json:"range_loss_db"`
	// RangeDriftDB is |RL_pre - RL_post|; nil without a post measurement.
	RangeDriftDB []float64 `json:"range_drift_db,omitempty"`
	GainDBi      []float64 `json:"gain_dbi"`
	// GainExpandedUncertaintyDB is U (k = 2) of the gain.
	GainExpandedUncertaintyDB []float64 `json:"gain_expanded_uncertainty_db"`

	// GTdBPerK is G/T in the noise-density form when the beam has it,
	// otherwise in the system-noise-figure form; GTForm says which.
	GTdBPerK                []float64 `json:"gt_db_per_k"`
	GTExpandedUncertaintyDB []float64 `json:"gt_expanded_uncertainty_db"`
	GTForm                  string    `json:"gt_form"`
	// NoiseRelativeKT0DB is the output noise density above k*T0 on this
	// grid (the form GTdBPerK was computed from).
	NoiseRelativeKT0DB []float64 `json:"noise_relative_kt0_db,omitempty"`
	// OtherForm is the system-noise-figure G/T when the beam has both.
	OtherForm *OtherForm `json:"other_form,omitempty"`

	Noise []NoiseStatistics `json:"noise_statistics,omitempty"`

	// Interpolated says which inputs were put on this grid, and from what.
	Interpolated []string `json:"interpolated,omitempty"`

	GainBudget Budget `json:"gain_budget"`
	GTBudget   Budget `json:"gt_budget"`

	Projection *Projection `json:"projection,omitempty"`

	// LimitCurves are the limits that apply to this beam, each on the part
	// of the grid inside its band, for the workbook's per-frequency limit
	// and margin columns; nil when not filled.
	LimitCurves []LimitCurve `json:"limit_curves,omitempty"`
}

// LimitCurve is one limit's lower limit L(f) on a beam's grid (the scan
// law included): LimitDB[i] is the limit at FrequencyHz[Start+i], for the
// grid points inside the limit's band. Units are dB/K for quantity "gt" and
// dBi for "gain".
type LimitCurve struct {
	Name     string    `json:"name"`
	Quantity string    `json:"quantity"`
	Start    int       `json:"start"`
	LimitDB  []float64 `json:"limit_db"`
}

// OtherForm is the second G/T form of a beam that has both noise forms.
type OtherForm struct {
	Form               string    `json:"form"`
	GTdBPerK           []float64 `json:"gt_db_per_k"`
	DifferenceDB       []float64 `json:"difference_db"` // GTdBPerK(main) - GTdBPerK(other)
	MaxAbsDifferenceDB float64   `json:"max_abs_difference_db"`
	// MeanDifferenceDB is the band mean of DifferenceDB: the systematic
	// disagreement of the two forms, which the station's method tolerance
	// judges. The point-to-point scatter of two independent noise traces
	// would otherwise decide the flag.
	MeanDifferenceDB float64 `json:"mean_difference_db"`
}

// NoiseStatistics describes one noise trace of a beam.
type NoiseStatistics struct {
	File     string `json:"file"`
	Quantity string `json:"quantity"`
	// ScatterDB is the robust point-to-point standard deviation of the
	// trace (method.md section 5), after smoothing.
	ScatterDB float64 `json:"scatter_db"`
	// RadiometerDB is 4.343/sqrt(B*tau), or 0 when B or tau is not given.
	RadiometerDB float64 `json:"radiometer_db,omitempty"`
	// SmoothingPoints is the width of the centred moving average applied
	// (1: none).
	SmoothingPoints int `json:"smoothing_points"`
}

// Budget is an uncertainty budget per frequency point (GUM): one row per
// term, each with a value per frequency of the beam's grid.
type Budget struct {
	Terms []BudgetTerm `json:"terms"`
	// CombinedDB is u_c per frequency; ExpandedDB is k*u_c. result.json
	// leaves ExpandedDB out: it is the beam's GainExpandedUncertaintyDB or
	// GTExpandedUncertaintyDB, where render.ParseResultJSON takes it back
	// from.
	CombinedDB []float64 `json:"combined_db"`
	ExpandedDB []float64 `json:"-"`
	CoverageK  float64   `json:"coverage_k"`
}

// BudgetTerm is one row of a budget.
type BudgetTerm struct {
	Name         string  `json:"name"`
	Source       string  `json:"source"` // "data" or "station"
	Distribution string  `json:"distribution"`
	Divisor      float64 `json:"divisor"`
	// ValueDB is the stated value (expanded U, or half-width) per point;
	// StandardDB is ValueDB/Divisor. result.json leaves ValueDB out, as it
	// follows from the two fields it keeps; render.ParseResultJSON puts it
	// back as StandardDB*Divisor.
	ValueDB    []float64 `json:"-"`
	StandardDB []float64 `json:"standard_db,omitempty"`
	// ConstantStandardDB is how result.json writes a StandardDB that is
	// the same finite value at every frequency (most station terms, the
	// certificate's gain uncertainty): that value, with standard_db left
	// out. It is set only between reading a result.json and
	// render.ParseResultJSON expanding it into StandardDB; reduce never
	// sets it.
	ConstantStandardDB *float64 `json:"constant_standard_db,omitempty"`
}

// Projection is the derived G/T at an operating antenna temperature.
type Projection struct {
	PassiveGainDBi    float64   `json:"passive_gain_dbi"`
	ChamberAntennaK   float64   `json:"chamber_antenna_k"`
	OperatingAntennaK float64   `json:"operating_antenna_k"`
	SystemNoiseK      []float64 `json:"system_noise_k"`
	ReceiverNoiseK    []float64 `json:"receiver_noise_k"`
	OperatingGTdBPerK []float64 `json:"operating_gt_db_per_k"`
	Assumptions       string    `json:"assumptions"`
	// NegativeReceiverNoiseHz lists the frequencies where T_e came out
	// negative (declared passive gain too low); then OperatingGTdBPerK is
	// nil. See Usable.
	NegativeReceiverNoiseHz []float64 `json:"negative_receiver_noise_hz,omitempty"`
}

// LimitResult is the verdict of one limit on one beam.
type LimitResult struct {
	Name      string `json:"name"`
	Quantity  string `json:"quantity"`
	Beam      string `json:"beam"`
	Statistic string `json:"statistic"`
	// WorstMarginDB is x - L at the worst point (or of the band mean).
	WorstMarginDB float64 `json:"worst_margin_db"`
	// AtFrequencyHz is where the worst margin occurs (band centre for mean).
	AtFrequencyHz float64 `json:"at_frequency_hz"`
	ValueDB       float64 `json:"value_db"`
	LimitDB       float64 `json:"limit_db"`
	// ExpandedUncertaintyDB is U at that point.
	ExpandedUncertaintyDB float64 `json:"expanded_uncertainty_db"`
	Verdict               string  `json:"verdict"`
	// LimitCurve is the limit on this beam as the vertices of a
	// piecewise-linear line over the judged band (scan law applied), so
	// that a report can draw it; nil when not filled in.
	LimitCurve []LimitVertex `json:"limit_curve,omitempty"`
}

// LimitVertex is one vertex of a limit line.
type LimitVertex struct {
	FrequencyHz float64 `json:"frequency_hz"`
	ValueDB     float64 `json:"value_db"`
}

// Flag is a condition worth attention.
type Flag struct {
	Kind    string `json:"kind"` // drift | method | reference-expired | elements | watch | ...
	Beam    string `json:"beam,omitempty"`
	Message string `json:"message"`
}

// HistoryEntry is an earlier run of the same unit.
type HistoryEntry struct {
	Run     string `json:"run"`
	Started string `json:"started"`
	Verdict string `json:"verdict"`
	// WorstLimit and WorstMarginDB are the run's worst limit result (the
	// smallest finite margin), when it has one; Notes are its notes.
	WorstLimit    string   `json:"worst_limit,omitempty"`
	WorstBeam     string   `json:"worst_beam,omitempty"`
	WorstMarginDB *float64 `json:"worst_margin_db,omitempty"`
	Notes         string   `json:"notes_markdown,omitempty"`
	// RangeCheck is that run's range check (range health).
	RangeCheck *RangeCheck `json:"range_check,omitempty"`
}

// HistoryOf is what the report of a later run shows of this one.
func (u *Unit) HistoryOf() HistoryEntry {
	h := HistoryEntry{Run: u.Run, Started: u.Started, Verdict: u.Verdict, Notes: u.Notes, RangeCheck: u.RangeCheck}
	for _, l := range u.Limits {
		if math.IsNaN(l.WorstMarginDB) || math.IsInf(l.WorstMarginDB, 0) {
			continue
		}
		if h.WorstMarginDB == nil || l.WorstMarginDB < *h.WorstMarginDB {
			m := l.WorstMarginDB
			h.WorstLimit, h.WorstBeam, h.WorstMarginDB = l.Name, l.Beam, &m
		}
	}
	return h
}

// Scan is the scan behaviour of a unit (method.md section 8).
type Scan struct {
	FrequencyHz []float64 `json:"frequency_hz"`
	// ExponentN is the least-squares scan exponent per frequency;
	// MeanExponentN its band mean.
	ExponentN     []float64  `json:"exponent_n"`
	MeanExponentN float64    `json:"mean_exponent_n"`
	Beams         []ScanBeam `json:"beams"`
	// Polarization and BoresightBeam say which group of beams was compared
	// (beams are compared within one polarization only).
	Polarization  string `json:"polarization,omitempty"`
	BoresightBeam string `json:"boresight_beam"`
	// GainExponentN is the same fit on gain instead of G/T, per frequency,
	// nil when a beam has no gain; MeanGainExponentN its band mean.
	GainExponentN     []float64 `json:"gain_exponent_n,omitempty"`
	MeanGainExponentN float64   `json:"mean_gain_exponent_n,omitempty"`
	// LawExponentN is n_spec of the spec's scan law, when it has one.
	LawExponentN *float64 `json:"law_exponent_n,omitempty"`
}

// ScanBeam is one scanned beam's loss against boresight.
type ScanBeam struct {
	ID       string  `json:"id"`
	ThetaDeg float64 `json:"theta_deg"`
	// ScanLossDB is G/T(theta) - G/T(0) per frequency.
	ScanLossDB []float64 `json:"scan_loss_db"`
	// GainLossDB is G(theta) - G(0) per frequency, nil without gain.
	GainLossDB []float64 `json:"gain_loss_db,omitempty"`
	// LawLossDB is 10*n_spec*log10(cos theta), when the spec has a scan law.
	LawLossDB *float64 `json:"law_loss_db,omitempty"`
}

// ElementState is the array element analysis (method.md section 9).
type ElementState struct {
	Rows             int              `json:"rows"`
	Cols             int              `json:"cols"`
	ResidualPhaseDeg [][]float64      `json:"residual_phase_deg"` // [row][col], NaN-free; missing = 0 with Present false
	Present          [][]bool         `json:"present"`
	RMSResidualDeg   float64          `json:"rms_residual_deg"`
	PhaseLossDB      float64          `json:"phase_loss_db"`
	TaperEfficiency  float64          `json:"taper_efficiency"`
	TaperLossDB      float64          `json:"taper_loss_db"`
	Worst            []ElementOutlier `json:"worst"`
	ToleranceDeg     *float64         `json:"tolerance_deg,omitempty"`
	Flagged          bool             `json:"flagged"`
	// Elements is how many elements were analysed; FirstRow and FirstCol
	// are the row and column numbers of heat-map index [0][0].
	Elements int `json:"elements"`
	FirstRow int `json:"first_row"`
	FirstCol int `json:"first_col"`
	// RowSlopeDeg and ColSlopeDeg are the fitted plane's phase step per
	// row and per column (the steering gradient), wrapped to (-180, 180].
	RowSlopeDeg float64 `json:"row_slope_deg"`
	ColSlopeDeg float64 `json:"col_slope_deg"`
}

// ElementOutlier is an element far from the fitted plane.
type ElementOutlier struct {
	Row         int     `json:"row"`
	Col         int     `json:"col"`
	ResidualDeg float64 `json:"residual_deg"`
}
