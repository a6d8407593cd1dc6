package main

import (
	"flag"
	"fmt"
	"hash/fnv"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"sync"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
	"gtpack.example/gtpack/render"
)

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
	// and stopping the workers for it took a fifth of the CPU of a build.
	// Unless GOGC is set, a build collects at 400 % growth instead, which
	// took the sample archive at -j 2 from 68 to 118 MB resident. A soft
	// memory limit keeps that growth from reaching the machine's memory on a
	// large archive: near it the collector runs as often as it must.
	//
	// Discovery comes first, at the default rate: parsing ten thousand
	// run.yaml files makes some 2 GB of short-lived garbage around 10 MB
	// of lean runs, which at 400 % would take the heap to five times that.
	archive, err := ingest.OpenLean(o.archive)
	if err != nil {
		return exitRefused, err
	}
	if os.Getenv("GOGC") == "" {
		defer debug.SetGCPercent(debug.SetGCPercent(400))
	}
	if os.Getenv("GOMEMLIMIT") == "" {
		defer debug.SetMemoryLimit(debug.SetMemoryLimit(softMemoryLimit(o.jobs)))
	}
	site, err := openSite(o.site)
	if err != nil {
		return exitRefused, err
	}
	refused := false
	for _, p := range archive.Problems {
		fmt.Fprintln(stderr, p.Error())
		refused = true
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
	// Units that left the archive leave the site, unless the build is
	// restricted to one serial (the rest of the archive was not looked at
	// for that purpose).
	if o.only == "" {
		if err := site.removeUnitsExcept(func(serial string) bool {
			return inArchive[serial] || !mine(serial)
		}); err != nil {
			return exitRefused, err
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

	var built, skipped, incomplete, failed int
	for out := range outcomes {
		for _, p := range out.problems {
			prog.println(fmt.Sprintf("%s (unit %s)", p.Error(), out.serial))
			refused = true
		}
		switch {
		case out.err != nil:
			failed++
			refused = true
			prog.println(fmt.Sprintf("%s: %v", out.serial, out.err))
		case out.skipped:
			skipped++
		default:
			built++
		}
		if out.state != nil && out.state.Summary.Verdict == reduce.VerdictIncomplete {
			incomplete++
		}
		prog.unitDone(out)
	}
	prog.finish()

	if o.shardN == 0 && !site.fleetCurrent() {
		// The fleet stage reads the states back from the site (the page
		// cache has them) rather than holding them from the unit stage:
		// its memory must not grow with the number of units. Its live heap
		// is a few tens of MB, but decoding the states makes some 160 kB
		// of garbage a unit: at the unit stage's GOGC of 400 the heap would
		// grow to five times the live one before a collection.
		if os.Getenv("GOGC") == "" {
			debug.SetGCPercent(100)
		}
		if err := writeFleet(site); err != nil {
			return exitRefused, err
		}
	}
	if !o.quiet {
		fmt.Fprintf(stderr, "gtpack: %d unit(s) built, %d unchanged, %d incomplete, %d failed, in %.1f s -> %s\n",
			built, skipped, incomplete, failed, time.Since(start).Seconds(), o.site)
	}
	if refused {
		return exitRefused, nil
	}
	return exitOK, nil
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
	// The archive was opened lean: each run is read whole here, one unit
	// at a time, so that discovery holds little per unit.
	runs := make([]*ingest.Run, len(u.Runs))
	for i, r := range u.Runs {
		full, err := a.Full(r)
		if err != nil {
			out.err = err
			return out
		}
		runs[i] = full
	}
	stamps := stampFiles(a, runs)
	if !force {
		if st, ok := site.upToDate(u.Serial, stamps); ok {
			out.state, out.skipped = st, true
			return out
		}
	}

	var history []reduce.HistoryEntry
	for _, r := range runs[:len(runs)-1] {
		res, _ := reduceRun(a, r, nil)
		history = append(history, reduce.HistoryEntry{Run: r.Dir, Started: res.Started, Verdict: res.Verdict})
	}
	res, inputs := reduceRun(a, runs[len(runs)-1], history)
	for i := range res.Problems {
		p := res.Problems[i]
		out.problems = append(out.problems, &p)
	}

	files, err := renderUnit(res)
	if err != nil {
		out.err = err
		return out
	}
	outputs, err := site.writeUnit(u.Serial, files)
	if err != nil {
		out.err = err
		return out
	}
	st := &unitState{
		Serial:      u.Serial,
		ToolVersion: render.Version,
		Stamps:      stamps,
		Inputs:      inputs,
		Outputs:     outputs,
		Summary:     res.Summary(),
	}
	if err := site.writeState(st); err != nil {
		out.err = err
		return out
	}
	out.state = st
	return out
}

// reduceRun loads one run's files and reduces them. It returns the result
// and every input file of the run.
func reduceRun(a *ingest.Archive, r *ingest.Run, history []reduce.HistoryEntry) (*reduce.Unit, []ingest.InputFile) {
	data, problems := a.Load(r)
	in := reduce.Input{
		Run:       r,
		Data:      data,
		Station:   a.Stations[r.Station],
		Reference: a.References[r.Reference],
		Spec:      a.Specs[r.Product],
		Problems:  problems,
		History:   history,
	}
	var inputs []ingest.InputFile
	if data != nil {
		inputs = data.Inputs
	}
	return reduce.ReduceUnit(in), inputs
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
	site, err := openSite(pos[0])
	if err != nil {
		return exitRefused, err
	}
	if err := writeFleet(site); err != nil {
		return exitRefused, err
	}
	return exitOK, nil
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
