package render

import (
	"math"
	"strconv"
	"time"

	"gtpack.example/gtpack/reduce"
)

// FleetSchema is the version of the fleet.json layout. Schema 2: the units
// carry one entry per limit name instead of every limit result of every
// beam.
const FleetSchema = 2

// The wire form of fleet.json: as result.json's (resultwire.go).

type fleetUnitWire struct {
	Serial       string               `json:"serial"`
	Product      string               `json:"product"`
	Started      stamp                `json:"started"`
	Verdict      reduce.Verdict       `json:"verdict"`
	Limits       []fleetUnitLimitWire `json:"limits"`
	Stale        string               `json:"stale,omitempty"`
	NoReport     bool                 `json:"no_report,omitempty"`
	Runs         int                  `json:"runs"`
	FirstVerdict reduce.Verdict       `json:"first_verdict"`
	CheckUnit    bool                 `json:"check_unit,omitempty"`
	IssueState   reduce.IssueState    `json:"issue_state,omitempty"`
	Revision     int                  `json:"revision,omitempty"`
	ReportNumber string               `json:"report_number,omitempty"`
}

type fleetUnitLimitWire struct {
	Name          string         `json:"name"`
	Beam          string         `json:"beam"`
	WorstMarginDB num            `json:"worst_margin_db"`
	Verdict       reduce.Verdict `json:"verdict"`
}

type productFleetWire struct {
	Product        string                 `json:"product"`
	Units          int                    `json:"units"`
	VerdictCounts  map[reduce.Verdict]int `json:"verdict_counts"`
	Limits         []limitStatsWire       `json:"limits"`
	Band           *goldenBandWire        `json:"band,omitempty"`
	Watch          []watchEntryWire       `json:"watch"`
	FirstPassYield num                    `json:"first_pass_yield"`
	FinalYield     num                    `json:"final_yield"`
	Months         []monthYieldWire       `json:"months"`
}

type monthYieldWire struct {
	Month          string                 `json:"month"`
	Units          int                    `json:"units"`
	VerdictCounts  map[reduce.Verdict]int `json:"verdict_counts"`
	FirstPassYield num                    `json:"first_pass_yield"`
	FinalYield     num                    `json:"final_yield"`
	Retested       int                    `json:"retested"`
}

type limitStatsWire struct {
	Name         string           `json:"name"`
	Units        int              `json:"units"`
	Passed       int              `json:"passed"`
	Yield        num              `json:"yield"`
	MeanMarginDB num              `json:"mean_margin_db"`
	StdMarginDB  num              `json:"std_margin_db"`
	Cpk          num              `json:"cpk"`
	Indicative   bool             `json:"indicative,omitempty"`
	Chart        controlChartWire `json:"control_chart"`
	Outliers     []outlierWire    `json:"outliers"`
}

type controlChartWire struct {
	Serials         []string `json:"serials"`
	Started         []stamp  `json:"started"`
	ValuesDB        nums     `json:"values_db"`
	CentreDB        num      `json:"centre_db"`
	UpperDB         num      `json:"upper_db"`
	LowerDB         num      `json:"lower_db"`
	MeanMovingRange num      `json:"mean_moving_range_db"`
	Beyond          []int    `json:"beyond"`
	TooFew          bool     `json:"too_few,omitempty"`
}

type outlierWire struct {
	Serial    string `json:"serial"`
	MarginDB  num    `json:"margin_db"`
	ModifiedZ num    `json:"modified_z"`
}

type goldenBandWire struct {
	FrequencyHz     nums `json:"frequency_hz"`
	MedianDB        nums `json:"median_db_per_k"`
	LowDB           nums `json:"low_db_per_k"`
	HighDB          nums `json:"high_db_per_k"`
	Units           int  `json:"units"`
	SmoothingPoints int  `json:"smoothing_points"`
}

type watchEntryWire struct {
	Serial           string   `json:"serial"`
	FrequenciesHz    nums     `json:"frequencies_hz"`
	RangesHz         [][2]num `json:"ranges_hz"`
	SpanHz           [2]num   `json:"span_hz"`
	Points           int      `json:"points"`
	WorstExcursionDB num      `json:"worst_excursion_db"`
	WorstAtHz        num      `json:"worst_at_hz"`
}

