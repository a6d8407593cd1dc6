package ingest

import "sort"

// RunFiles lists every file a run depends on, relative to the archive root
// with '/': its run.yaml, its data files, and the station, reference (with
// its table file) and spec documents it names: what Load reads and lists
// among the inputs (and absent files) of the run, by path, without reading
// a data file.
//
// A run of OpenLean is read whole first (Archive.Full); when that fails,
// the list is its run.yaml alone.
func RunFiles(a *Archive, r *Run) []string {
	if r.lean {
		full, err := a.Full(r)
		if err != nil {
			return []string{r.File}
		}
		r = full
	}
	files := RunDocuments(a, r)
	add := func(p string) {
		if p != "" {
			files = append(files, p)
		}
	}
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
	sort.Strings(files)
	out := files[:0]
	for i, f := range files {
		if i == 0 || f != files[i-1] {
			out = append(out, f)
		}
	}
	return out
}

// RunDocuments lists the YAML documents a run depends on: its run.yaml,
// lab.yaml (the laboratory named in the report) and the station,
// reference (with its table file) and spec it names, where discovery
// accepted them. Approvals are not among them: they issue a report of
// these inputs, and are not inputs of it.
func RunDocuments(a *Archive, r *Run) []string {
	docs := []string{r.File}
	if a.Lab != nil {
		docs = append(docs, a.Lab.File)
	}
	if s := a.Stations[r.Station]; s != nil {
		docs = append(docs, s.File)
	}
	if ref := a.References[r.Reference]; ref != nil {
		docs = append(docs, ref.File)
		if ref.TableFile != "" {
			docs = append(docs, ref.TableFile)
		}
	}
	if sp := a.Specs[r.Product]; sp != nil {
		docs = append(docs, sp.File)
	}
	return docs
}
