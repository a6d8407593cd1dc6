package render

import (
	"slices"
	"strconv"
	"testing"

	"github.com/xuri/excelize/v2"

	"gtpack.example/gtpack/reduce"
)

// Every entry of the table is complete for the outputs it is shown in, and
// no two share a key, a CSV name or a place on the beam sheet.
func TestBeamQuantitiesTable(t *testing.T) {
	keys, csvNames, places := map[string]bool{}, map[string]bool{}, map[int]bool{sheetLimits: true}
	for _, q := range beamQuantities {
		if q.key == "" || q.get == nil || keys[q.key] {
			t.Errorf("%q: a key of its own and an accessor are needed", q.key)
		}
		keys[q.key] = true
		if q.get(&reduce.Beam{}) != nil {
			t.Errorf("%s: an empty beam has values", q.key)
		}
		if q.csv != "" {
			if csvNames[q.csv] || q.decimals <= 0 {
				t.Errorf("%s: CSV name %q (taken before: %v), %d decimals", q.key, q.csv, csvNames[q.csv], q.decimals)
			}
			csvNames[q.csv] = true
		}
		if q.sheet != 0 {
			if places[q.sheet] || q.format == "" || q.width <= 0 || q.unit == "" || (q.name == "") == (q.nameOf == nil) {
				t.Errorf("%s: sheet place %d (taken: %v), format %q, width %v, unit %q, name %q", q.key, q.sheet, places[q.sheet], q.format, q.width, q.unit, q.name)
			}
			places[q.sheet] = true
		}
	}
	for _, key := range []string{"gt_db_per_k", "gt_expanded_uncertainty_db", "gain_dbi", "noise_relative_kt0_db", "range_loss_db", "range_drift_db"} {
		if q := quantityOf(key); q.csv == "" {
			t.Errorf("%s, which the report's charts draw, is not in the CSV", key)
		}
	}
	for _, limit := range []reduce.Quantity{reduce.QuantityGT, reduce.QuantityGain} {
		if q := limitQuantity(limit); q.limit != limit {
			t.Errorf("no quantity for the limits on %q", limit)
		}
	}
}

// A quantity added to the table alone is in the per-frequency CSV (and so
// in the report's download), on the beam sheets with its header, format
// and values, in the length check of result.json's beams; placed before
// the G/T on the sheet, it moves the G/T and its limits one column to the
// right, and the charts follow them. results.csv has no per-frequency
// quantities: its rows are limits.
func TestBeamQuantityAddedToTheTable(t *testing.T) {
	extra := map[string][]float64{} // by beam ID
	saved := beamQuantities
	t.Cleanup(func() { beamQuantities = saved })
	beamQuantities = append(slices.Clone(saved), beamQuantity{
		key: "test_extra_db", get: func(b *reduce.Beam) []float64 { return extra[b.ID] }, optional: true,
		name: "Test extra", unit: "dB", csv: "test_extra_db", decimals: 2,
		sheet: 55, format: "0.00", width: 13, // between the noise and the G/T
	})
	u := fixtureUnit(t, 3, 41)
	for _, b := range u.Beams[:2] { // the third beam has none
		v := make([]float64, len(b.FrequencyHz))
		for k := range v {
			v[k] = b.GTdBPerK[k] + 100.123456
		}
		extra[b.ID] = v
	}

	// The per-frequency CSV, as the report embeds it.
	data := UnitCSV(u)
	if _, embedded := csvHref(t, mustReport(t, u)); string(embedded) != string(data) {
		t.Error("the report's CSV is not UnitCSV")
	}
	cols, rows := readCSV(t, data)
	for _, b := range u.Beams[:2] {
		i, ok := cols[b.ID+"_test_extra_db"]
		if !ok {
			t.Fatalf("no column %s_test_extra_db in %v", b.ID, cols)
		}
		for k, row := range rows {
			// To the table's 2 decimals.
			want, _ := strconv.ParseFloat(strconv.FormatFloat(extra[b.ID][k], 'f', 2, 64), 64)
			if got, err := strconv.ParseFloat(row[i], 64); err != nil || got != want {
				t.Fatalf("%s_test_extra_db row %d = %q, want %v", b.ID, k, row[i], want)
			}
		}
	}
	if _, ok := cols["b02_test_extra_db"]; ok {
		t.Error("a beam without values has a column")
	}

	// The length check.
	n := len(u.Beams[0].FrequencyHz)
	if err := checkBeamLengths(&u.Beams[0]); err != nil {
		t.Fatal(err)
	}
	extra["b00"] = extra["b00"][:n-1]
	err := checkBeamLengths(&u.Beams[0])
	if want := "test_extra_db has " + itoa(n-1) + " values, expected " + itoa(n) + " (one per frequency)"; err == nil || err.Error() != want {
		t.Errorf("length check: %v, want %q", err, want)
	}
	extra["b00"] = extra["b01"]

	// The workbook, read back by openpyxl.
	book, err := UnitWorkbook(u)
	if err != nil {
		t.Fatal(err)
	}
	d := readWorkbook(t, book)
	for _, b := range u.Beams {
		s := d.sheet(t, "Beam "+b.ID)
		headers := map[string]int{}
		for c := 1; c <= len(s.Rows[0]); c++ {
			if h, ok := s.cell(1, c).(string); ok {
				headers[h] = c
			}
		}
		// Every beam sheet has the column (the entry has no onSheet), next
		// to the noise, the G/T after it; empty for the beam without values.
		col, gt := headers["Test extra (dB)"], headers["G/T (dB/K)"]
		if noise := headers["Noise above kT0 (dB)"]; noise == 0 || col != noise+1 || gt != col+1 {
			t.Errorf("%s: noise, Test extra and G/T in columns %d, %d, %d, want three in a row", b.ID, noise, col, gt)
		}
		for k := 0; k < n; k += 10 {
			got := s.cell(k+2, col)
			if v := extra[b.ID]; v == nil {
				if got != nil {
					t.Errorf("%s: Test extra row %d = %v, want empty", b.ID, k+2, got)
				}
			} else if !sameResult(got, round6(v[k])) || s.format(k+2, col) != "0.00" {
				t.Errorf("%s: Test extra row %d = %v (%s), want %v (0.00)", b.ID, k+2, got, s.format(k+2, col), round6(v[k]))
			}
		}
		// The chart's series: the G/T, then its limits, by the columns' headers.
		ref := func(c int) string {
			l, err := excelize.ColumnNumberToName(c)
			if err != nil {
				t.Fatal(err)
			}
			return "'" + s.Title + "'!$" + l + "$2:$" + l + "$" + itoa(n+1)
		}
		want := []string{ref(gt)}
		for _, c := range b.LimitCurves {
			if c.Quantity == "gt" {
				want = append(want, ref(headers["Limit "+c.Name+" (dB/K)"]))
			}
		}
		var got []string
		for _, c := range s.Charts {
			for _, ser := range c.Series {
				got = append(got, ser.Val)
			}
		}
		if !slices.Equal(got, want) {
			t.Errorf("%s: chart series %q, want %q", b.ID, got, want)
		}
	}
}
