package ingest

import (
	"fmt"
	"os"
	"path"
	"path/filepath"
	"sort"
	"strings"
)

// resolveBeams gives a run (as ParseRun read it, paths relative to its
// folder) its beams against the spec's beam plan (contract, "run.yaml"):
//   - a run without beams measured every beam of the plan;
//   - a run's beam whose id is a plan beam's inherits every key it does
//     not set; any other beam is the run's alone and must be complete;
//   - a key that neither sets comes from the plan's files: the
//     transmission glob must match exactly one file of the run folder,
//     and each noise entry whose file is there is used.
//
// What is missing is noted in r.resolved (Load reports it, keyed in
// RunData.Causes by the beam's key), and the beam stays, so that the
// report shows it as not reduced. The key lines of each beam's files are
// set in r.KeyLines (0 for a file the plan named: it is not in run.yaml).
func resolveBeams(root string, spec *Spec, r *Run) {
	var plan *BeamPlan
	if spec != nil {
		plan = spec.BeamPlan
	}
	note := func(key string, line int, format string, args ...any) {
		r.resolved = append(r.resolved, keyedProblem{key, Problemf(r.File, line, format, args...)})
	}
	var beams []Beam
	switch {
	case r.noBeams && plan == nil:
		if spec != nil {
			note("beams", 1, "run: no beams, and %s has no beam_plan; expected a list of beams (id, theta_deg, transmission, noise) or a beam_plan in the spec", spec.File)
		}
		// An unknown spec is reported by discovery: the run has no beams
		// because of it.
	case r.noBeams:
		for _, pb := range plan.Beams {
			b := pb
			b.FromPlan, b.Line, b.lines = true, 0, beamLines{}
			beams = append(beams, b)
		}
	default:
		byID := map[string]*Beam{}
		if plan != nil {
			for i := range plan.Beams {
				byID[strings.ToLower(plan.Beams[i].ID)] = &plan.Beams[i]
			}
		}
		for _, e := range r.Beams {
			pb := byID[strings.ToLower(e.ID)]
			switch {
			case pb == nil:
				beams = append(beams, e)
			case pb.ID != e.ID:
				note(fmt.Sprintf("beams[%d]", len(beams)), e.Line, "run: beam id %q is the plan's beam %q (%s) but for case; expected the plan's spelling", e.ID, pb.ID, spec.File)
				beams = append(beams, e)
			default:
				beams = append(beams, inherit(e, *pb))
			}
		}
	}
	if len(beams) > MaxRunBeams {
		note("beams", r.KeyLines["beams"], "run: %d beams with those of the plan in %s; expected at most %d beams (each has its own sheet and charts; see the README's limits): the beams past it are left out", len(beams), spec.File, MaxRunBeams)
		beams = beams[:MaxRunBeams]
	}

	var names []string // the run folder's files, read once
	listed := false
	folder := func() []string {
		if !listed {
			listed = true
			entries, err := os.ReadDir(filepath.Join(root, filepath.FromSlash(path.Dir(r.File))))
			if err == nil {
				for _, e := range entries {
					if !e.IsDir() {
						names = append(names, e.Name())
					}
				}
				sort.Strings(names)
			}
		}
		return names
	}
	match := func(pattern string) []string {
		var out []string
		for _, n := range folder() {
			if ok, _ := path.Match(pattern, n); ok {
				out = append(out, n)
			}
		}
		return out
	}
	where := func(b *Beam) string {
		if b.FromPlan {
			return fmt.Sprintf("beam %s of the plan in %s", b.ID, spec.File)
		}
		return fmt.Sprintf("beam %s", b.ID)
	}
	for i := range beams {
		b := &beams[i]
		// A plan beam's noise entries are the spec's: each run gets its own.
		b.Noise = append([]NoiseInput(nil), b.Noise...)
		key := fmt.Sprintf("beams[%d]", i)
		if b.given&keyTheta == 0 {
			note(key+".theta_deg", b.Line, "run: %s has no theta_deg; expected the scan angle from boresight in degrees, 0 <= theta < 90 (a beam not in the spec's beam_plan must be complete)", where(b))
		}
		if b.given&keyTransmission != 0 {
			r.KeyLines[key+".transmission"] = b.lines.transmission
		} else if plan != nil && plan.Transmission != "" {
			glob := strings.ReplaceAll(plan.Transmission, "{beam}", b.ID)
			switch m := match(glob); len(m) {
			case 1:
				b.Transmission, b.TransmissionCSV = m[0], plan.TransmissionCSV
			case 0:
				note(key+".transmission", b.Line, "run: %s: the plan's transmission %q matches no file in %s/; expected exactly one", where(b), glob, path.Dir(r.File))
			default:
				note(key+".transmission", b.Line, "run: %s: the plan's transmission %q matches %d files in %s/ (%s); expected exactly one: give the beam's transmission in run.yaml, or make the plan's glob narrower", where(b), glob, len(m), path.Dir(r.File), strings.Join(m, ", "))
			}
		} else {
			note(key+".transmission", b.Line, "run: %s has no transmission; expected a Touchstone or CSV file (a beam not in the spec's beam_plan must be complete)", where(b))
		}
		if b.given&keyNoise != 0 {
			for k := range b.Noise {
				if k < len(b.lines.noise) {
					r.KeyLines[fmt.Sprintf("%s.noise[%d].file", key, k)] = b.lines.noise[k]
				}
			}
			continue
		}
		if plan == nil || len(plan.Noise) == 0 {
			note(key+".noise", b.Line, "run: %s has no noise; expected a noise entry {file, quantity} (a beam not in the spec's beam_plan must be complete)", where(b))
			continue
		}
		var tried []string
		b.Noise = nil
		for _, n := range plan.Noise {
			name := strings.ReplaceAll(n.File, "{beam}", b.ID)
			tried = append(tried, name)
			m := match(name)
			if len(m) > 1 {
				note(fmt.Sprintf("%s.noise[%d].file", key, len(b.Noise)), b.Line, "run: %s: the plan's noise file %q matches %d files in %s/ (%s); expected at most one", where(b), name, len(m), path.Dir(r.File), strings.Join(m, ", "))
				continue
			}
			if len(m) == 1 {
				n.File = m[0]
				b.Noise = append(b.Noise, n)
			}
		}
		if len(b.Noise) == 0 {
			note(key+".noise", b.Line, "run: %s: none of the plan's noise files (%s) is in %s/; expected at least one", where(b), strings.Join(tried, ", "), path.Dir(r.File))
		}
	}
	r.Beams = beams
}

// keyedProblem is a problem of a run and the run.yaml key it is about.
type keyedProblem struct {
	key string
	p   *Problem
}

// inherit is the run's beam entry e over the plan's beam pb: every key e
// sets, and pb's for the rest.
func inherit(e, pb Beam) Beam {
	b := pb
	b.Line, b.lines, b.FromPlan = e.Line, beamLines{}, true
	b.given = pb.given | e.given
	if e.given&keyTheta != 0 {
		b.ThetaDeg = e.ThetaDeg
	}
	if e.given&keyPhi != 0 {
		b.PhiDeg = e.PhiDeg
	}
	if e.given&keyPolarization != 0 {
		b.Polarization = e.Polarization
	}
	if e.given&keyTransmission != 0 {
		b.Transmission, b.TransmissionCSV = e.Transmission, e.TransmissionCSV
		b.lines.transmission = e.lines.transmission
	}
	if e.given&keyNoise != 0 {
		b.Noise, b.lines.noise = e.Noise, e.lines.noise
	}
	if e.given&keyPassiveGain != 0 {
		b.PassiveGainDBi = e.PassiveGainDBi
	}
	return b
}
