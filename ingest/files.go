package ingest

import "sort"

// RunFiles lists every file a run depends on, relative to the archive root
// with '/': its run.yaml, its data files, and the station, reference (with
// its table file) and spec documents it names. It reads nothing, so that a
// build can tell from file stamps alone whether a unit needs redoing.
func RunFiles(a *Archive, r *Run) []string {
	var files []string
	add := func(p string) {
		if p != "" {
			files = append(files, p)
		}
	}
	add(r.File)
	add(r.RangePre)
	add(r.RangePost)
	for _, b := range r.Beams {
		add(b.Transmission)
		for _, n := range b.Noise {
			add(n.File)
		}
	}
	add(r.Elements)
	add(r.Notes)
	if s := a.Stations[r.Station]; s != nil {
		add(s.File)
	}
	if ref := a.References[r.Reference]; ref != nil {
		add(ref.File)
		add(ref.TableFile)
	}
	if sp := a.Specs[r.Product]; sp != nil {
		add(sp.File)
	}
	sort.Strings(files)
	out := files[:0]
	for i, f := range files {
		if i == 0 || f != files[i-1] {
			out = append(out, f)
		}
	}
	return out
}
