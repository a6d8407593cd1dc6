package ingest

// Check validates an archive without reducing it: OpenLean, then Load of every
// run of every unit (history included). It returns every problem, sorted by
// file, line and message, each reported once. When root itself cannot be
// read the single problem names root.
func Check(root string) []*Problem {
	a, err := OpenLean(root)
	if err != nil {
		return []*Problem{{File: root, Message: err.Error()}}
	}
	probs := append([]*Problem(nil), a.Problems...)
	for _, u := range a.Units {
		for _, r := range u.Runs {
			full, err := a.Full(r)
			if err != nil {
				probs = append(probs, Problems(err)...)
				continue
			}
			d, p := a.Load(full)
			probs = append(probs, p...)
			// What reduce refuses of a loaded run (ReduceUnit calls it too).
			probs = append(probs, LimitBeamPoints(full, d)...)
		}
	}
	return SortProblems(probs)
}
