package render

import (
	"fmt"

	"gtpack.example/gtpack/reduce"
)

// beamQuantity is one per-frequency list of a beam (reduce.Beam) as the
// outputs show it. beamQuantities is the one place that lists them: the
// per-frequency CSV (unitCSV), the report's charts (through the CSV's
// columns), the beam sheets of the unit workbook (beamColumns) and the
// length check of result.json's beams (checkBeamLengths) walk it, and
// find a quantity by its key, never by its place.
type beamQuantity struct {
	// key is the list's name in result.json's beam, with its object's
	// name when it is nested: "gain_dbi", "other_form.gt_db_per_k".
	key string
	// get is the beam's list; nil when the beam lacks it.
	get func(*reduce.Beam) []float64
	// optional is true when result.json may leave the list out of a beam
	// that has frequencies (checkBeamLengths).
	optional bool
	// name and unit make the beam sheet's header, "name (unit)"; nameOf,
	// when set, gives the name of a beam's column instead (a name that
	// states the G/T form or a temperature of the beam).
	name, unit string
	nameOf     func(*reduce.Beam) string
	// limit is the quantity's name in reduce's limits (LimitResult and
	// LimitCurve Quantity), "" when no limit is set on it.
	limit reduce.Quantity

	// csv is the quantity's name in the per-frequency CSV, whose column of
	// a beam is <beam>_<csv>; "" when the CSV leaves it out. A beam has
	// the column when it has values. A shared quantity takes one column
	// <csv> for all beams, before the beams' columns, when every beam has
	// the same grid and the same values of every shared quantity
	// (sharedRange); the column is there without values too unless the
	// quantity is optional. decimals is the rounding of the CSV's values.
	csv      string
	shared   bool
	decimals int

	// sheet is the quantity's place among the columns of a beam sheet,
	// which are in ascending order after the frequency (the limit and
	// margin columns at sheetLimits); 0 when the sheet leaves it out.
	// onSheet says whether a beam's sheet has the column; nil: every beam
	// sheet has it, empty where the beam has no values. format and width
	// are the column's number format and width.
	sheet   int
	onSheet func(*reduce.Beam) bool
	format  string
	width   float64
}

// sheetLimits is the place of the limit and margin columns among a beam
// sheet's quantities (beamQuantity.sheet).
const sheetLimits = 80

