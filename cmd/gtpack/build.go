package main

import (
	"errors"
	"flag"
	"fmt"
	"hash/fnv"
	"io"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
	"gtpack.example/gtpack/render"
)

// afterDiscovery, when set (by tests only), runs once the archive has
// been discovered: a test changes a shared file there, as a person editing
// it during a build would.
var afterDiscovery func()

type buildOptions struct {
	archive, site  string
	jobs           int
	only           string
	force, quiet   bool
	shardK, shardN int // shardN 0: no sharding
}

func cmdBuild(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("build", flag.ContinueOnError)
	var o buildOptions
	fs.StringVar(&o.site, "o", "site", "site folder to write")
	fs.IntVar(&o.jobs, "j", runtime.NumCPU(), "units built at once")
	fs.StringVar(&o.only, "only", "", "build this serial number only")
	fs.BoolVar(&o.force, "force", false, "rebuild every unit, changed or not")
	fs.BoolVar(&o.quiet, "quiet", false, "print no progress")
	shard := fs.String("shard", "", "K/N: build only the units whose serial hashes to shard K of N (K from 0)")
	pos, err := parseArgs(fs, args, "ARCHIVE")
	if err != nil {
		return exitUsage, err
	}
	o.archive = pos[0]
	if inside(o.site, o.archive) {
		return exitUsage, usageError("the site %s lies inside the archive %s: gtpack never writes into an archive", o.site, o.archive)
	}
	if o.jobs < 1 {
		return exitUsage, usageError("-j must be at least 1")
	}
	if *shard != "" {
		k, n, ok := parseShard(*shard)
		if !ok {
			return exitUsage, usageError("--shard wants K/N with 0 <= K < N, got %q", *shard)
		}
		o.shardK, o.shardN = k, n
	}
	return build(o, stdout, stderr)
}

func parseShard(s string) (k, n int, ok bool) {
	a, b, found := strings.Cut(s, "/")
	if !found {
		return 0, 0, false
	}
	k, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	if err1 != nil || err2 != nil || n < 1 || k < 0 || k >= n {
		return 0, 0, false
	}
	return k, n, true
}

// shardOf is the shard a serial number belongs to: FNV-1a of the serial,
// modulo the number of shards. It depends on the serial alone, so every
// machine of a batch job agrees on it.
func shardOf(serial string, n int) int {
	h := fnv.New64a()
	h.Write([]byte(serial))
	return int(h.Sum64() % uint64(n))
}

// unitOutcome is what one worker reports for one unit.
type unitOutcome struct {
	serial   string
	state    *unitState
	skipped  bool
	stale    bool // the acceptance run was refused: the last build is kept
	problems []*ingest.Problem
	err      error
}

// softMemoryLimit is the heap size above which a build of jobs workers
// collects garbage whatever GOGC says: 48 MiB for discovery and the
// build's own records, and 44 MiB a worker (a unit of 16 beams of 801
// points keeps some 10 to 20 MB live while its pages are made). At 400 %
// growth the heap would otherwise follow five times whatever is live, and
// the lean runs of a ten times larger archive (10 MB more) would show five
// times over in the peak; under the limit the peak stays where the limit
// is, and the collector runs a little more often instead.
func softMemoryLimit(jobs int) int64 {
	return 48<<20 + int64(jobs)*44<<20
}

