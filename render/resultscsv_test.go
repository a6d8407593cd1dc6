package render

import (
	"bytes"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// The writer gives ResultsCSV's bytes unit by unit, and refuses units out
// of serial order.
func TestResultsCSVWriter(t *testing.T) {
	_, sums := fixtureFleetAndSummaries(t)
	sums = append(sums, reduce.UnitSummary{Serial: "ZZ-0001", Product: "P", Verdict: reduce.VerdictIncomplete})
	want := ResultsCSV(sums)
	var got bytes.Buffer
	w, err := NewResultsCSVWriter(&got)
	if err != nil {
		t.Fatal(err)
	}
	for i := range sums {
		if err := w.Unit(&sums[i]); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got.Bytes(), want) {
		t.Errorf("streamed results.csv differs from ResultsCSV (%d vs %d bytes)", got.Len(), len(want))
	}
	if err := w.Unit(&sums[0]); err == nil {
		t.Error("a unit out of serial order was accepted")
	}
}