type rangeChartWire struct {
	Station          string           `json:"station"`
	Reference        string           `json:"reference"`
	FrequencyHz      num              `json:"frequency_hz"`
	DriftToleranceDB num              `json:"drift_tolerance_db"`
	Points           []rangePointWire `json:"points"`
	Baseline         int              `json:"baseline"`
	CentreDB         num              `json:"centre_db"`
	LCLDB            num              `json:"lcl_db"`
	UCLDB            num              `json:"ucl_db"`
	OutOfControl     []int            `json:"out_of_control"`
	TooFew           bool             `json:"too_few,omitempty"`
}

type rangePointWire struct {
	Serial      string `json:"serial"`
	Run         string `json:"run"`
	Started     stamp  `json:"started"`
	RangeLossDB num    `json:"range_loss_db"`
	DriftDB     *num   `json:"drift_db"`
}

type referenceHealthWire struct {
	ID           string           `json:"id"`
	Certificate  string           `json:"certificate"`
	Calibrated   day              `json:"calibrated"`
	Due          day              `json:"due"`
	RunsAfterDue []rangePointWire `json:"runs_after_due"`
}

type checkUnitChartWire struct {
	Serial       string           `json:"serial"`
	Station      string           `json:"station"`
	Beam         string           `json:"beam"`
	FrequencyHz  num              `json:"frequency_hz"`
	Points       []checkPointWire `json:"points"`
	Baseline     int              `json:"baseline"`
	CentreDB     num              `json:"centre_db_per_k"`
	LCLDB        num              `json:"lcl_db_per_k"`
	UCLDB        num              `json:"ucl_db_per_k"`
	OutOfControl []int            `json:"out_of_control"`
	TooFew       bool             `json:"too_few,omitempty"`
}

type checkPointWire struct {
	Run      string `json:"run"`
	Started  stamp  `json:"started"`
	GTdBPerK num    `json:"gt_db_per_k"`
}

func fleetUnitToWire(u reduce.FleetUnit) fleetUnitWire {
	return fleetUnitWire{Serial: u.Serial, Product: u.Product, Started: stamp(u.Started), Verdict: u.Verdict,
		Limits: list(convert(u.Limits, func(l reduce.FleetUnitLimit) fleetUnitLimitWire {
			return fleetUnitLimitWire{Name: l.Name, Beam: l.Beam, WorstMarginDB: num(l.WorstMarginDB), Verdict: l.Verdict}
		})),
		Stale: u.Stale, NoReport: u.NoReport, Runs: u.Runs, FirstVerdict: u.FirstVerdict, CheckUnit: u.CheckUnit,
		IssueState: u.IssueState, Revision: u.Revision, ReportNumber: u.ReportNumber}
}

func productFleetToWire(p reduce.ProductFleet) productFleetWire {
	w := productFleetWire{Product: p.Product, Units: p.Units, VerdictCounts: counts(p.VerdictCounts),
		Limits: list(convert(p.Limits, limitStatsToWire)),
		Watch: list(convert(p.Watch, func(e reduce.WatchEntry) watchEntryWire {
			return watchEntryWire{Serial: e.Serial, FrequenciesHz: e.FrequenciesHz,
				RangesHz: list(convert(e.RangesHz, pair)), SpanHz: pair(e.SpanHz), Points: e.Points,
				WorstExcursionDB: num(e.WorstExcursionDB), WorstAtHz: num(e.WorstAtHz)}
		})),
		FirstPassYield: num(p.FirstPassYield), FinalYield: num(p.FinalYield),
		Months: list(convert(p.Months, func(m reduce.MonthYield) monthYieldWire {
			return monthYieldWire{Month: m.Month, Units: m.Units, VerdictCounts: counts(m.VerdictCounts),
				FirstPassYield: num(m.FirstPassYield), FinalYield: num(m.FinalYield), Retested: m.Retested}
		}))}
	if b := p.Band; b != nil {
		w.Band = &goldenBandWire{FrequencyHz: b.FrequencyHz, MedianDB: b.MedianDB, LowDB: b.LowDB, HighDB: b.HighDB,
			Units: b.Units, SmoothingPoints: b.SmoothingPoints}
	}
	return w
}