func build(o buildOptions, stdout, stderr io.Writer) (int, error) {
	start := time.Now()
	// A unit allocates some 40 MB of short-lived buffers (its pages, its
	// workbook, the parsed inputs) over a live heap of a few tens of MB.
	// At the default GOGC of 100 the collector ran several times a unit,
	// and stopping the workers for it took a large share of a build's CPU
	// (DEVELOPERS.md, Measured).
	// Unless GOGC is set, a build collects at 400 % growth instead. A soft
	// memory limit keeps that growth from reaching the machine's memory on
	// a large archive: near it the collector runs as often as it must.
	//
	// Discovery comes first, at the default rate: parsing ten thousand
	// run.yaml files makes some 2 GB of short-lived garbage around 10 MB
	// of lean runs, which at 400 % would take the heap to five times that.
	archive, err := ingest.OpenLean(o.archive)
	if err != nil {
		return exitRefused, err
	}
	if afterDiscovery != nil {
		afterDiscovery()
	}
	if os.Getenv("GOGC") == "" {
		defer debug.SetGCPercent(debug.SetGCPercent(400))
	}
	if os.Getenv("GOMEMLIMIT") == "" {
		defer debug.SetMemoryLimit(debug.SetMemoryLimit(softMemoryLimit(o.jobs)))
	}
	// A shard build holds its shard; anything that writes the fleet pages
	// (a whole build, --only) holds the whole site.
	scope := lockScope{}
	if o.shardN > 0 && o.only == "" {
		scope = lockScope{o.shardK, o.shardN}
	}
	site, err := openSite(o.site, true, "build", scope)
	if err != nil {
		return openSiteCode(err), err
	}
	defer site.close()
	refused := false
	// What the fleet pages were made from, before this build changes a
	// unit: if they cannot be made again, they stay only while it holds.
	statesBefore, err := site.statesDigest()
	if err != nil {
		return exitSite, err
	}
	if err := adoptOrphans(site, archive); err != nil {
		return exitSite, err
	}

	mine := func(serial string) bool {
		if o.only != "" && serial != o.only {
			return false
		}
		return o.shardN == 0 || shardOf(serial, o.shardN) == o.shardK
	}
	var units []*ingest.Unit
	inArchive := map[string]bool{}
	for _, u := range archive.Units {
		inArchive[u.Serial] = true
		if mine(u.Serial) {
			units = append(units, u)
		}
	}
	if o.only != "" && len(units) == 0 {
		return exitUsage, usageError("no unit with serial %q in %s", o.only, o.archive)
	}
	// Discovery's problems, but those of the runs built here: they are
	// printed with their unit. With --only, only those about that unit.
	withUnit := goodRunFiles(units)
	for _, p := range archive.Problems {
		if withUnit[p.File] || (o.only != "" && !concerns(units[0], p)) {
			continue
		}
		fmt.Fprintln(stderr, p.Error())
		refused = true
	}
	// Units that left the archive leave the site, unless the build is
	// restricted to one serial (the rest of the archive was not looked at
	// for that purpose). Only the files gtpack wrote for them go.
	if o.only == "" {
		removed, err := site.removeUnitsExcept(func(serial string) bool {
			return inArchive[serial] || !mine(serial)
		})
		if err != nil {
			return exitSite, err
		}
		if len(removed) > 0 && !o.quiet {
			fmt.Fprintf(stderr, "gtpack: removed %d unit(s) that left the archive: %s\n", len(removed), listSome(removed))
		}
	}

	prog := newProgress(stderr, len(units), o.quiet)
	jobs := make(chan *ingest.Unit)
	outcomes := make(chan unitOutcome)
	var wg sync.WaitGroup
	for w := 0; w < o.jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for u := range jobs {
				outcomes <- buildUnit(archive, site, u, o.force)
			}
		}()
	}
	go func() {
		for _, u := range units {
			jobs <- u
		}
		close(jobs)
		wg.Wait()
		close(outcomes)
	}()

	var built, skipped, incomplete, stale, failed int
	var unwritten []string
	owned := map[string]bool{}
	thisBuild := map[string]bool{}
	for out := range outcomes {
		thisBuild[out.serial] = true
		for _, p := range ingest.SortProblems(out.problems) {
			prog.println(fmt.Sprintf("%s (unit %s)", p.Error(), out.serial))
			refused = true
		}
		var se *siteError
		switch {
		case errors.As(out.err, &se):
			unwritten = append(unwritten, out.serial)
			prog.println(fmt.Sprintf("%s: not written: %v", out.serial, out.err))
		case out.err != nil:
			failed++
			refused = true
			prog.println(fmt.Sprintf("%s: %v", out.serial, out.err))
		case out.stale:
			stale++
			refused = true
		case out.skipped:
			skipped++
		default:
			built++
		}
		if out.state != nil {
			if out.err == nil && out.state.Summary.Verdict == reduce.VerdictIncomplete {
				incomplete++
			}
			for _, e := range out.state.Outputs {
				owned[e.Path] = true
			}
		}
		prog.unitDone(out)
	}
	prog.finish()
	sort.Strings(unwritten)

	code := exitOK
	if refused {
		code = exitRefused
	}
	var fleetErr error
	if len(unwritten) > 0 {
		code = exitSite
	}
	if o.shardN == 0 {
		switch {
		case site.hasPending():
			// A unit's commit stopped half-way: its state may not describe
			// its folder, so no manifest is made from the states now.
			fleetErr = fmt.Errorf("the fleet pages and manifest.json were not written: some unit(s) could not be committed whole (see above); the next build finishes them")
		case len(unwritten) > 0 || !site.fleetCurrent():
			// The fleet stage reads the states back from the site (the page
			// cache has them) rather than holding them from the unit stage:
			// its memory must not grow with the number of units. Decoding
			// the states makes some 160 kB of garbage a unit: at the unit
			// stage's GOGC of 400 the heap would grow to five times the
			// live one before a collection.
			if os.Getenv("GOGC") == "" {
				debug.SetGCPercent(100)
			}
			var notices []string
			if len(unwritten) > 0 {
				notices = append(notices, fmt.Sprintf("%d unit(s) could not be written by the last build and show the files of the build before it, if any: %s. Run the build again once the site can be written.", len(unwritten), strings.Join(unwritten, ", ")))
			}
			serials, err := site.serials()
			if err == nil {
				err = writeFleet(site, serials, notices)
			}
			fleetErr = err
		}
		if fleetErr != nil {
			code = exitSite
			fmt.Fprintf(stderr, "gtpack: %v\n", fleetErr)
			// The fleet pages of the build before no longer describe the
			// units under them: they go, rather than show hashes and
			// verdicts that are not those of the files.
			if d, err := site.statesDigest(); err == nil && d == statesBefore {
				// No unit changed: the pages there still describe them.
			} else if dropped := site.dropFleet(); len(dropped) > 0 {
				fmt.Fprintf(stderr, "gtpack: removed the fleet pages of the build before (%s): they no longer describe the units; build again once the site can be written\n", strings.Join(dropped, ", "))
			}
		}
	}
	if st, ok := site.readFleetStamp(); ok {
		for _, e := range st.Outputs {
			owned[e.Path] = true
		}
	}
	for _, m := range site.said {
		fmt.Fprintf(stderr, "gtpack: %s\n", m)
	}
	if theirs := site.personsFiles(owned, thisBuild); len(theirs) > 0 {
		fmt.Fprintf(stderr, "gtpack: left %d file(s) in %s that gtpack did not write: %s\n", len(theirs), o.site, listSome(theirs))
	}
	if !o.quiet {
		fmt.Fprintf(stderr, "gtpack: %d unit(s) built, %d unchanged, %d stale, %d incomplete, %d failed, %d not written, in %.1f s -> %s\n",
			built, skipped, stale, incomplete, failed, len(unwritten), time.Since(start).Seconds(), o.site)
	}
	return code, nil
}

