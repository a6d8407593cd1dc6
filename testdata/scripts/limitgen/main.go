// Command limitgen writes synthetic archives at and past the input limits
// (ingest/limits.go) for testdata/scripts/bench-limits.sh:
//
//	limitgen [-units N] [-beams B] [-points P] [-elements E] [-huge-points P] [-huge-bytes N] DIR
//
// The archive is the demo archive (ingest/demo) of N units with up to 16
// beams of up to 100,001 points each (its own limits). Beams past 16 are
// added to every run.yaml as copies of the run's beams under new ids,
// naming the same files, so that a run of thousands of beams takes no
// more disk than one of 16. -elements replaces every run's elements
// table with one of E elements, 128 to a row. -huge-points replaces the first unit's first
// beam transmission with a 2-port Touchstone file of P points (RI, one
// point a line); -huge-bytes pads that file with comment lines to at
// least N bytes. Every number is demo data.
package main

import (
	"bufio"
	"bytes"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"gtpack.example/gtpack/ingest/demo"
)

func main() {
	units := flag.Int("units", 1, "units")
	beams := flag.Int("beams", 16, "beams per run (past 16: copies of the run's beams)")
	points := flag.Int("points", 801, "points per file (at most 100,001)")
	elements := flag.Int("elements", 0, "elements of every run's elements table, 0: the demo's")
	hugePoints := flag.Int("huge-points", 0, "points of the first unit's b00 transmission, 0: as the others")
	hugeBytes := flag.Int64("huge-bytes", 0, "pad that file with comment lines to at least this many bytes")
	flag.Parse()
	if flag.NArg() != 1 {
		fmt.Fprintln(os.Stderr, "usage: limitgen [-units N] [-beams B] [-points P] [-elements E] [-huge-points P] [-huge-bytes N] DIR")
		os.Exit(2)
	}
	dir := flag.Arg(0)
	if err := run(dir, *units, *beams, *points, *elements, *hugePoints, *hugeBytes); err != nil {
		fmt.Fprintln(os.Stderr, "limitgen:", err)
		os.Exit(1)
	}
}

func run(dir string, units, beams, points, elements, hugePoints int, hugeBytes int64) error {
	if _, err := demo.Write(dir, demo.Options{Units: units, Seed: 7, Beams: min(beams, 16), Points: points}); err != nil {
		return err
	}
	var runs []string
	err := filepath.Walk(dir, func(p string, info os.FileInfo, err error) error {
		if err == nil && info.Name() == "run.yaml" {
			runs = append(runs, p)
		}
		return err
	})
	if err != nil {
		return err
	}
	sort.Strings(runs)
	if beams > 16 {
		for _, p := range runs {
			if err := addBeams(p, beams); err != nil {
				return err
			}
		}
	}
	if elements > 0 {
		for _, p := range runs {
			if err := elementsTable(filepath.Join(filepath.Dir(p), "elements.csv"), elements); err != nil {
				return err
			}
		}
	}
	if hugePoints > 0 || hugeBytes > 0 {
		if hugePoints == 0 {
			hugePoints = points
		}
		return hugeTouchstone(filepath.Join(filepath.Dir(runs[0]), "b00.s2p"), hugePoints, hugeBytes)
	}
	return nil
}

// addBeams adds copies of the run's beams to run.yaml until it lists
// total beams; a copy keeps everything of its beam but the id.
func addBeams(p string, total int) error {
	data, err := os.ReadFile(p)
	if err != nil {
		return err
	}
	head, rest, ok := strings.Cut(string(data), "beams:\n")
	if !ok {
		return fmt.Errorf("%s: no beams list", p)
	}
	end := strings.Index(rest, "\nelements:")
	if end < 0 {
		return fmt.Errorf("%s: no elements key after the beams", p)
	}
	list, tail := rest[:end+1], rest[end+1:]
	var entries []string
	for _, b := range strings.Split(strings.TrimPrefix(list, "  - id: "), "\n  - id: ") {
		entries = append(entries, "  - id: "+strings.TrimSuffix(b, "\n")+"\n")
	}
	var out bytes.Buffer
	out.WriteString(head + "beams:\n")
	for _, e := range entries {
		out.WriteString(e)
	}
	for k := len(entries); k < total; k++ {
		e := entries[k%len(entries)]
		_, body, _ := strings.Cut(e, "\n")
		fmt.Fprintf(&out, "  - id: x%05d\n%s", k, body)
	}
	out.WriteString(tail)
	return os.WriteFile(p, out.Bytes(), 0o644)
}

// elementsTable writes an elements table of n elements, 128 to a row, with
// a small amplitude taper and a phase plane.
func elementsTable(p string, n int) error {
	var b bytes.Buffer
	b.WriteString("row,col,amplitude_db,phase_deg\n")
	for k := 0; k < n; k++ {
		r, c := k/128, k%128
		fmt.Fprintf(&b, "%d,%d,%.2f,%.1f\n", r, c, -0.01*float64((r+c)%50), float64((3*r+5*c)%360-180))
	}
	return os.WriteFile(p, b.Bytes(), 0o644)
}

// hugeTouchstone writes a 2-port version-1 file of n points from 10 GHz
// up, in RI, one point a line, padded with comment lines to pad bytes.
func hugeTouchstone(p string, n int, pad int64) error {
	f, err := os.Create(p)
	if err != nil {
		return err
	}
	w := bufio.NewWriterSize(f, 1<<20)
	written := int64(0)
	put := func(s string) {
		k, _ := w.WriteString(s)
		written += int64(k)
	}
	put("! demo data: a transmission file past the point limit\n# GHz S RI R 50\n")
	line := make([]byte, 0, 128)
	for k := 0; k < n; k++ {
		line = strconv.AppendFloat(line[:0], 10+float64(k)*1e-6, 'f', 6, 64)
		line = append(line, " 0.05 0.01 0.02 0.003 0.0001 0 0.06 0.02\n"...)
		k, _ := w.Write(line)
		written += int64(k)
	}
	comment := "! padding " + strings.Repeat("x", 110) + "\n"
	for written < pad {
		put(comment)
	}
	if err := w.Flush(); err != nil {
		return err
	}
	return f.Close()
}