// counts is a count per verdict, {} for nil.
func counts(m map[reduce.Verdict]int) map[reduce.Verdict]int {
	if m == nil {
		return map[reduce.Verdict]int{}
	}
	return m
}

func pair(p [2]float64) [2]num { return [2]num{num(p[0]), num(p[1])} }

func limitStatsToWire(l reduce.LimitStats) limitStatsWire {
	c := l.Chart
	return limitStatsWire{Name: l.Name, Units: l.Units, Passed: l.Passed, Yield: num(l.Yield),
		MeanMarginDB: num(l.MeanMarginDB), StdMarginDB: num(l.StdMarginDB), Cpk: num(l.Cpk), Indicative: l.Indicative,
		Chart: controlChartWire{Serials: list(c.Serials), Started: list(convert(c.Started, func(t time.Time) stamp { return stamp(t) })),
			ValuesDB: c.ValuesDB, CentreDB: num(c.CentreDB), UpperDB: num(c.UpperDB), LowerDB: num(c.LowerDB),
			MeanMovingRange: num(c.MeanMovingRange), Beyond: list(c.Beyond), TooFew: c.TooFew},
		Outliers: list(convert(l.Outliers, func(o reduce.Outlier) outlierWire {
			return outlierWire{Serial: o.Serial, MarginDB: num(o.MarginDB), ModifiedZ: num(o.ModifiedZ)}
		}))}
}

func rangePointToWire(p reduce.RangePoint) rangePointWire {
	return rangePointWire{Serial: p.Serial, Run: p.Run, Started: stamp(p.Started), RangeLossDB: num(p.RangeLossDB), DriftDB: ptrNum(p.DriftDB)}
}

func rangeChartToWire(c reduce.RangeChart) rangeChartWire {
	return rangeChartWire{Station: c.Station, Reference: c.Reference, FrequencyHz: num(c.FrequencyHz),
		DriftToleranceDB: num(c.DriftToleranceDB), Points: list(convert(c.Points, rangePointToWire)),
		Baseline: c.Baseline, CentreDB: num(c.CentreDB), LCLDB: num(c.LCLDB), UCLDB: num(c.UCLDB),
		OutOfControl: list(c.OutOfControl), TooFew: c.TooFew}
}

func referenceHealthToWire(r reduce.ReferenceHealth) referenceHealthWire {
	return referenceHealthWire{ID: r.ID, Certificate: r.Certificate, Calibrated: day(r.Calibrated), Due: day(r.Due),
		RunsAfterDue: list(convert(r.RunsAfterDue, rangePointToWire))}
}

func checkUnitChartToWire(c reduce.CheckUnitChart) checkUnitChartWire {
	return checkUnitChartWire{Serial: c.Serial, Station: c.Station, Beam: c.Beam, FrequencyHz: num(c.FrequencyHz),
		Points: list(convert(c.Points, func(p reduce.CheckPoint) checkPointWire {
			return checkPointWire{Run: p.Run, Started: stamp(p.Started), GTdBPerK: num(p.GTdBPerK)}
		})),
		Baseline: c.Baseline, CentreDB: num(c.CentreDB), LCLDB: num(c.LCLDB), UCLDB: num(c.UCLDB),
		OutOfControl: list(c.OutOfControl), TooFew: c.TooFew}
}

