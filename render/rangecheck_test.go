package render

import (
	"strings"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// The report states its own run's range check (range loss, drift against
// the station's tolerance, the reference antenna's due date) and says
// where the control limits are judged; a run that used the reference past
// its due date says so.
func TestReportRangeCheck(t *testing.T) {
	u := fixtureUnit(t, 2, 11)
	drift := 0.041
	u.RangeCheck = &reduce.RangeCheck{Run: u.Run, Station: "range-b", Reference: "horn-0042", FrequencyHz: 11.725e9,
		RangeLossDB: 50.8123, DriftDB: &drift, DriftToleranceDB: 0.25, ReferenceDue: mustDate("2027-02-10"), PastDue: true}
	html, err := Report(u)
	if err != nil {
		t.Fatal(err)
	}
	page := string(html)
	for _, want := range []string{
		"Range loss 50.812 dB at 11.725 GHz, pre/post drift 0.041 dB (station tolerance 0.250 dB)",
		"reference antenna horn-0042 due 2027-02-10: <b>used past its due date</b>",
		"range health page (health.html)",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	u.RangeCheck = nil
	html, err = Report(u)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(html), "no range loss: the range could not be checked in this run") {
		t.Error("a run without a range loss does not say so")
	}
}
