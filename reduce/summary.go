package reduce

import "math"

// Summary is the part of the unit the fleet statistics need. Boresight is
// the G/T of the beam with the smallest |theta| among the beams that have
// G/T (the first such beam on a tie); nil when no beam has G/T.
func (u *Unit) Summary() UnitSummary {
	s := UnitSummary{
		Serial:  u.Serial,
		Product: u.Product,
		Started: u.Started,
		Verdict: u.Verdict,
		Limits:  append([]LimitResult{}, u.Limits...),
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
