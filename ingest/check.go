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
	for _, rr := range a.Orphans {
		probs = append(probs, a.RefusedProblems(rr)...)
	}
	for _, u := range a.Units {
		for _, rr := range u.Refused {
			probs = append(probs, a.RefusedProblems(rr)...)
		}
		for _, r := range u.Runs {
			full, err := a.Full(r)
			if err != nil {
				probs = append(probs, Problems(err)...)
				continue
			}
			_, p := a.Load(full)
			probs = append(probs, p...)
		}
	}
	return SortProblems(probs)
}

// RefusedProblems reads what a refused run.yaml names, as far as its
// structure can be read (an unknown key or a wrong value refuses the run,
// but hides none of its files), and returns the problems of those files:
// check and build report every problem of a run in one pass. The
// run.yaml's own problems are in Archive.Problems and not repeated. A
// run.yaml whose structure cannot be read (broken YAML) gives nothing.
func (a *Archive) RefusedProblems(rr *RefusedRun) []*Problem {
	if rr == nil || rr.File == "" {
		return nil
	}
	data, in, p := newArchiveFS(a.Root).read(rr.File, "", 0)
	if p != nil {
		return nil
	}
	r, _ := parseRun(data, rr.File)
	if r == nil {
		return nil
	}
	r.Source = in
	resolveBeams(a.Root, a.Specs[r.Product], r)
	rootRelative(r)
	_, probs := a.Load(r)
	return probs
}
