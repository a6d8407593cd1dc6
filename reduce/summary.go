package reduce

import "math"

// Summary is the part of the unit the fleet statistics need. Boresight is
// the G/T of the beam with the smallest |theta| among the beams that have
// G/T (the first such beam on a tie); nil when no beam has G/T. The limit
// results leave out their limit lines (LimitCurve): the fleet does not
// draw them, and the build keeps each summary in the unit's state file,
// which the fleet stage reads back for every unit.
func (u *Unit) Summary() UnitSummary {
	s := UnitSummary{
		Serial:    u.Serial,
		Product:   u.Product,
		Started:   u.Started,
		Verdict:   u.Verdict,
		Limits:    make([]LimitResult, len(u.Limits)),
		Runs:      len(u.History) + 1,
		CheckUnit: u.CheckUnit,

		IssueState:   u.Issue.State,
		Revision:     u.Issue.Revision,
		ReportNumber: u.Issue.ReportNumber,
	}
	s.FirstVerdict = u.Verdict
	if len(u.History) > 0 {
		s.FirstVerdict = u.History[0].Verdict
	}
	for _, h := range u.History {
		if h.RangeCheck != nil {
			s.RangeChecks = append(s.RangeChecks, *h.RangeCheck)
		}
	}
	if u.RangeCheck != nil {
		s.RangeChecks = append(s.RangeChecks, *u.RangeCheck)
	}
	for i, l := range u.Limits {
		l.LimitCurve = nil
		s.Limits[i] = l
	}
	best := -1
	for i := range u.Beams {
		b := &u.Beams[i]
		if len(b.GTdBPerK) == 0 || len(b.GTdBPerK) != len(b.FrequencyHz) {
			continue
		}
		if best < 0 || math.Abs(b.ThetaDeg) < math.Abs(u.Beams[best].ThetaDeg) {
			best = i
		}
	}
	if best >= 0 {
		b := &u.Beams[best]
		s.Boresight = &BoresightTrace{
			Beam:        b.ID,
			FrequencyHz: append([]float64(nil), b.FrequencyHz...),
			GTdBPerK:    append([]float64(nil), b.GTdBPerK...),
		}
	}
	return s
}