// SummaryRecord is the wire form of a reduce.UnitSummary in the build's
// cache (SITE/.gtpack/): internal, read only by the same tool version, so
// its layout may change with it. Its numbers are exact (the fleet pages
// are computed from them), and NaN is null.
type SummaryRecord struct {
	Serial       string             `json:"serial"`
	Product      string             `json:"product"`
	Started      stamp              `json:"started"`
	Verdict      reduce.Verdict     `json:"verdict"`
	Limits       []limitRecord      `json:"limits"`
	Boresight    *boresightRecord   `json:"boresight,omitempty"`
	Stale        string             `json:"stale,omitempty"`
	NoReport     bool               `json:"no_report,omitempty"`
	Runs         int                `json:"runs,omitempty"`
	FirstVerdict reduce.Verdict     `json:"first_verdict,omitempty"`
	RangeChecks  []rangeCheckRecord `json:"range_checks,omitempty"`
	CheckUnit    bool               `json:"check_unit,omitempty"`
	IssueState   reduce.IssueState  `json:"issue_state,omitempty"`
	Revision     int                `json:"revision,omitempty"`
	ReportNumber string             `json:"report_number,omitempty"`
}

// limitRecord is a limit result of a summary (without its limit line).
type limitRecord struct {
	Name                  string          `json:"name"`
	Quantity              reduce.Quantity `json:"quantity"`
	Beam                  string          `json:"beam"`
	Statistic             string          `json:"statistic"`
	WorstMarginDB         exact           `json:"worst_margin_db"`
	AtFrequencyHz         exact           `json:"at_frequency_hz"`
	ValueDB               exact           `json:"value_db"`
	LimitDB               exact           `json:"limit_db"`
	ExpandedUncertaintyDB exact           `json:"expanded_uncertainty_db"`
	Verdict               reduce.Verdict  `json:"verdict"`
}

// rangeCheckRecord is a range check of a summary: rangeCheckWire's fields
// with exact numbers (the range charts are computed from them).
type rangeCheckRecord struct {
	Run                  string `json:"run"`
	Started              stamp  `json:"started"`
	Station              string `json:"station"`
	Reference            string `json:"reference"`
	FrequencyHz          exact  `json:"frequency_hz"`
	RangeLossDB          exact  `json:"range_loss_db"`
	DriftDB              *exact `json:"drift_db,omitempty"`
	DriftToleranceDB     exact  `json:"drift_tolerance_db,omitempty"`
	Beam                 string `json:"beam,omitempty"`
	GTdBPerK             *exact `json:"gt_db_per_k,omitempty"`
	ReferenceCertificate string `json:"reference_certificate,omitempty"`
	ReferenceCalibrated  day    `json:"reference_calibrated,omitzero"`
	ReferenceDue         day    `json:"reference_due,omitzero"`
	PastDue              bool   `json:"past_due,omitempty"`
}

func rangeCheckToRecord(c reduce.RangeCheck) rangeCheckRecord {
	return rangeCheckRecord{Run: c.Run, Started: stamp(c.Started), Station: c.Station, Reference: c.Reference,
		FrequencyHz: exact(c.FrequencyHz), RangeLossDB: exact(c.RangeLossDB), DriftDB: (*exact)(c.DriftDB),
		DriftToleranceDB: exact(c.DriftToleranceDB), Beam: c.Beam, GTdBPerK: (*exact)(c.GTdBPerK),
		ReferenceCertificate: c.ReferenceCertificate, ReferenceCalibrated: day(c.ReferenceCalibrated),
		ReferenceDue: day(c.ReferenceDue), PastDue: c.PastDue}
}

func rangeCheckFromRecord(r rangeCheckRecord) reduce.RangeCheck {
	return reduce.RangeCheck{Run: r.Run, Started: time.Time(r.Started), Station: r.Station, Reference: r.Reference,
		FrequencyHz: float64(r.FrequencyHz), RangeLossDB: float64(r.RangeLossDB), DriftDB: (*float64)(r.DriftDB),
		DriftToleranceDB: float64(r.DriftToleranceDB), Beam: r.Beam, GTdBPerK: (*float64)(r.GTdBPerK),
		ReferenceCertificate: r.ReferenceCertificate, ReferenceCalibrated: time.Time(r.ReferenceCalibrated),
		ReferenceDue: time.Time(r.ReferenceDue), PastDue: r.PastDue}
}

type boresightRecord struct {
	Beam        string `json:"beam"`
	FrequencyHz exacts `json:"frequency_hz"`
	GTdBPerK    exacts `json:"gt_db_per_k"`
}

