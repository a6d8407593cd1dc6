package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/ingest/demo"
	"gtpack.example/gtpack/reduce"
	"gtpack.example/gtpack/render"
)

func cmdVersion(args []string, stdout, _ io.Writer) (int, error) {
	fs := flag.NewFlagSet("version", flag.ContinueOnError)
	if _, err := parseArgs(fs, args); err != nil {
		return exitUsage, err
	}
	fmt.Fprintf(stdout, "gtpack %s\n", render.Version)
	return exitOK, nil
}

func cmdCheck(args []string, stdout, _ io.Writer) (int, error) {
	fs := flag.NewFlagSet("check", flag.ContinueOnError)
	pos, err := parseArgs(fs, args, "ARCHIVE")
	if err != nil {
		return exitUsage, err
	}
	if isSite(pos[0]) {
		return exitUsage, usageError("%s is a site that gtpack build wrote, not an archive; gtpack verify %s checks a site", pos[0], pos[0])
	}
	// What build would print, in one pass: discovery's problems, and every
	// unit reduced as build reduces it (not rendered).
	a, err := ingest.OpenLean(pos[0])
	if err != nil {
		fmt.Fprintf(stdout, "%s: %v\n1 problem(s)\n", pos[0], err)
		return exitRefused, nil
	}
	withUnit := goodRunFiles(a.Units)
	var problems []*ingest.Problem
	for _, p := range a.Problems {
		if !withUnit[p.File] {
			problems = append(problems, p)
		}
	}
	for _, rr := range a.Orphans {
		problems = append(problems, a.RefusedProblems(rr)...)
	}
	for _, u := range a.Units {
		problems = append(problems, unitProblems(a, u)...)
	}
	problems = ingest.SortProblems(problems)
	for _, p := range problems {
		fmt.Fprintln(stdout, p.Error())
	}
	if len(a.Units) == 0 && len(a.Orphans) == 0 {
		fmt.Fprintln(stdout, "no runs yet: a run is a folder anywhere in the archive with a run.yaml and its data files")
	}
	if len(problems) > 0 {
		fmt.Fprintf(stdout, "%d problem(s)\n", len(problems))
		return exitRefused, nil
	}
	fmt.Fprintln(stdout, "no problems")
	return exitOK, nil
}

func cmdInspect(args []string, stdout, _ io.Writer) (int, error) {
	fs := flag.NewFlagSet("inspect", flag.ContinueOnError)
	asJSON := fs.Bool("json", false, "print what is read as JSON")
	pos, err := parseArgs(fs, args, "FILE")
	if err != nil {
		return exitUsage, err
	}
	text, value, err := ingest.Inspect(pos[0])
	if err != nil {
		return exitRefused, err
	}
	if *asJSON {
		out, err := json.Marshal(value)
		if err != nil {
			return exitRefused, err
		}
		fmt.Fprintf(stdout, "%s\n", out)
		return exitOK, nil
	}
	fmt.Fprint(stdout, text)
	return exitOK, nil
}

func cmdDemo(args []string, stdout, _ io.Writer) (int, error) {
	fs := flag.NewFlagSet("demo", flag.ContinueOnError)
	units := fs.Int("units", 8, "number of units")
	seed := fs.Int64("seed", 1, "seed of the synthetic measurement noise")
	beams := fs.Int("beams", 16, "beams per run (1 to 16)")
	points := fs.Int("points", 801, "frequency points per file (11 to 100,001)")
	months := fs.Int("months", 0, "spread the runs over this many months (0: one run a day)")
	pos, err := parseArgs(fs, args, "DIR")
	if err != nil {
		return exitUsage, err
	}
	if *units < 1 {
		return exitUsage, usageError("--units must be at least 1")
	}
	if _, err := demo.Write(pos[0], demo.Options{Units: *units, Seed: *seed, Beams: *beams, Points: *points, Months: *months}); err != nil {
		return exitRefused, err
	}
	n, err := demoApprovals(pos[0])
	if err != nil {
		return exitRefused, err
	}
	fmt.Fprintf(stdout, "wrote a synthetic archive of %d unit(s) with %d approval(s) to %s\n", *units, n, pos[0])
	return exitOK, nil
}

