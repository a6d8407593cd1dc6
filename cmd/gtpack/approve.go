package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"strings"
	"time"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// cmdApprove approves the report of a unit as the archive holds it now:
// it reduces the unit, refuses one that is incomplete or has problems,
// and adds an approval file under ARCHIVE/approvals/<serial>/ (the one
// file gtpack ever writes into an archive; it never changes one).
func cmdApprove(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("approve", flag.ContinueOnError)
	by := fs.String("by", "", "the name of the person who approves")
	role := fs.String("role", "", "their role, e.g. Quality engineer")
	comment := fs.String("comment", "", "free text")
	date := fs.String("date", "", "when it was approved, RFC 3339 (default: now)")
	pos, err := parseArgs(fs, args, "ARCHIVE", "SERIAL")
	if err != nil {
		return exitUsage, err
	}
	dir, serial := pos[0], pos[1]
	name := strings.TrimSpace(*by)
	if name == "" || strings.ContainsAny(name, "\r\n") {
		return exitUsage, usageError("--by NAME is required: the name of the person who approves, on one line")
	}
	if strings.ContainsAny(*role+*comment, "\r") || strings.ContainsAny(*role, "\n") {
		return exitUsage, usageError("--role must be one line, and neither it nor --comment may hold a carriage return")
	}
	when := time.Now().UTC().Truncate(time.Second)
	if *date != "" {
		t, err := time.Parse(time.RFC3339, *date)
		if err != nil {
			return exitUsage, usageError("--date %q is not RFC 3339, e.g. 2026-11-04T10:00:00Z", *date)
		}
		when = t.UTC()
	}
	if err := ingest.CheckIdentifier(serial); err != nil {
		return exitUsage, usageError("serial: %v", err)
	}

	a, err := ingest.OpenLean(dir)
	if err != nil {
		return exitRefused, err
	}
	var u *ingest.Unit
	for _, x := range a.Units {
		if x.Serial == serial {
			u = x
		}
	}
	if u == nil {
		return exitUsage, usageError("no unit with serial %q in %s", serial, dir)
	}
	if a.Lab == nil {
		return exitRefused, fmt.Errorf("%s has no lab.yaml: a report can only be issued by a stated laboratory (see the contract, lab.yaml); nothing was approved", dir)
	}
	if r := u.AcceptanceRefused(); r != nil {
		return exitRefused, fmt.Errorf("%s: the acceptance run of %s was refused (%s); nothing was approved", r.File, serial, firstProblem(r.Problems))
	}
	w, err := reduceWhole(a, u)
	if err != nil {
		return exitRefused, err
	}
	res := w.unit
	if res.Verdict == reduce.VerdictIncomplete || len(res.Problems) > 0 {
		for _, p := range res.Problems {
			fmt.Fprintln(stderr, p.Error())
		}
		return exitRefused, fmt.Errorf("%s is %s with %d problem(s) (listed above): an incomplete unit cannot be approved; nothing was approved", serial, res.Verdict, len(res.Problems))
	}
	digest := res.Issue.InputsSHA256
	for _, old := range a.Approvals[serial] {
		if old.InputsSHA256 == digest && reduce.Verdict(old.Verdict) == res.Verdict && old.ApprovedBy == name {
			return exitRefused, fmt.Errorf("%s: %s already approved this report (%s, inputs %s) on %s; nothing was approved",
				old.File, name, res.Verdict, digest, old.Date.Format(time.RFC3339))
		}
	}
	ap := &ingest.Approval{Schema: 1, Serial: serial, InputsSHA256: digest, Verdict: string(res.Verdict),
		ApprovedBy: name, Role: *role, Date: when, Comment: strings.TrimSpace(*comment)}
	data := ingest.ApprovalYAML(ap)
	rel, err := writeApproval(dir, serial, when, name, data)
	if err != nil {
		return exitSite, err
	}
	ap.File = rel
	after := reduce.IssueOf(a.Lab, serial, digest, res.Verdict, 0, append(a.Approvals[serial], ap))
	fmt.Fprintf(stdout, "gtpack approve: %s %s R%d of %s (%s, inputs %s) -> %s\n", after.State, after.ReportNumber, after.Revision,
		serial, res.Verdict, digest, path.Join(dir, rel))
	return exitOK, nil
}

func firstProblem(ps []*ingest.Problem) string {
	if len(ps) == 0 {
		return "no reason given"
	}
	return ps[0].Error()
}

// writeApproval adds approvals/<serial>/<time>-<name>.yaml to the archive
// through an os.Root of it (nothing outside it, no link followed out),
// never over an existing file, and returns its archive-relative path.
func writeApproval(archive, serial string, when time.Time, by string, data []byte) (string, error) {
	root, err := os.OpenRoot(archive)
	if err != nil {
		return "", err
	}
	defer root.Close()
	folder := path.Join("approvals", serial)
	if err := root.MkdirAll(folder, 0o755); err != nil {
		return "", err
	}
	base := when.UTC().Format("20060102T150405Z") + "-" + slug(by)
	for n := 1; n < 100; n++ {
		name := base
		if n > 1 {
			name = fmt.Sprintf("%s-%d", base, n)
		}
		rel := path.Join(folder, name+".yaml")
		f, err := root.OpenFile(rel, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		if err != nil {
			return "", err
		}
		if _, err := f.Write(data); err != nil {
			f.Close()
			root.Remove(rel)
			return "", err
		}
		if err := f.Sync(); err != nil {
			f.Close()
			root.Remove(rel)
			return "", err
		}
		if err := f.Close(); err != nil {
			root.Remove(rel)
			return "", err
		}
		if _, err := ingest.ParseApproval(data, rel); err != nil {
			root.Remove(rel)
			return "", fmt.Errorf("internal: the approval written does not read back: %v", err)
		}
		return rel, nil
	}
	return "", fmt.Errorf("%s: too many approvals at %s by %s", path.Join(archive, folder), when.Format(time.RFC3339), by)
}

// slug is a name as a portable file-name part: lower-case letters and
// digits, other runs of characters as one '-'.
func slug(s string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(s) {
		if r >= 'a' && r <= 'z' || r >= '0' && r <= '9' {
			b.WriteRune(r)
			dash = false
		} else if !dash && b.Len() > 0 {
			b.WriteByte('-')
			dash = true
		}
	}
	out := strings.TrimSuffix(b.String(), "-")
	if out == "" {
		out = "approval"
	}
	if len(out) > 40 {
		out = out[:40]
	}
	return out
}