// exact is a float64 written in full, as encoding/json writes it (the
// shortest text that reads back as the same value), but null when not
// finite; null reads back as NaN.
type exact float64

func (x exact) MarshalJSON() ([]byte, error) { return appendExact(nil, float64(x)), nil }

func (x *exact) UnmarshalJSON(b []byte) error {
	f, err := parseNumber(b)
	*x = exact(f)
	return err
}

// exacts is a list of exact numbers, written and read as a whole.
type exacts []float64

func (xs exacts) MarshalJSON() ([]byte, error) {
	b := append(make([]byte, 0, 2+len(xs)*20), '[')
	for i, x := range xs {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendExact(b, x)
	}
	return append(b, ']'), nil
}

func (xs *exacts) UnmarshalJSON(b []byte) error { return (*nums)(xs).UnmarshalJSON(b) }

func appendExact(b []byte, f float64) []byte {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return append(b, "null"...)
	}
	format := byte('f')
	if abs := math.Abs(f); abs != 0 && (abs < 1e-6 || abs >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, f, format, -1, 64)
	if n := len(b); format == 'e' && n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
		b[n-2] = b[n-1] // e-07 as e-7
		b = b[:n-1]
	}
	return b
}

// SummaryRecordOf is the record of s.
func SummaryRecordOf(s reduce.UnitSummary) SummaryRecord {
	r := SummaryRecord{Serial: s.Serial, Product: s.Product, Started: stamp(s.Started), Verdict: s.Verdict,
		Limits: convert(s.Limits, func(l reduce.LimitResult) limitRecord {
			return limitRecord{Name: l.Name, Quantity: l.Quantity, Beam: l.Beam, Statistic: l.Statistic,
				WorstMarginDB: exact(l.WorstMarginDB), AtFrequencyHz: exact(l.AtFrequencyHz), ValueDB: exact(l.ValueDB),
				LimitDB: exact(l.LimitDB), ExpandedUncertaintyDB: exact(l.ExpandedUncertaintyDB), Verdict: l.Verdict}
		}),
		Stale: s.Stale, NoReport: s.NoReport, Runs: s.Runs, FirstVerdict: s.FirstVerdict,
		RangeChecks: convert(s.RangeChecks, rangeCheckToRecord), CheckUnit: s.CheckUnit,
		IssueState: s.IssueState, Revision: s.Revision, ReportNumber: s.ReportNumber}
	if b := s.Boresight; b != nil {
		r.Boresight = &boresightRecord{Beam: b.Beam, FrequencyHz: b.FrequencyHz, GTdBPerK: b.GTdBPerK}
	}
	return r
}

// Summary is the summary the record holds.
func (r SummaryRecord) Summary() reduce.UnitSummary {
	s := reduce.UnitSummary{Serial: r.Serial, Product: r.Product, Started: time.Time(r.Started), Verdict: r.Verdict,
		Limits: convert(r.Limits, func(l limitRecord) reduce.LimitResult {
			return reduce.LimitResult{Name: l.Name, Quantity: l.Quantity, Beam: l.Beam, Statistic: l.Statistic,
				WorstMarginDB: float64(l.WorstMarginDB), AtFrequencyHz: float64(l.AtFrequencyHz), ValueDB: float64(l.ValueDB),
				LimitDB: float64(l.LimitDB), ExpandedUncertaintyDB: float64(l.ExpandedUncertaintyDB), Verdict: l.Verdict}
		}),
		Stale: r.Stale, NoReport: r.NoReport, Runs: r.Runs, FirstVerdict: r.FirstVerdict,
		RangeChecks: convert(r.RangeChecks, rangeCheckFromRecord), CheckUnit: r.CheckUnit,
		IssueState: r.IssueState, Revision: r.Revision, ReportNumber: r.ReportNumber}
	if b := r.Boresight; b != nil {
		s.Boresight = &reduce.BoresightTrace{Beam: b.Beam, FrequencyHz: b.FrequencyHz, GTdBPerK: b.GTdBPerK}
	}
	return s
}