// demoApprovals approves some reports of a demo archive as a laboratory
// would: the first unit is issued and co-signed, the first retested unit
// was approved before its retest (so the retest made that approval void),
// and the last unit is issued; the others stay drafts. Each approval is
// dated a day after the run it approves, and names the inputs and verdict
// gtpack reduces for the unit as it was then.
func demoApprovals(dir string) (int, error) {
	a, err := ingest.OpenLean(dir)
	if err != nil {
		return 0, err
	}
	if len(a.Units) == 0 {
		return 0, nil
	}
	type approval struct {
		unit     *ingest.Unit
		by, role string
		after    time.Duration
	}
	first := a.Units[0]
	plan := []approval{
		{first, "A. Tester", "Test engineer", 24 * time.Hour},
		{first, "Q. Reviewer", "Quality engineer", 26 * time.Hour},
	}
	for _, u := range a.Units {
		if len(u.Runs) > 1 {
			before := &ingest.Unit{Serial: u.Serial, Runs: u.Runs[:1]}
			plan = append(plan, approval{before, "Q. Reviewer", "Quality engineer", 24 * time.Hour})
			break
		}
	}
	// The last production unit (a check unit is never issued).
	for i := len(a.Units) - 1; i > 1; i-- {
		if u := a.Units[i]; u.Serial != demo.CheckUnitSerial {
			if len(u.Runs) == 1 {
				plan = append(plan, approval{u, "Q. Reviewer", "Quality engineer", 24 * time.Hour})
			}
			break
		}
	}
	n := 0
	for _, p := range plan {
		w, err := reduceWhole(a, p.unit)
		if err != nil {
			return n, err
		}
		res := w.unit
		if res.Verdict == reduce.VerdictIncomplete || len(res.Problems) > 0 {
			continue
		}
		acceptance := p.unit.Runs[len(p.unit.Runs)-1]
		when := acceptance.Started.UTC().Add(p.after).Truncate(time.Hour)
		ap := &ingest.Approval{Schema: 1, Serial: p.unit.Serial, InputsSHA256: res.Issue.InputsSHA256, Verdict: string(res.Verdict),
			ApprovedBy: p.by, Role: p.role, Date: when}
		if _, err := writeApproval(dir, p.unit.Serial, when, p.by, ingest.ApprovalYAML(ap)); err != nil {
			return n, err
		}
		n++
	}
	return n, nil
}

// isSite says whether dir looks like a site gtpack wrote: its cache
// folder, or a package's SHA256SUMS and manifest.json.
func isSite(dir string) bool {
	if fi, err := os.Stat(filepath.Join(dir, stateDir)); err == nil && fi.IsDir() {
		return true
	}
	_, err1 := os.Stat(filepath.Join(dir, "SHA256SUMS"))
	_, err2 := os.Stat(filepath.Join(dir, "manifest.json"))
	return err1 == nil && err2 == nil
}

func cmdSchema(args []string, stdout, _ io.Writer) (int, error) {
	fs := flag.NewFlagSet("schema", flag.ContinueOnError)
	pos, err := parseArgs(fs, args, "KIND")
	if err != nil {
		return exitUsage, err
	}
	s, err := ingest.Schema(pos[0])
	if err != nil {
		return exitUsage, usageError("%v", err)
	}
	stdout.Write(s)
	return exitOK, nil
}

func cmdInit(args []string, stdout, _ io.Writer) (int, error) {
	fs := flag.NewFlagSet("init", flag.ContinueOnError)
	pos, err := parseArgs(fs, args, "DIR")
	if err != nil {
		return exitUsage, err
	}
	dir := pos[0]
	if entries, err := os.ReadDir(dir); err == nil && len(entries) > 0 {
		return exitUsage, usageError("%s is not empty; gtpack init writes a new archive into a new or empty folder", dir)
	}
	files, err := ingest.NewArchiveFiles()
	if err != nil {
		return exitRefused, err
	}
	for _, rel := range ingest.NewArchivePaths(files) {
		p := filepath.Join(dir, filepath.FromSlash(rel))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return exitRefused, err
		}
		if err := os.WriteFile(p, files[rel], 0o644); err != nil {
			return exitRefused, err
		}
	}
	fmt.Fprintf(stdout, "wrote a new archive to %s: fill in the templates (see %s), then gtpack check %s lists what is still to do\n",
		dir, filepath.Join(dir, "README.md"), dir)
	return exitOK, nil
}
