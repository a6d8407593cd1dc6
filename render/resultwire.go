package render

import (
	"math"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// ResultSchema is the version of the result.json layout. Schema 2 writes
// the budgets short (below).
const ResultSchema = 2

// The wire form of result.json (archive-format.md, "Site layout", names
// its main fields): field names and order are public, empty lists are []
// rather than null, so that readers can take the length of any list the
// contract names. Schema 2 writes the budgets short: a term the
// same at every frequency as one value (constant_standard_db), no
// expanded_db beside the beam's expanded uncertainty (the same list), and
// no stated values beside the standard ones (value = standard * divisor).

type unitWire struct {
	Schema       int            `json:"schema"`
	Serial       string         `json:"serial"`
	Product      string         `json:"product"`
	Run          string         `json:"run"`
	Started      stamp          `json:"started"`
	Verdict      reduce.Verdict `json:"verdict"`
	DecisionRule string         `json:"decision_rule"`
	SpecTitle    string         `json:"spec_title,omitempty"`

	Station   stationWire   `json:"station"`
	Reference referenceWire `json:"reference"`
	Operator  string        `json:"operator"`
	AmbientC  num           `json:"ambient_c"`
	Firmware  string        `json:"firmware,omitempty"`

	Beams    []beamWire         `json:"beams"`
	Limits   []limitResultWire  `json:"limits"`
	Flags    []flagWire         `json:"flags"`
	Problems []ingest.Problem   `json:"problems"`
	History  []historyWire      `json:"history"`
	Scan     *scanWire          `json:"scan,omitempty"`
	Elements *elementsWire      `json:"elements,omitempty"`
	Notes    string             `json:"notes_markdown,omitempty"`
	Inputs   []ingest.InputFile `json:"inputs"`

	RangeCheck *rangeCheckWire `json:"range_check,omitempty"`
	CheckUnit  bool            `json:"check_unit,omitempty"`
	Lab        *labWire        `json:"lab,omitempty"`
	Customer   *customerWire   `json:"customer,omitempty"`
	Issue      issueWire       `json:"issue"`
}

type labWire struct {
	Name          string   `json:"name"`
	Address       []string `json:"address"`
	Contact       string   `json:"contact,omitempty"`
	Accreditation string   `json:"accreditation,omitempty"`
}

type customerWire struct {
	Name    string   `json:"name"`
	Address []string `json:"address,omitempty"`
	Order   string   `json:"order,omitempty"`
}

type stationWire struct {
	ID                string `json:"id"`
	Description       string `json:"description"`
	ReceiverMatch     num    `json:"receiver_match"`
	DriftToleranceDB  num    `json:"drift_tolerance_db"`
	MethodToleranceDB num    `json:"method_tolerance_db"`
}

type referenceWire struct {
	ID          string `json:"id"`
	Description string `json:"description"`
	Certificate string `json:"certificate"`
	Calibrated  day    `json:"calibrated"`
	Due         day    `json:"due"`
	GainKind    string `json:"gain_kind"`
	Expired     bool   `json:"expired"`
}

type beamWire struct {
	ID           string `json:"id"`
	ThetaDeg     num    `json:"theta_deg"`
	PhiDeg       num    `json:"phi_deg"`
	Polarization string `json:"polarization,omitempty"`

	FrequencyHz               beamNums `json:"frequency_hz"`
	S21DB                     beamNums `json:"s21_db"`
	RangeLossDB               beamNums `json:"range_loss_db"`
	RangeDriftDB              beamNums `json:"range_drift_db,omitzero"`
	GainDBi                   beamNums `json:"gain_dbi"`
	GainExpandedUncertaintyDB beamNums `json:"gain_expanded_uncertainty_db"`

	GTdBPerK                beamNums         `json:"gt_db_per_k"`
	GTExpandedUncertaintyDB beamNums         `json:"gt_expanded_uncertainty_db"`
	GTForm                  reduce.GTForm    `json:"gt_form"`
	NoiseRelativeKT0DB      beamNums         `json:"noise_relative_kt0_db,omitzero"`
	OtherForm               *otherFormWire   `json:"other_form,omitempty"`
	Noise                   []noiseStatsWire `json:"noise_statistics,omitempty"`
	Interpolated            []string         `json:"interpolated,omitempty"`
	GainBudget              budgetWire       `json:"gain_budget"`
	GTBudget                budgetWire       `json:"gt_budget"`
	Projection              *projectionWire  `json:"projection,omitempty"`
	LimitCurves             []limitCurveWire `json:"limit_curves,omitempty"`
}

type limitCurveWire struct {
	Name     string          `json:"name"`
	Quantity reduce.Quantity `json:"quantity"`
	Start    int             `json:"start"`
	LimitDB  beamNums        `json:"limit_db"`
}

type otherFormWire struct {
	Form               reduce.GTForm `json:"form"`
	GTdBPerK           beamNums      `json:"gt_db_per_k"`
	DifferenceDB       beamNums      `json:"difference_db"`
	MaxAbsDifferenceDB num           `json:"max_abs_difference_db"`
	MeanDifferenceDB   num           `json:"mean_difference_db"`
}

type noiseStatsWire struct {
	File            string `json:"file"`
	Quantity        string `json:"quantity"`
	ScatterDB       num    `json:"scatter_db"`
	RadiometerDB    num    `json:"radiometer_db,omitempty"`
	SmoothingPoints int    `json:"smoothing_points"`
}

type budgetWire struct {
	Terms      []budgetTermWire `json:"terms"`
	CombinedDB beamNums         `json:"combined_db"`
	CoverageK  num              `json:"coverage_k"`
}

// budgetTermWire writes a standard uncertainty that is the same finite
// value at every frequency (most station terms, the certificate's gain
// uncertainty) as ConstantStandardDB, without StandardDB.
type budgetTermWire struct {
	Name               string            `json:"name"`
	Source             reduce.TermSource `json:"source"`
	Distribution       string            `json:"distribution"`
	Divisor            num               `json:"divisor"`
	StandardDB         beamNums          `json:"standard_db,omitzero"`
	ConstantStandardDB *num              `json:"constant_standard_db,omitempty"`
}

type projectionWire struct {
	PassiveGainDBi          num      `json:"passive_gain_dbi"`
	ChamberAntennaK         num      `json:"chamber_antenna_k"`
	OperatingAntennaK       num      `json:"operating_antenna_k"`
	SystemNoiseK            beamNums `json:"system_noise_k"`
	ReceiverNoiseK          beamNums `json:"receiver_noise_k"`
	OperatingGTdBPerK       beamNums `json:"operating_gt_db_per_k"`
	Assumptions             string   `json:"assumptions"`
	NegativeReceiverNoiseHz beamNums `json:"negative_receiver_noise_hz,omitzero"`
}

type limitResultWire struct {
	Name                  string            `json:"name"`
	Quantity              reduce.Quantity   `json:"quantity"`
	Beam                  string            `json:"beam"`
	Statistic             string            `json:"statistic"`
	WorstMarginDB         num               `json:"worst_margin_db"`
	AtFrequencyHz         num               `json:"at_frequency_hz"`
	ValueDB               num               `json:"value_db"`
	LimitDB               num               `json:"limit_db"`
	ExpandedUncertaintyDB num               `json:"expanded_uncertainty_db"`
	Verdict               reduce.Verdict    `json:"verdict"`
	LimitCurve            []limitVertexWire `json:"limit_curve,omitempty"`
}

type limitVertexWire struct {
	FrequencyHz num `json:"frequency_hz"`
	ValueDB     num `json:"value_db"`
}

type flagWire struct {
	Kind    reduce.FlagKind `json:"kind"`
	Beam    string          `json:"beam,omitempty"`
	Message string          `json:"message"`
}

type historyWire struct {
	Run           string          `json:"run"`
	Started       stamp           `json:"started"`
	Verdict       reduce.Verdict  `json:"verdict"`
	WorstLimit    string          `json:"worst_limit,omitempty"`
	WorstBeam     string          `json:"worst_beam,omitempty"`
	WorstMarginDB *num            `json:"worst_margin_db,omitempty"`
	Notes         string          `json:"notes_markdown,omitempty"`
	RangeCheck    *rangeCheckWire `json:"range_check,omitempty"`
}

type scanWire struct {
	FrequencyHz       nums           `json:"frequency_hz"`
	ExponentN         nums           `json:"exponent_n"`
	MeanExponentN     num            `json:"mean_exponent_n"`
	Beams             []scanBeamWire `json:"beams"`
	Polarization      string         `json:"polarization,omitempty"`
	BoresightBeam     string         `json:"boresight_beam"`
	GainExponentN     nums           `json:"gain_exponent_n,omitempty"`
	MeanGainExponentN num            `json:"mean_gain_exponent_n,omitempty"`
	LawExponentN      *num           `json:"law_exponent_n,omitempty"`
}

type scanBeamWire struct {
	ID         string `json:"id"`
	ThetaDeg   num    `json:"theta_deg"`
	ScanLossDB nums   `json:"scan_loss_db"`
	GainLossDB nums   `json:"gain_loss_db,omitempty"`
	LawLossDB  *num   `json:"law_loss_db,omitempty"`
}

type elementsWire struct {
	Rows             int                  `json:"rows"`
	Cols             int                  `json:"cols"`
	ResidualPhaseDeg []nums               `json:"residual_phase_deg"`
	Present          [][]bool             `json:"present"`
	RMSResidualDeg   num                  `json:"rms_residual_deg"`
	PhaseLossDB      num                  `json:"phase_loss_db"`
	TaperEfficiency  num                  `json:"taper_efficiency"`
	TaperLossDB      num                  `json:"taper_loss_db"`
	Worst            []elementOutlierWire `json:"worst"`
	ToleranceDeg     *num                 `json:"tolerance_deg,omitempty"`
	Flagged          bool                 `json:"flagged"`
	Elements         int                  `json:"elements"`
	FirstRow         int                  `json:"first_row"`
	FirstCol         int                  `json:"first_col"`
	RowSlopeDeg      num                  `json:"row_slope_deg"`
	ColSlopeDeg      num                  `json:"col_slope_deg"`
}

type elementOutlierWire struct {
	Row         int `json:"row"`
	Col         int `json:"col"`
	ResidualDeg num `json:"residual_deg"`
}

type rangeCheckWire struct {
	Run                  string `json:"run"`
	Started              stamp  `json:"started"`
	Station              string `json:"station"`
	Reference            string `json:"reference"`
	FrequencyHz          num    `json:"frequency_hz"`
	RangeLossDB          num    `json:"range_loss_db"`
	DriftDB              *num   `json:"drift_db,omitempty"`
	DriftToleranceDB     num    `json:"drift_tolerance_db,omitempty"`
	Beam                 string `json:"beam,omitempty"`
	GTdBPerK             *num   `json:"gt_db_per_k,omitempty"`
	ReferenceCertificate string `json:"reference_certificate,omitempty"`
	ReferenceCalibrated  day    `json:"reference_calibrated,omitzero"`
	ReferenceDue         day    `json:"reference_due,omitzero"`
	PastDue              bool   `json:"past_due,omitempty"`
}

type issueWire struct {
	State        reduce.IssueState `json:"state"`
	Revision     int               `json:"revision"`
	ReportNumber string            `json:"report_number,omitempty"`
	Issued       stamp             `json:"issued,omitzero"`
	Signatures   []signatureWire   `json:"signatures,omitempty"`
	Replaces     string            `json:"replaces,omitempty"`
	Void         string            `json:"void,omitempty"`
	Why          string            `json:"why,omitempty"`
	InputsSHA256 string            `json:"inputs_sha256"`
}

type signatureWire struct {
	By      string `json:"by"`
	Role    string `json:"role,omitempty"`
	Date    stamp  `json:"date"`
	Comment string `json:"comment,omitempty"`
	File    string `json:"file"`
}

// list is xs, or an empty list for nil: a list outside omitempty is
// written as [], never null.
func list[T any](xs []T) []T {
	if xs == nil {
		return []T{}
	}
	return xs
}

// convert is f of every item of xs; nil for nil.
func convert[T, W any](xs []T, f func(T) W) []W {
	if xs == nil {
		return nil
	}
	out := make([]W, len(xs))
	for i, x := range xs {
		out[i] = f(x)
	}
	return out
}

// optional is a pointer to a value of the wire, nil for NaN (absent).
func optional(x float64) *num {
	if math.IsNaN(x) {
		return nil
	}
	v := num(x)
	return &v
}

// ptrNum is the wire form of a pointer to a float64 (nil: absent).
func ptrNum(p *float64) *num {
	if p == nil {
		return nil
	}
	v := num(*p)
	return &v
}

// ptrFloat reads a pointer to a number of the wire form back.
func ptrFloat(p *num) *float64 {
	if p == nil {
		return nil
	}
	v := float64(*p)
	return &v
}

func floatOrNaN(p *num) float64 {
	if p == nil {
		return math.NaN()
	}
	return float64(*p)
}

// unitToWire is the wire form of u whose beams' lists go to sink (nil:
// written in place; see beamNums).
func unitToWire(u *reduce.Unit, sink *listSink) *unitWire {
	w := &unitWire{
		Schema: ResultSchema, Serial: u.Serial, Product: u.Product, Run: u.Run,
		Started: stamp(u.Started), Verdict: u.Verdict, DecisionRule: u.DecisionRule, SpecTitle: u.SpecTitle,
		Station: stationWire{ID: u.Station.ID, Description: u.Station.Description, ReceiverMatch: num(u.Station.ReceiverMatch),
			DriftToleranceDB: num(u.Station.DriftToleranceDB), MethodToleranceDB: num(u.Station.MethodToleranceDB)},
		Reference: referenceWire{ID: u.Reference.ID, Description: u.Reference.Description, Certificate: u.Reference.Certificate,
			Calibrated: day(u.Reference.Calibrated), Due: day(u.Reference.Due), GainKind: u.Reference.GainKind, Expired: u.Reference.Expired},
		Operator: u.Operator, AmbientC: num(u.AmbientC), Firmware: u.Firmware,
		Beams:      list(convert(u.Beams, func(b reduce.Beam) beamWire { return beamToWire(b, sink) })),
		Limits:     list(convert(u.Limits, limitResultToWire)),
		Flags:      list(convert(u.Flags, func(f reduce.Flag) flagWire { return flagWire(f) })),
		Problems:   list(u.Problems),
		History:    list(convert(u.History, historyToWire)),
		Notes:      u.Notes,
		Inputs:     list(u.Inputs),
		RangeCheck: rangeCheckPtrToWire(u.RangeCheck),
		CheckUnit:  u.CheckUnit,
		Issue:      issueToWire(u.Issue),
	}
	if s := u.Scan; s != nil {
		w.Scan = &scanWire{FrequencyHz: s.FrequencyHz, ExponentN: s.ExponentN, MeanExponentN: num(s.MeanExponentN),
			Beams: list(convert(s.Beams, func(b reduce.ScanBeam) scanBeamWire {
				return scanBeamWire{ID: b.ID, ThetaDeg: num(b.ThetaDeg), ScanLossDB: b.ScanLossDB, GainLossDB: b.GainLossDB, LawLossDB: ptrNum(b.LawLossDB)}
			})),
			Polarization: s.Polarization, BoresightBeam: s.BoresightBeam, GainExponentN: s.GainExponentN,
			MeanGainExponentN: num(s.MeanGainExponentN), LawExponentN: ptrNum(s.LawExponentN)}
	}
	if e := u.Elements; e != nil {
		w.Elements = &elementsWire{Rows: e.Rows, Cols: e.Cols,
			ResidualPhaseDeg: list(convert(e.ResidualPhaseDeg, func(r []float64) nums { return r })),
			Present:          list(convert(e.Present, list[bool])),
			RMSResidualDeg:   num(e.RMSResidualDeg), PhaseLossDB: num(e.PhaseLossDB),
			TaperEfficiency: num(e.TaperEfficiency), TaperLossDB: num(e.TaperLossDB),
			Worst: list(convert(e.Worst, func(o reduce.ElementOutlier) elementOutlierWire {
				return elementOutlierWire{Row: o.Row, Col: o.Col, ResidualDeg: num(o.ResidualDeg)}
			})),
			ToleranceDeg: ptrNum(e.ToleranceDeg), Flagged: e.Flagged, Elements: e.Elements, FirstRow: e.FirstRow, FirstCol: e.FirstCol,
			RowSlopeDeg: num(e.RowSlopeDeg), ColSlopeDeg: num(e.ColSlopeDeg)}
	}
	if l := u.Lab; l != nil {
		w.Lab = &labWire{Name: l.Name, Address: list(l.Address), Contact: l.Contact, Accreditation: l.Accreditation}
	}
	if c := u.Customer; c != nil {
		w.Customer = &customerWire{Name: c.Name, Address: c.Address, Order: c.Order}
	}
	return w
}

// beamToWire is the wire form of a beam whose lists go to sink (nil:
// written in place; see beamNums).
func beamToWire(b reduce.Beam, sink *listSink) beamWire {
	l := func(xs []float64) beamNums { return beamNums{xs, sink} }
	w := beamWire{ID: b.ID, ThetaDeg: num(b.ThetaDeg), PhiDeg: num(b.PhiDeg), Polarization: b.Polarization,
		FrequencyHz: l(b.FrequencyHz), S21DB: l(b.S21DB), RangeLossDB: l(b.RangeLossDB), RangeDriftDB: l(b.RangeDriftDB),
		GainDBi: l(b.GainDBi), GainExpandedUncertaintyDB: l(b.GainExpandedUncertaintyDB),
		GTdBPerK: l(b.GTdBPerK), GTExpandedUncertaintyDB: l(b.GTExpandedUncertaintyDB), GTForm: b.GTForm,
		NoiseRelativeKT0DB: l(b.NoiseRelativeKT0DB),
		Noise: convert(b.Noise, func(n reduce.NoiseStatistics) noiseStatsWire {
			return noiseStatsWire{File: n.File, Quantity: n.Quantity, ScatterDB: num(n.ScatterDB), RadiometerDB: num(n.RadiometerDB), SmoothingPoints: n.SmoothingPoints}
		}),
		Interpolated: b.Interpolated,
		GainBudget:   budgetToWire(b.GainBudget, sink),
		GTBudget:     budgetToWire(b.GTBudget, sink),
		LimitCurves: convert(b.LimitCurves, func(c reduce.LimitCurve) limitCurveWire {
			return limitCurveWire{Name: c.Name, Quantity: c.Quantity, Start: c.Start, LimitDB: l(c.LimitDB)}
		}),
	}
	if o := b.OtherForm; o != nil {
		w.OtherForm = &otherFormWire{Form: o.Form, GTdBPerK: l(o.GTdBPerK), DifferenceDB: l(o.DifferenceDB),
			MaxAbsDifferenceDB: num(o.MaxAbsDifferenceDB), MeanDifferenceDB: num(o.MeanDifferenceDB)}
	}
	if p := b.Projection; p != nil {
		w.Projection = &projectionWire{PassiveGainDBi: num(p.PassiveGainDBi), ChamberAntennaK: num(p.ChamberAntennaK),
			OperatingAntennaK: num(p.OperatingAntennaK), SystemNoiseK: l(p.SystemNoiseK), ReceiverNoiseK: l(p.ReceiverNoiseK),
			OperatingGTdBPerK: l(p.OperatingGTdBPerK), Assumptions: p.Assumptions, NegativeReceiverNoiseHz: l(p.NegativeReceiverNoiseHz)}
	}
	return w
}

func budgetToWire(b reduce.Budget, sink *listSink) budgetWire {
	terms := list(convert(b.Terms, func(t reduce.BudgetTerm) budgetTermWire {
		w := budgetTermWire{Name: t.Name, Source: t.Source, Distribution: t.Distribution, Divisor: num(t.Divisor), StandardDB: beamNums{t.StandardDB, sink}}
		if x, ok := constant(t.StandardDB); ok {
			w.StandardDB, w.ConstantStandardDB = beamNums{}, optional(x)
		}
		return w
	}))
	return budgetWire{Terms: terms, CombinedDB: beamNums{b.CombinedDB, sink}, CoverageK: num(b.CoverageK)}
}

// constant is the one finite value every item of xs holds, if it holds
// one.
func constant(xs []float64) (float64, bool) {
	if len(xs) == 0 || math.IsNaN(xs[0]) || math.IsInf(xs[0], 0) {
		return 0, false
	}
	for _, y := range xs[1:] {
		if y != xs[0] {
			return 0, false
		}
	}
	return xs[0], true
}

func limitResultToWire(l reduce.LimitResult) limitResultWire {
	return limitResultWire{Name: l.Name, Quantity: l.Quantity, Beam: l.Beam, Statistic: l.Statistic,
		WorstMarginDB: num(l.WorstMarginDB), AtFrequencyHz: num(l.AtFrequencyHz), ValueDB: num(l.ValueDB),
		LimitDB: num(l.LimitDB), ExpandedUncertaintyDB: num(l.ExpandedUncertaintyDB), Verdict: l.Verdict,
		LimitCurve: convert(l.LimitCurve, func(v reduce.LimitVertex) limitVertexWire {
			return limitVertexWire{FrequencyHz: num(v.FrequencyHz), ValueDB: num(v.ValueDB)}
		})}
}

func historyToWire(h reduce.HistoryEntry) historyWire {
	return historyWire{Run: h.Run, Started: stamp(h.Started), Verdict: h.Verdict, WorstLimit: h.WorstLimit, WorstBeam: h.WorstBeam,
		WorstMarginDB: optional(h.WorstMarginDB), Notes: h.Notes, RangeCheck: rangeCheckPtrToWire(h.RangeCheck)}
}

func rangeCheckToWire(c reduce.RangeCheck) rangeCheckWire {
	return rangeCheckWire{Run: c.Run, Started: stamp(c.Started), Station: c.Station, Reference: c.Reference,
		FrequencyHz: num(c.FrequencyHz), RangeLossDB: num(c.RangeLossDB), DriftDB: ptrNum(c.DriftDB),
		DriftToleranceDB: num(c.DriftToleranceDB), Beam: c.Beam, GTdBPerK: ptrNum(c.GTdBPerK),
		ReferenceCertificate: c.ReferenceCertificate, ReferenceCalibrated: day(c.ReferenceCalibrated),
		ReferenceDue: day(c.ReferenceDue), PastDue: c.PastDue}
}

func rangeCheckPtrToWire(c *reduce.RangeCheck) *rangeCheckWire {
	if c == nil {
		return nil
	}
	w := rangeCheckToWire(*c)
	return &w
}

func issueToWire(is reduce.Issue) issueWire {
	return issueWire{State: is.State, Revision: is.Revision, ReportNumber: is.ReportNumber, Issued: stamp(is.Issued),
		Signatures: convert(is.Signatures, func(s reduce.Signature) signatureWire {
			return signatureWire{By: s.By, Role: s.Role, Date: stamp(s.Date), Comment: s.Comment, File: s.File}
		}),
		Replaces: is.Replaces, Void: is.Void, Why: is.Why, InputsSHA256: is.InputsSHA256}
}

// The way back, for ParseResultJSON: the budgets in full again.

func unitFromWire(w *unitWire) *reduce.Unit {
	u := &reduce.Unit{
		Serial: w.Serial, Product: w.Product, Run: w.Run, Started: time.Time(w.Started), Verdict: w.Verdict,
		DecisionRule: w.DecisionRule, SpecTitle: w.SpecTitle,
		Station: reduce.StationInfo{ID: w.Station.ID, Description: w.Station.Description, ReceiverMatch: float64(w.Station.ReceiverMatch),
			DriftToleranceDB: float64(w.Station.DriftToleranceDB), MethodToleranceDB: float64(w.Station.MethodToleranceDB)},
		Reference: reduce.ReferenceInfo{ID: w.Reference.ID, Description: w.Reference.Description, Certificate: w.Reference.Certificate,
			Calibrated: time.Time(w.Reference.Calibrated), Due: time.Time(w.Reference.Due), GainKind: w.Reference.GainKind, Expired: w.Reference.Expired},
		Operator: w.Operator, AmbientC: float64(w.AmbientC), Firmware: w.Firmware,
		Beams:    convert(w.Beams, beamFromWire),
		Limits:   convert(w.Limits, limitResultFromWire),
		Flags:    convert(w.Flags, func(f flagWire) reduce.Flag { return reduce.Flag(f) }),
		Problems: w.Problems,
		History: convert(w.History, func(h historyWire) reduce.HistoryEntry {
			return reduce.HistoryEntry{Run: h.Run, Started: time.Time(h.Started), Verdict: h.Verdict, WorstLimit: h.WorstLimit, WorstBeam: h.WorstBeam,
				WorstMarginDB: floatOrNaN(h.WorstMarginDB), Notes: h.Notes, RangeCheck: rangeCheckPtrFromWire(h.RangeCheck)}
		}),
		Notes:      w.Notes,
		Inputs:     w.Inputs,
		RangeCheck: rangeCheckPtrFromWire(w.RangeCheck),
		CheckUnit:  w.CheckUnit,
		Issue: reduce.Issue{State: w.Issue.State, Revision: w.Issue.Revision, ReportNumber: w.Issue.ReportNumber, Issued: time.Time(w.Issue.Issued),
			Signatures: convert(w.Issue.Signatures, func(s signatureWire) reduce.Signature {
				return reduce.Signature{By: s.By, Role: s.Role, Date: time.Time(s.Date), Comment: s.Comment, File: s.File}
			}),
			Replaces: w.Issue.Replaces, Void: w.Issue.Void, Why: w.Issue.Why, InputsSHA256: w.Issue.InputsSHA256},
	}
	if s := w.Scan; s != nil {
		u.Scan = &reduce.Scan{FrequencyHz: s.FrequencyHz, ExponentN: s.ExponentN, MeanExponentN: float64(s.MeanExponentN),
			Beams: convert(s.Beams, func(b scanBeamWire) reduce.ScanBeam {
				return reduce.ScanBeam{ID: b.ID, ThetaDeg: float64(b.ThetaDeg), ScanLossDB: b.ScanLossDB, GainLossDB: b.GainLossDB, LawLossDB: ptrFloat(b.LawLossDB)}
			}),
			Polarization: s.Polarization, BoresightBeam: s.BoresightBeam, GainExponentN: s.GainExponentN,
			MeanGainExponentN: float64(s.MeanGainExponentN), LawExponentN: ptrFloat(s.LawExponentN)}
	}
	if e := w.Elements; e != nil {
		u.Elements = &reduce.ElementState{Rows: e.Rows, Cols: e.Cols,
			ResidualPhaseDeg: convert(e.ResidualPhaseDeg, func(r nums) []float64 { return r }),
			Present:          e.Present,
			RMSResidualDeg:   float64(e.RMSResidualDeg), PhaseLossDB: float64(e.PhaseLossDB),
			TaperEfficiency: float64(e.TaperEfficiency), TaperLossDB: float64(e.TaperLossDB),
			Worst: convert(e.Worst, func(o elementOutlierWire) reduce.ElementOutlier {
				return reduce.ElementOutlier{Row: o.Row, Col: o.Col, ResidualDeg: float64(o.ResidualDeg)}
			}),
			ToleranceDeg: ptrFloat(e.ToleranceDeg), Flagged: e.Flagged, Elements: e.Elements, FirstRow: e.FirstRow, FirstCol: e.FirstCol,
			RowSlopeDeg: float64(e.RowSlopeDeg), ColSlopeDeg: float64(e.ColSlopeDeg)}
	}
	if l := w.Lab; l != nil {
		u.Lab = &reduce.LabInfo{Name: l.Name, Address: l.Address, Contact: l.Contact, Accreditation: l.Accreditation}
	}
	if c := w.Customer; c != nil {
		u.Customer = &reduce.CustomerInfo{Name: c.Name, Address: c.Address, Order: c.Order}
	}
	return u
}

func beamFromWire(w beamWire) reduce.Beam {
	b := reduce.Beam{ID: w.ID, ThetaDeg: float64(w.ThetaDeg), PhiDeg: float64(w.PhiDeg), Polarization: w.Polarization,
		FrequencyHz: w.FrequencyHz.xs, S21DB: w.S21DB.xs, RangeLossDB: w.RangeLossDB.xs, RangeDriftDB: w.RangeDriftDB.xs,
		GainDBi: w.GainDBi.xs, GainExpandedUncertaintyDB: w.GainExpandedUncertaintyDB.xs,
		GTdBPerK: w.GTdBPerK.xs, GTExpandedUncertaintyDB: w.GTExpandedUncertaintyDB.xs, GTForm: w.GTForm,
		NoiseRelativeKT0DB: w.NoiseRelativeKT0DB.xs,
		Noise: convert(w.Noise, func(n noiseStatsWire) reduce.NoiseStatistics {
			return reduce.NoiseStatistics{File: n.File, Quantity: n.Quantity, ScatterDB: float64(n.ScatterDB), RadiometerDB: float64(n.RadiometerDB), SmoothingPoints: n.SmoothingPoints}
		}),
		Interpolated: w.Interpolated,
		GainBudget:   budgetFromWire(w.GainBudget, len(w.FrequencyHz.xs), w.GainExpandedUncertaintyDB.xs),
		GTBudget:     budgetFromWire(w.GTBudget, len(w.FrequencyHz.xs), w.GTExpandedUncertaintyDB.xs),
		LimitCurves: convert(w.LimitCurves, func(c limitCurveWire) reduce.LimitCurve {
			return reduce.LimitCurve{Name: c.Name, Quantity: c.Quantity, Start: c.Start, LimitDB: c.LimitDB.xs}
		}),
	}
	if o := w.OtherForm; o != nil {
		b.OtherForm = &reduce.OtherForm{Form: o.Form, GTdBPerK: o.GTdBPerK.xs, DifferenceDB: o.DifferenceDB.xs,
			MaxAbsDifferenceDB: float64(o.MaxAbsDifferenceDB), MeanDifferenceDB: float64(o.MeanDifferenceDB)}
	}
	if p := w.Projection; p != nil {
		b.Projection = &reduce.Projection{PassiveGainDBi: float64(p.PassiveGainDBi), ChamberAntennaK: float64(p.ChamberAntennaK),
			OperatingAntennaK: float64(p.OperatingAntennaK), SystemNoiseK: p.SystemNoiseK.xs, ReceiverNoiseK: p.ReceiverNoiseK.xs,
			OperatingGTdBPerK: p.OperatingGTdBPerK.xs, Assumptions: p.Assumptions, NegativeReceiverNoiseHz: p.NegativeReceiverNoiseHz.xs}
	}
	return b
}

// budgetFromWire is the budget in full, but for the terms' stated values
// (restoreBudgetValues): a constant term at each of the n frequencies, and
// the expanded uncertainty the beam's list (the same one in reduce).
func budgetFromWire(w budgetWire, n int, expanded []float64) reduce.Budget {
	b := reduce.Budget{CombinedDB: w.CombinedDB.xs, CoverageK: float64(w.CoverageK)}
	b.Terms = convert(w.Terms, func(t budgetTermWire) reduce.BudgetTerm {
		rt := reduce.BudgetTerm{Name: t.Name, Source: t.Source, Distribution: t.Distribution, Divisor: float64(t.Divisor), StandardDB: t.StandardDB.xs}
		if t.ConstantStandardDB != nil {
			rt.StandardDB = make([]float64, n)
			for k := range rt.StandardDB {
				rt.StandardDB[k] = float64(*t.ConstantStandardDB)
			}
		}
		return rt
	})
	if len(b.Terms) > 0 || len(b.CombinedDB) > 0 {
		b.ExpandedDB = expanded
	}
	return b
}

func limitResultFromWire(w limitResultWire) reduce.LimitResult {
	return reduce.LimitResult{Name: w.Name, Quantity: w.Quantity, Beam: w.Beam, Statistic: w.Statistic,
		WorstMarginDB: float64(w.WorstMarginDB), AtFrequencyHz: float64(w.AtFrequencyHz), ValueDB: float64(w.ValueDB),
		LimitDB: float64(w.LimitDB), ExpandedUncertaintyDB: float64(w.ExpandedUncertaintyDB), Verdict: w.Verdict,
		LimitCurve: convert(w.LimitCurve, func(v limitVertexWire) reduce.LimitVertex {
			return reduce.LimitVertex{FrequencyHz: float64(v.FrequencyHz), ValueDB: float64(v.ValueDB)}
		})}
}

func rangeCheckFromWire(w rangeCheckWire) reduce.RangeCheck {
	return reduce.RangeCheck{Run: w.Run, Started: time.Time(w.Started), Station: w.Station, Reference: w.Reference,
		FrequencyHz: float64(w.FrequencyHz), RangeLossDB: float64(w.RangeLossDB), DriftDB: ptrFloat(w.DriftDB),
		DriftToleranceDB: float64(w.DriftToleranceDB), Beam: w.Beam, GTdBPerK: ptrFloat(w.GTdBPerK),
		ReferenceCertificate: w.ReferenceCertificate, ReferenceCalibrated: time.Time(w.ReferenceCalibrated),
		ReferenceDue: time.Time(w.ReferenceDue), PastDue: w.PastDue}
}

func rangeCheckPtrFromWire(w *rangeCheckWire) *reduce.RangeCheck {
	if w == nil {
		return nil
	}
	c := rangeCheckFromWire(*w)
	return &c
}
