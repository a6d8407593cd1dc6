package main

import (
	"path"

	"gtpack.example/gtpack/ingest"
)

// One pass, one cause: check and build print the same problems for a
// unit, each once. A unit's problems are those of every run reduced (the
// acceptance run and its history; each run's discovery problems, such as
// an unknown station, go with it, and reduce names what follows from a
// problem under it) and those of the files its refused runs name.
// Discovery's other problems (shared documents, refused run.yaml files,
// orphans) are printed on their own.

// unitProblems reduces every run of u and returns all their problems,
// with the problems of the files its refused runs name.
func unitProblems(a *ingest.Archive, u *ingest.Unit) []*ingest.Problem {
	var out []*ingest.Problem
	for _, rr := range u.Refused {
		out = append(out, a.RefusedProblems(rr)...)
	}
	if len(u.Runs) == 0 {
		return out
	}
	w, err := reduceWhole(a, u)
	if err != nil {
		return append(out, ingest.Problems(err)...)
	}
	return append(out, w.problems...)
}

// goodRunFiles are the run.yaml files of the units' runs: their discovery
// problems are printed with their unit.
func goodRunFiles(units []*ingest.Unit) map[string]bool {
	out := map[string]bool{}
	for _, u := range units {
		for _, r := range u.Runs {
			out[r.File] = true
		}
	}
	return out
}

// concerns says whether a discovery problem is about unit u: one of its
// run.yaml files (refused ones included), a folder of its runs, or a
// document its runs name (station, reference, spec, lab.yaml, its
// approvals).
func concerns(u *ingest.Unit, p *ingest.Problem) bool {
	if p.File == "lab.yaml" || path.Dir(p.File) == "approvals/"+u.Serial {
		return true
	}
	for _, rr := range u.Refused {
		if p.File == rr.File || (rr.File == "" && p.File == rr.Dir) {
			return true
		}
	}
	for _, r := range u.Runs {
		switch p.File {
		case r.File, "stations/" + r.Station + ".yaml", "references/" + r.Reference + ".yaml", "specs/" + r.Product + ".yaml":
			return true
		}
	}
	return false
}