// listSome lists up to ten names, and how many more there are.
func listSome(names []string) string {
	if len(names) <= 10 {
		return strings.Join(names, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(names[:10], ", "), len(names)-10)
}

// openSiteCode is the exit code of a site that could not be opened: 2 for
// a folder that is not a site, 3 for one that cannot be written now.
func openSiteCode(err error) int {
	var ns *notSiteError
	if errors.As(err, &ns) {
		return exitUsage
	}
	return exitSite
}

// adoptOrphans gives the refused runs whose serial could not be read (an
// unreadable run.yaml, or a folder that cannot be read) to the units that
// the site recorded runs for there: an exact run.yaml, or any run below an
// unreadable folder (which may be a run folder, a unit's folder or the
// whole runs/ tree). Otherwise those units would look as if they had left
// the archive, or an older run would silently become their acceptance run.
func adoptOrphans(site *site, a *ingest.Archive) error {
	if len(a.Orphans) == 0 {
		return nil
	}
	serials, err := site.serials()
	if err != nil {
		return err
	}
	recorded := map[string][]string{} // serial: its run.yaml paths
	for _, serial := range serials {
		st, err := site.readState(serial)
		if err != nil || st == nil {
			continue
		}
		for _, d := range st.Runs {
			recorded[serial] = append(recorded[serial], path.Join(d, "run.yaml"))
		}
		for _, f := range st.Inputs {
			if path.Base(f.Path) == "run.yaml" {
				recorded[serial] = append(recorded[serial], f.Path)
			}
		}
	}
	for _, orphan := range a.Orphans {
		for _, serial := range serials {
			if !slices.ContainsFunc(recorded[serial], func(p string) bool {
				return p == orphan.File || (orphan.File == "" && strings.HasPrefix(p, orphan.Dir+"/"))
			}) {
				continue
			}
			i := sort.Search(len(a.Units), func(i int) bool { return a.Units[i].Serial >= serial })
			if i < len(a.Units) && a.Units[i].Serial == serial {
				a.Units[i].Refused = append(a.Units[i].Refused, orphan)
				continue
			}
			a.Units = slices.Insert(a.Units, i, &ingest.Unit{Serial: serial, Refused: []*ingest.RefusedRun{orphan}})
		}
	}
	return nil
}

// buildUnit reduces and renders one unit, or skips it when nothing it
// depends on changed since the site's record of it.
func buildUnit(a *ingest.Archive, site *site, u *ingest.Unit, force bool) unitOutcome {
	out := unitOutcome{serial: u.Serial}
	defer func() {
		// A unit must never take the build down with it.
		if r := recover(); r != nil {
			out.err = fmt.Errorf("internal error while building this unit: %v", r)
		}
	}()
	old, err := site.readState(u.Serial)
	if err != nil {
		out.err = &siteError{fmt.Errorf("%v; expected the state gtpack wrote (remove it and the unit's files by hand to start the unit afresh)", err)}
		return out
	}
	// The files its refused runs name are checked as check does.
	for _, rr := range u.Refused {
		out.problems = append(out.problems, a.RefusedProblems(rr)...)
	}
	if r := u.AcceptanceRefused(); r != nil {
		stale := keepStale(site, u, r, old)
		stale.problems = out.problems
		return stale
	}
	if !force {
		if ok, refreshed := site.current(a, u, old); ok {
			out.state, out.skipped = old, true
			if refreshed != nil {
				// Same contents, new stats: recorded, so that the next
				// build need not read these files again.
				if err := site.writeStateOnly(refreshed, false); err != nil {
					out.err = err
				}
			}
			return out
		}
	}
	w, err := reduceWhole(a, u)
	if err != nil {
		out.err = err
		return out
	}
	res := w.unit
	out.problems = append(out.problems, w.problems...)

	files, err := renderUnit(res)
	if err != nil {
		out.err = err
		return out
	}
	st := &unitState{
		Serial:      u.Serial,
		ToolVersion: render.Version,
		Documents:   unitDocuments(a, w.runs),
		Inputs:      recordInputs(w.inputs),
		Absent:      w.absent,
		Approvals:   recordInputs(w.approvals),
		Folders:     w.folders,
		Summary:     res.Summary(),
	}
	st.ReportStarted = startedText(st.Summary.Started)
	for _, r := range w.runs {
		st.Runs = append(st.Runs, r.Dir)
	}
	if err := site.writeUnit(old, st, files); err != nil {
		out.err = err
		out.state = old // what the site still holds of the unit
		return out
	}
	out.state = st
	return out
}

// keepStale is the unit whose acceptance run was refused: its files in the
// site stay those of its last build, and its state says it is stale and
// incomplete, so that the overview shows it and counts it incomplete. An
// older run never takes the refused run's place.
func keepStale(site *site, u *ingest.Unit, r *ingest.RefusedRun, old *unitState) unitOutcome {
	out := unitOutcome{serial: u.Serial, stale: true}
	st := &unitState{Serial: u.Serial, ToolVersion: render.Version}
	sum := reduce.UnitSummary{Serial: u.Serial, Started: r.Started.UTC(), Verdict: reduce.VerdictIncomplete}
	var builtVerdict reduce.Verdict
	if old != nil && !old.Summary.NoReport {
		*st = *old
		if old.Summary.Stale == "" {
			builtVerdict = old.Summary.Verdict
		}
		was := old.ReportStarted
		if was == "" {
			was = startedText(old.Summary.Started) // a state of 0.2.1
		}
		sum.Product = old.Summary.Product
		sum.Stale = fmt.Sprintf("acceptance run %s was refused; the report shown is of the run started %s", r.File, was)
	} else {
		if len(u.Runs) > 0 {
			sum.Product = u.Runs[len(u.Runs)-1].Product
		}
		sum.Stale = fmt.Sprintf("acceptance run %s was refused; no report was built", r.File)
		sum.NoReport = true
	}
	st.Summary = sum
	if old != nil && old.Summary.Stale == sum.Stale && old.Summary.Started.Equal(sum.Started) && old.Summary.Verdict == sum.Verdict {
		out.state = old // already recorded so: nothing to write
		return out
	}
	if err := site.writeStale(st, builtVerdict); err != nil {
		out.err = err
		return out
	}
	out.state = st
	return out
}

// wholeUnit is a unit reduced from all its runs: the acceptance run's
// result with the earlier runs as its history and its issue state, and
// every file read for it.
type wholeUnit struct {
	unit *reduce.Unit
	// problems are those of every run, the history's too.
	problems  []*ingest.Problem
	runs      []*ingest.Run // whole, oldest first
	inputs    []ingest.InputFile
	absent    []string
	approvals []ingest.InputFile // the serial's approval files
	folders   []recordedInput    // the run folders, with the digest of their listings
}

// reduceWhole reads and reduces every run of u. Every file read for the
// unit's files is an input: the acceptance run's and those of the
// earlier runs, whose verdicts, worst limits and notes the report shows.
// Its issue state follows from the digest of those inputs and the
// serial's approvals.
func reduceWhole(a *ingest.Archive, u *ingest.Unit) (*wholeUnit, error) {
	w := &wholeUnit{}
	// The run folders' listings are taken before anything in them is
	// read: a file added later changes them, and the next build sees it.
	for _, r := range u.Runs {
		d, _ := a.FolderListing(r.Dir)
		w.folders = append(w.folders, recordedInput{Path: r.Dir, SHA256: d})
	}
	// The archive was opened lean: each run is read whole here, one unit
	// at a time, so that discovery holds little per unit.
	for _, r := range u.Runs {
		full, err := a.Full(r)
		if err != nil {
			return nil, err
		}
		w.runs = append(w.runs, full)
	}
	if len(w.runs) == 0 {
		return nil, fmt.Errorf("unit %s has no run that can be read", u.Serial)
	}
	inputs := map[string]ingest.InputFile{}
	absent := map[string]bool{}
	var history []reduce.HistoryEntry
	for i, r := range w.runs {
		var h []reduce.HistoryEntry
		if i == len(w.runs)-1 {
			h = history
		}
		reduced, data := reduceRun(a, r, h)
		for i := range reduced.Problems {
			w.problems = append(w.problems, &reduced.Problems[i])
		}
		for _, in := range data.Inputs {
			inputs[in.Path] = in
		}
		for _, p := range data.Absent {
			absent[p] = true
		}
		if i < len(w.runs)-1 {
			history = append(history, reduced.HistoryOf())
		}
		w.unit = reduced
	}
	for _, in := range inputs {
		w.inputs = append(w.inputs, in)
	}
	sort.Slice(w.inputs, func(i, j int) bool { return w.inputs[i].Path < w.inputs[j].Path })
	for p := range absent {
		w.absent = append(w.absent, p)
	}
	sort.Strings(w.absent)
	approvals := a.Approvals[u.Serial]
	for _, ap := range approvals {
		w.approvals = append(w.approvals, a.Documents[ap.File])
	}
	digest := render.ManifestInputsDigest(manifestEntries(recordInputs(w.inputs)))
	w.unit.Issue = reduce.IssueOf(a.Lab, u.Serial, digest, w.unit.Verdict, len(w.unit.Problems), approvals)
	return w, nil
}

// reduceRun loads one run's files and reduces them. It returns the result
// and what was loaded (the inputs, and the files that could not be read).
func reduceRun(a *ingest.Archive, r *ingest.Run, history []reduce.HistoryEntry) (*reduce.Unit, *ingest.RunData) {
	data, problems := a.Load(r)
	in := reduce.Input{
		Run:       r,
		Data:      data,
		Station:   a.Stations[r.Station],
		Reference: a.References[r.Reference],
		Spec:      a.Specs[r.Product],
		// The run's discovery problems (an unknown station) are its own:
		// reduce says what follows from them under them.
		Problems: append(a.ProblemsOf(r), problems...),
		History:  history,
		Lab:      a.Lab,
	}
	return reduce.ReduceUnit(in), data
}

// renderUnit turns one unit's result into its files, by name within the
// unit's folder.
func renderUnit(res *reduce.Unit) (map[string][]byte, error) {
	report, err := render.Report(res)
	if err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	book, err := render.UnitWorkbook(res)
	if err != nil {
		return nil, fmt.Errorf("workbook: %w", err)
	}
	js, err := render.ResultJSON(res)
	if err != nil {
		return nil, fmt.Errorf("result.json: %w", err)
	}
	return map[string][]byte{
		"report.html":        report,
		res.Serial + ".xlsx": book,
		"result.json":        js,
	}, nil
}

func cmdIndex(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("index", flag.ContinueOnError)
	pos, err := parseArgs(fs, args, "SITE")
	if err != nil {
		return exitUsage, err
	}
	site, err := openSite(pos[0], false, "index", lockScope{})
	if err != nil {
		return openSiteCode(err), err
	}
	defer site.close()
	serials, err := site.serials()
	if err != nil {
		return exitSite, err
	}
	// Every unit's files are checked against what was recorded for them
	// before they go into the manifest: a unit whose files are missing or
	// changed is left out, named, and made again by the next build.
	code := exitOK
	var keep, dropped []string
	checks := site.checkAll(serials)
	for i, serial := range serials {
		why, err := checks[i].why, checks[i].err
		if err != nil {
			return exitSite, err
		}
		if why != "" {
			fmt.Fprintf(stderr, "%s: unit %s left out of the fleet pages and the manifest: %s; gtpack build makes it again\n",
				filepath.Join(site.dir, unitDir(serial)), serial, why)
			dropped = append(dropped, serial)
			code = exitRefused
			if st, err := site.readState(serial); err != nil {
				return exitSite, err
			} else if st != nil && !checks[i].damaged {
				st.Damaged = true
				if err := site.writeStateOnly(st, false); err != nil {
					return exitSite, err
				}
			}
			continue
		}
		keep = append(keep, serial)
	}
	var notices []string
	if len(dropped) > 0 {
		notices = append(notices, fmt.Sprintf("%d unit(s) are left out because their files in the site are not those gtpack wrote: %s.", len(dropped), strings.Join(dropped, ", ")))
	}
	if err := writeFleet(site, keep, notices); err != nil {
		return exitSite, err
	}
	for _, m := range site.said {
		fmt.Fprintf(stderr, "gtpack: %s\n", m)
	}
	return code, nil
}

// inside reports whether path is dir or lies below it, after resolving
// both to absolute paths (and links, where they exist).
func inside(path, dir string) bool {
	abs := func(p string) string {
		a, err := filepath.Abs(p)
		if err != nil {
			return filepath.Clean(p)
		}
		if r, err := filepath.EvalSymlinks(a); err == nil {
			return r
		}
		// A site that does not exist yet: resolve its nearest parent.
		if r, err := filepath.EvalSymlinks(filepath.Dir(a)); err == nil {
			return filepath.Join(r, filepath.Base(a))
		}
		return a
	}
	rel, err := filepath.Rel(abs(dir), abs(path))
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
}

// startedText is a run's start as the unit record and the pages write it:
// RFC 3339 in UTC, "" when not known.
func startedText(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format(time.RFC3339)
}
