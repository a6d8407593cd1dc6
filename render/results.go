package render

import (
	"bytes"
	"errors"
	"fmt"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// The machine-readable outputs: result.json, fleet.json and results.csv.
//
// A number that is not finite (NaN, +Inf, -Inf) has no JSON form. Rather
// than refuse a whole unit for one bad point, it is written as null, and
// the parsers read null back as NaN where the field is a float64. The CSV
// and the workbooks leave such a value empty.

// ResultJSON returns result.json of a unit (resultwire.go): indented, a
// trailing newline.
func ResultJSON(u *reduce.Unit) ([]byte, error) {
	if u == nil {
		return nil, errors.New("render: ResultJSON of a nil unit")
	}
	sink := new(listSink)
	return appendIndentedLists(nil, unitToWire(u, sink), 0, "\n", sink)
}

// FleetJSON returns fleet.json: the bytes WriteFleetJSON writes.
func FleetJSON(f *reduce.Fleet) ([]byte, error) {
	var b bytes.Buffer
	if err := WriteFleetJSON(&b, f); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// ParseResultJSON reads a result.json written by ResultJSON, as `gtpack
// index` does to rebuild the fleet pages from a site. It checks the schema
// and that every per-frequency list of a beam has one value per frequency,
// so that a hand-edited file cannot make a renderer index out of range.
func ParseResultJSON(data []byte) (*reduce.Unit, error) {
	const file = "result.json"
	var w unitWire
	if err := readJSON(file, data, &w); err != nil {
		return nil, err
	}
	if w.Schema != ResultSchema {
		return nil, ingest.Problemf(file, 0, "schema %d, expected %d", w.Schema, ResultSchema)
	}
	if w.Serial == "" {
		return nil, ingest.Problemf(file, 0, "serial is empty, expected the unit's serial number")
	}
	u := unitFromWire(&w)
	for i := range u.Beams {
		if err := checkBeamLengths(&u.Beams[i]); err != nil {
			return nil, ingest.Problemf(file, 0, "beams[%d] (%q): %v", i, u.Beams[i].ID, err)
		}
		restoreBudgetValues(&u.Beams[i].GainBudget)
		restoreBudgetValues(&u.Beams[i].GTBudget)
	}
	if err := checkUnitShapes(u); err != nil {
		return nil, ingest.Problemf(file, 0, "%v", err)
	}
	return u, nil
}

// restoreBudgetValues fills each term's stated values, which result.json
// leaves out because they follow from what it keeps: reduce makes
// StandardDB = |ValueDB| / Divisor, so ValueDB = StandardDB * Divisor (the
// stated values are magnitudes, never negative).
func restoreBudgetValues(b *reduce.Budget) {
	for i := range b.Terms {
		t := &b.Terms[i]
		if t.StandardDB == nil {
			continue
		}
		t.ValueDB = make([]float64, len(t.StandardDB))
		for k, s := range t.StandardDB {
			t.ValueDB[k] = s * t.Divisor
		}
	}
}

// checkUnitShapes verifies the scan and element lists against their own
// sizes.
func checkUnitShapes(u *reduce.Unit) error {
	if s := u.Scan; s != nil {
		n := len(s.FrequencyHz)
		if len(s.ExponentN) != 0 && len(s.ExponentN) != n {
			return fmt.Errorf("scan.exponent_n has %d values, expected %d (one per frequency)", len(s.ExponentN), n)
		}
		for i, b := range s.Beams {
			if len(b.ScanLossDB) != 0 && len(b.ScanLossDB) != n {
				return fmt.Errorf("scan.beams[%d].scan_loss_db has %d values, expected %d", i, len(b.ScanLossDB), n)
			}
		}
	}
	if e := u.Elements; e != nil {
		if e.Rows < 0 || e.Cols < 0 || len(e.ResidualPhaseDeg) != e.Rows || len(e.Present) != e.Rows {
			return fmt.Errorf("elements: %d phase rows and %d presence rows, expected %d", len(e.ResidualPhaseDeg), len(e.Present), e.Rows)
		}
		for r := 0; r < e.Rows; r++ {
			if len(e.ResidualPhaseDeg[r]) != e.Cols || len(e.Present[r]) != e.Cols {
				return fmt.Errorf("elements: row %d has %d/%d columns, expected %d", r, len(e.ResidualPhaseDeg[r]), len(e.Present[r]), e.Cols)
			}
		}
	}
	return nil
}

// checkBeamLengths verifies that the beam's per-frequency lists
// (beamQuantities) are either absent or as long as its frequency list.
func checkBeamLengths(b *reduce.Beam) error {
	n := len(b.FrequencyHz)
	for i := range beamQuantities {
		q := &beamQuantities[i]
		v := q.get(b)
		if len(v) == 0 && (q.optional || n == 0) {
			continue
		}
		if len(v) != n {
			return fmt.Errorf("%s has %d values, expected %d (one per frequency)", q.key, len(v), n)
		}
	}
	if err := checkBudgetLengths(&b.GainBudget, n); err != nil {
		return fmt.Errorf("gain_budget: %v", err)
	}
	if err := checkBudgetLengths(&b.GTBudget, n); err != nil {
		return fmt.Errorf("gt_budget: %v", err)
	}
	for i, c := range b.LimitCurves {
		if c.Start < 0 || c.Start+len(c.LimitDB) > n {
			return fmt.Errorf("limit_curves[%d] covers points %d..%d, expected within 0..%d", i, c.Start, c.Start+len(c.LimitDB)-1, n-1)
		}
	}
	return nil
}

func checkBudgetLengths(b *reduce.Budget, n int) error {
	for _, l := range [][]float64{b.CombinedDB, b.ExpandedDB} {
		if len(l) != 0 && len(l) != n {
			return fmt.Errorf("%d combined/expanded values, expected %d", len(l), n)
		}
	}
	for _, t := range b.Terms {
		if (len(t.ValueDB) != 0 && len(t.ValueDB) != n) || (len(t.StandardDB) != 0 && len(t.StandardDB) != n) {
			return fmt.Errorf("term %q has %d/%d values, expected %d", t.Name, len(t.ValueDB), len(t.StandardDB), n)
		}
	}
	return nil
}
