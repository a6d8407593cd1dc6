package ingest

import (
	"fmt"
	"sort"
	"strings"
)

// NewArchiveFiles are the files of a new archive (gtpack init), by path:
// lab.yaml and one commented template each of a station, a reference
// antenna and a spec, whose values are left empty for the laboratory to
// fill in (so that gtpack check lists each one still to do, at its line),
// the JSON Schema of every kind in .schemas/ (a folder discovery skips),
// each template naming its schema on its first line as YAML editors read
// it, and a README saying what to fill in.
func NewArchiveFiles() (map[string][]byte, error) {
	out := map[string][]byte{}
	for _, kind := range SchemaKinds {
		s, err := Schema(kind)
		if err != nil {
			return nil, err
		}
		out[".schemas/"+SchemaFileName(kind)] = s
	}
	head := func(kind, up string) string {
		return fmt.Sprintf("# yaml-language-server: $schema=%s.schemas/%s\n", up, SchemaFileName(kind))
	}
	out["lab.yaml"] = []byte(head("lab", "") + newLab)
	out["stations/my-station.yaml"] = []byte(head("station", "../") + newStation)
	out["references/my-reference.yaml"] = []byte(head("reference", "../") + newReference)
	out["specs/my-product.yaml"] = []byte(head("spec", "../") + newSpec)
	out["runs/README.md"] = []byte(newRunsReadme(head("run", "../../../")))
	out["README.md"] = []byte(newReadme)
	return out, nil
}

// NewArchivePaths lists NewArchiveFiles' paths, sorted.
func NewArchivePaths(files map[string][]byte) []string {
	var out []string
	for p := range files {
		out = append(out, p)
	}
	sort.Strings(out)
	return out
}

const newLab = `# The laboratory that issues the reports. Fill in each empty value.
schema: 1
name:                 # the laboratory's name
address:              # a list of lines, e.g. [Building 4, 1 Example Road, Example Town]
contact:              # optional: where questions about reports go (delete the line if none)
accreditation:        # optional: the accreditation body and number (delete the line if none)
report_prefix:        # report numbers are <report_prefix>-<serial>-R<revision>, e.g. EATL-GT
`

const newStation = `# A test range and the uncertainty terms it adds to every run.
# Rename this file to <id>.yaml, fill in each empty value, then run gtpack check.
schema: 1
id:                       # the station's identifier, as runs name it (station: in run.yaml)
description:              # optional free text (delete the line if none)
receiver_match:           # residual |Gamma| of the receiver port, 0 <= value < 1, e.g. 0.03
drift_tolerance_db:       # allowed |pre - post| change of the range loss in dB, e.g. 0.25
method_tolerance_db:      # allowed difference between the two noise forms in dB, e.g. 0.30
uncertainty:              # terms this station adds to every run
  - name:                 # e.g. Noise receiver calibration
    applies_to: [gt]      # gain and/or gt
    value_db:             # >= 0: expanded at coverage_k (normal) or the half-width
    distribution: normal  # normal | rectangular | u-shaped | triangular
    coverage_k: 2         # normal terms only
# csv_formats:            # optional: how this station's instruments write CSV files;
#   analyser-export:      # a run names one with csv: analyser-export beside the file
#     delimiter: ";"      # "," ";" "tab" (default: detected)
#     decimal: ","        # "." or "," (default ".")
#     skip_lines: 3       # lines before the header row
#     units_row: true     # a row of units follows the header
#     frequency_column: "Freq(Hz)"   # header text, or a number from 1
#     value_column: 2
`

const newReference = `# A reference antenna's calibration (its gain table).
# Rename this file to <id>.yaml, fill in each empty value, then run gtpack check.
schema: 1
id:                       # the reference antenna's identifier, as runs name it
description:              # optional free text (delete the line if none)
gain_kind: realized       # realized | gain (gain: the measured mismatch loss is applied)
calibrated:               # the calibration date, YYYY-MM-DD
due:                      # the date the calibration is due, YYYY-MM-DD
certificate:              # the certificate's number
coverage_k: 2             # the coverage factor of the table's uncertainties
table:                    # [frequency_ghz, gain_dbi, expanded_uncertainty_db], frequencies increasing
  -                       # e.g. [10.0, 20.12, 0.30]
# Or, instead of table: the certificate's CSV file beside this one:
# table_file: my-reference.csv      # header frequency_ghz,gain_dbi,uncertainty_db
# csv: {delimiter: ";", decimal: ","}   # when the file is laid out otherwise
`

const newSpec = `# The acceptance limits of a product and its beam plan.
# Rename this file to <product>.yaml, fill in each empty value, then run gtpack check.
schema: 1
product:                  # the product code runs name (product: in run.yaml)
title:                    # optional free text (delete the line if none)
decision_rule: guarded    # simple | guarded
beam_plan:                # optional: the beams every unit is measured in; a run may then leave beams out
  files:                  # where a run finds each beam's files; {beam} is the beam id
    transmission: "{beam}.*"          # a glob; it must match exactly one file in the run folder
    noise:                            # each entry whose file is in the run folder is used
      - {file: "{beam}-noise.csv", quantity: noise-density-dbm-hz}
  beams:
    - {id: b00, theta_deg: 0, phi_deg: 0}
limits:
  - name:                 # e.g. G/T at boresight
    quantity: gt          # gt (dB/K) | gain (dBi)
    beams: {max_theta_deg: 0}   # or {min_theta_deg: .., max_theta_deg: ..} or {ids: [b00]}
    band_ghz:             # [low, high], e.g. [10.7, 12.75]
    statistic: min        # min | mean over the band
    limit:                # [[frequency_ghz, value], ...], e.g. [[10.7, 2.0], [12.75, 2.6]]
`

func newRunsReadme(schemaLine string) string {
	return "# Runs\n\nEach test run is a folder anywhere in the archive holding a run.yaml and its data files,\n" +
		"for example runs/<serial>/<date>/run.yaml. A run.yaml starts with the line\n\n    " +
		strings.TrimSpace(schemaLine) + "\n\n(the path from that folder to .schemas/) so that a YAML editor checks it as you type.\n"
}

const newReadme = `# A new gtpack archive

gtpack init wrote this folder. What to fill in, in this order:

1. lab.yaml: the laboratory that issues the reports (name, address, report_prefix).
2. stations/my-station.yaml: the test range. Rename it to <id>.yaml with the id
   runs will name. csv_formats: names the layouts of your instruments' CSV files.
3. references/my-reference.yaml: the reference antenna and its calibration table
   (inline, or table_file: the certificate's CSV beside it). Rename it to <id>.yaml.
4. specs/my-product.yaml: the product's limits and, optionally, its beam plan (the
   beams every unit is measured in and where a run finds their files). Rename it to
   <product>.yaml.
5. One folder per test run anywhere below (e.g. runs/<serial>/<date>/) with its
   run.yaml and the files the instruments wrote: Touchstone files, and noise traces
   as CSV (a csv: mapping beside a file, or the station's csv_formats by name, reads
   an instrument's or a spreadsheet's layout; the file itself is what is read, hashed
   and listed in the manifest).

Every empty value in the templates is still to do: gtpack check lists each one with
its file and line, and every other problem of the archive, in one pass. Delete the
lines of optional keys you do not use.

The templates name their JSON Schema on their first line
(# yaml-language-server: $schema=...), which YAML editors with a YAML language server
read: unknown keys, wrong types and values out of range are marked as you type.
The schemas are in .schemas/ (gtpack schema KIND prints them too); gtpack skips
folders whose name starts with a dot.
`
