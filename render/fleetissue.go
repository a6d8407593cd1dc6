package render

import "gtpack.example/gtpack/reduce"

// fleetIssue is what the fleet pages (index.html, fleet.xlsx) show of a
// unit's report and runs: its issue state, revision and report number, how
// many runs it had and its first run's verdict (a retested unit's first
// verdict is not its last).
type fleetIssue struct {
	State          reduce.IssueState
	ReportNumber   string
	FirstVerdict   reduce.Verdict
	Revision, Runs int
}

// Retested is true for a unit with more than one run.
func (fi fleetIssue) Retested() bool { return fi.Runs > 1 }

// known is true when the fleet has the unit's issue state.
func (fi fleetIssue) known() bool { return fi.State != "" || fi.Runs > 0 }

// fleetIssueOf is a unit's issue state and runs as the fleet keeps them
// (reduce.FleetUnit, from the unit's summary).
func fleetIssueOf(u *reduce.FleetUnit) fleetIssue {
	return fleetIssue{State: u.IssueState, Revision: u.Revision, ReportNumber: u.ReportNumber,
		Runs: u.Runs, FirstVerdict: u.FirstVerdict}
}