// beamQuantities are the per-frequency quantities of a beam, in the order
// of the per-frequency CSV's columns and of the length check.
var beamQuantities = []beamQuantity{
	{key: "s21_db", get: func(b *reduce.Beam) []float64 { return b.S21DB },
		name: "S21", unit: "dB", csv: "s21_db", decimals: 3, sheet: 10, format: nfDB, width: 11},
	{key: "range_loss_db", get: func(b *reduce.Beam) []float64 { return b.RangeLossDB },
		name: "Range loss", unit: "dB", csv: "range_loss_db", shared: true, decimals: 3, sheet: 20, format: nfDB, width: 11},
	{key: "range_drift_db", get: func(b *reduce.Beam) []float64 { return b.RangeDriftDB }, optional: true,
		name: "Range drift", unit: "dB", csv: "range_drift_db", shared: true, decimals: 4, // hundredths of a dB
		sheet: 90, onSheet: func(b *reduce.Beam) bool { return b.RangeDriftDB != nil }, format: nfDB, width: 11},
	{key: "gain_dbi", get: func(b *reduce.Beam) []float64 { return b.GainDBi },
		name: "Gain", unit: "dBi", limit: reduce.QuantityGain, csv: "gain_dbi", decimals: 3, sheet: 30, format: nfDB, width: 11},
	{key: "gain_expanded_uncertainty_db", get: func(b *reduce.Beam) []float64 { return b.GainExpandedUncertaintyDB },
		name: "Gain U", unit: "dB", csv: "gain_u_db", decimals: 3, sheet: 40, format: nfDB, width: 11},
	{key: "gt_db_per_k", get: func(b *reduce.Beam) []float64 { return b.GTdBPerK },
		name: "G/T", unit: "dB/K", limit: reduce.QuantityGT, csv: "gt_db_per_k", decimals: 3, sheet: 60, format: nfDB, width: 11},
	{key: "gt_expanded_uncertainty_db", get: func(b *reduce.Beam) []float64 { return b.GTExpandedUncertaintyDB },
		name: "G/T U", unit: "dB", csv: "gt_u_db", decimals: 3, sheet: 70, format: nfDB, width: 11},
	{key: "noise_relative_kt0_db", get: func(b *reduce.Beam) []float64 { return b.NoiseRelativeKT0DB }, optional: true,
		name: "Noise above kT0", unit: "dB", csv: "noise_rel_kt0_db", decimals: 3, sheet: 50, format: nfDB, width: 12},
	{key: "other_form.gt_db_per_k", get: func(b *reduce.Beam) []float64 { return otherForm(b).GTdBPerK }, optional: true,
		nameOf: func(b *reduce.Beam) string { return "G/T " + string(otherForm(b).Form) }, unit: "dB/K",
		csv: "gt_other_form_db_per_k", decimals: 3, sheet: 100, onSheet: hasOtherForm, format: nfDB, width: 14},
	{key: "other_form.difference_db", get: func(b *reduce.Beam) []float64 { return otherForm(b).DifferenceDB }, optional: true,
		name: "Form difference", unit: "dB", sheet: 110, onSheet: hasOtherForm, format: nfDB, width: 12},
	{key: "projection.system_noise_k", get: func(b *reduce.Beam) []float64 { return projection(b).SystemNoiseK }, optional: true,
		name: "System noise", unit: "K", sheet: 120, onSheet: hasProjection, format: nfDB, width: 12},
	{key: "projection.receiver_noise_k", get: func(b *reduce.Beam) []float64 { return projection(b).ReceiverNoiseK }, optional: true,
		name: "Receiver noise", unit: "K", sheet: 130, onSheet: hasProjection, format: nfDB, width: 12},
	{key: "projection.operating_gt_db_per_k", get: func(b *reduce.Beam) []float64 { return projection(b).OperatingGTdBPerK }, optional: true,
		nameOf: func(b *reduce.Beam) string {
			return fmt.Sprintf("G/T at %g K, derived", projection(b).OperatingAntennaK)
		}, unit: "dB/K",
		csv: "operating_gt_db_per_k_derived", decimals: 3, sheet: 140, onSheet: hasProjection, format: nfDB, width: 16},
}

// otherForm and projection are a beam's objects, empty when it has none,
// so that their lists are nil.
func otherForm(b *reduce.Beam) *reduce.OtherForm {
	if b.OtherForm == nil {
		return &reduce.OtherForm{}
	}
	return b.OtherForm
}

func projection(b *reduce.Beam) *reduce.Projection {
	if b.Projection == nil {
		return &reduce.Projection{}
	}
	return b.Projection
}

func hasOtherForm(b *reduce.Beam) bool  { return b.OtherForm != nil }
func hasProjection(b *reduce.Beam) bool { return b.Projection != nil }

// quantityOf is the quantity of a key; a key not in the table is a fault
// of the code that asks.
func quantityOf(key string) *beamQuantity {
	for i := range beamQuantities {
		if beamQuantities[i].key == key {
			return &beamQuantities[i]
		}
	}
	panic("render: no beam quantity " + key)
}

// limitQuantity is the quantity a limit is on (LimitCurve.Quantity,
// LimitResult.Quantity): reduce knows "gt" and "gain" and refuses others;
// G/T for a name the table does not know.
func limitQuantity(name reduce.Quantity) *beamQuantity {
	for i := range beamQuantities {
		if beamQuantities[i].limit == name {
			return &beamQuantities[i]
		}
	}
	return quantityOf("gt_db_per_k")
}

// header is the quantity's header on a beam's sheet.
func (q *beamQuantity) header(b *reduce.Beam) string {
	name := q.name
	if q.nameOf != nil {
		name = q.nameOf(b)
	}
	return name + " (" + q.unit + ")"
}
