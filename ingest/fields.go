package ingest

import (
	"fmt"
	"strings"
)

// The keys of every YAML document, as data: the strict reader declares
// them with ymap.expect (unknown and missing keys), and Schema writes them
// out as JSON Schema for editors. A key added, renamed or made optional
// here changes both, so the two cannot drift; the value rules written in
// each shape are those the reader's code applies (ranges, choices, list
// sizes), and TestSchemasAgreeWithReader holds them to it.

// field describes one key of a mapping: whether it must be there, what its
// value is expected to be (used in messages and as the schema's
// description) and the value's shape.
type field struct {
	key    string
	req    bool
	expect string
	shape  *shape
}

type shapeKind int

const (
	kText    shapeKind = iota // a non-blank scalar (free text, a file name)
	kString                   // a non-blank string (a scalar that is not a number)
	kIdent                    // an identifier (CheckIdentifier)
	kNumber                   // a finite number
	kInteger                  // a whole number
	kBool                     // true or false
	kDate                     // YYYY-MM-DD
	kInstant                  // RFC 3339
	kEnum                     // one of enum
	kConst                    // the integer in min
	kList                     // a list of items
	kTuple                    // a list of exactly len(tuple) items
	kMap                      // a mapping of fields
	kDict                     // a mapping of identifiers to values
	kAnyOf                    // one of alts
)

// shape is the rule a value follows.
type shape struct {
	kind     shapeKind
	enum     []string
	min, max *float64
	exMin    bool // min is exclusive
	exMax    bool // max is exclusive
	items    *shape
	tuple    []*shape
	minItems int
	maxItems int // 0: no bound
	unique   bool
	fields   []field
	values   *shape
	alts     []*shape
	pattern  string
	// extra holds schema keywords the field list cannot say (one key of
	// two is required, a key only with another), in the schema's words;
	// the reader applies the same rule in its code.
	extra []kv
}

func fp(v float64) *float64 { return &v }

var (
	sText    = &shape{kind: kText}
	sIdent   = &shape{kind: kIdent}
	sNumber  = &shape{kind: kNumber}
	sDate    = &shape{kind: kDate}
	sInstant = &shape{kind: kInstant}
	sBool    = &shape{kind: kBool}
	sSchema  = &shape{kind: kConst, min: fp(SchemaVersion)}
	// sPositive is a number above 0; sNonNegative one >= 0.
	sPositive    = &shape{kind: kNumber, min: fp(0), exMin: true}
	sNonNegative = &shape{kind: kNumber, min: fp(0)}
	// sTheta is a scan angle, 0 <= theta < 90.
	sTheta = &shape{kind: kNumber, min: fp(0), max: fp(90), exMax: true}
	// sLine is a line of text: no line break.
	sLine  = &shape{kind: kText, pattern: `^[^\r\n]*\S[^\r\n]*$`}
	sLines = &shape{kind: kAnyOf, alts: []*shape{sLine, {kind: kList, items: sLine, minItems: 1}}}
)

func enumOf(choices ...string) *shape { return &shape{kind: kEnum, enum: choices} }
func mapOf(fields []field, extra ...kv) *shape {
	return &shape{kind: kMap, fields: fields, extra: extra}
}
func listOf(items *shape, minItems int) *shape {
	return &shape{kind: kList, items: items, minItems: minItems}
}
func anyOf(alts ...*shape) *shape { return &shape{kind: kAnyOf, alts: alts} }

// transmissionParameterPattern matches S_ij with i != j (1 to 9).
func transmissionParameterPattern() string {
	var alts []string
	for i := 1; i <= 9; i++ {
		var js []string
		for j := 1; j <= 9; j++ {
			if j != i {
				js = append(js, fmt.Sprint(j))
			}
		}
		alts = append(alts, fmt.Sprintf("%d[%s]", i, strings.Join(js, "")))
	}
	return "^S(?:" + strings.Join(alts, "|") + ")$"
}

// sColumn is a CSV column: its header text or its 1-based number.
var sColumn = anyOf(&shape{kind: kString}, &shape{kind: kInteger, min: fp(1)})

// csvFields are the keys of a csv: mapping (contract, "Data files").
// uncertainty_column is an extension for a reference's table_file.
var csvFields = []field{
	{"delimiter", false, `"," ";" or "tab" (default: detected from the header line)`, enumOf(",", ";", "tab")},
	{"decimal", false, `"." or "," (default ".")`, enumOf(".", ",")},
	{"comment", false, `the prefix of comment lines (default "#" and "!")`, sText},
	{"skip_lines", false, "the number of lines before the header row, >= 0 (default 0)", &shape{kind: kInteger, min: fp(0)}},
	{"units_row", false, "true when a row of units follows the header (default false)", sBool},
	{"frequency_column", false, "the frequency column: its header text, or its number counted from 1 (default 1)", sColumn},
	{"frequency_unit", false, "hz, khz, mhz or ghz, when the header does not say", enumOf("hz", "khz", "mhz", "ghz")},
	{"value_column", false, "the value column: its header text, or its number counted from 1 (default 2)", sColumn},
	{"uncertainty_column", false, "a reference table's expanded uncertainty column: its header text, or its number counted from 1 (default 3)", sColumn},
}

var sCSVMapping = mapOf(csvFields)

// sCSV is a csv: value: a mapping, or the name of one of the station's
// csv_formats.
var sCSV = anyOf(sIdent, sCSVMapping)

const csvExpect = "a csv: mapping {delimiter, decimal, comment, skip_lines, units_row, frequency_column, frequency_unit, value_column}, or the name of one of the station's csv_formats"

// fileRefFields are the keys of a data file given with its csv: mapping.
var fileRefFields = []field{
	{"file", true, "the file, relative to this folder", sText},
	{"csv", false, csvExpect, sCSV},
}

// sFileRef is a data file: its name, or {file, csv}.
var sFileRef = anyOf(sText, mapOf(fileRefFields))

// noiseQuantities are the noise quantities a beam's noise trace may hold.
var noiseQuantities = []string{"noise-density-dbm-hz", "noise-relative-kt0-db", "system-noise-figure-db"}

var noiseFields = []field{
	{"file", true, "a trace CSV relative to this folder", sText},
	{"quantity", true, "noise-density-dbm-hz, noise-relative-kt0-db or system-noise-figure-db", enumOf(noiseQuantities...)},
	{"noise_bandwidth_hz", false, "the receiver's noise bandwidth in Hz, above 0", sPositive},
	{"integration_s", false, "the integration time per point in seconds, above 0", sPositive},
	{"csv", false, csvExpect, sCSV},
}

var sNoise = anyOf(mapOf(noiseFields), listOf(mapOf(noiseFields), 1))

// Sane ambient range of a test range in degrees Celsius: anything outside
// is a typing mistake (a kelvin value, a missing minus sign, a stray digit).
const (
	minAmbientC = -40
	maxAmbientC = 70
)

var customerFields = []field{
	{"name", true, "the customer's name", sText},
	{"address", false, "the customer's address, a list of lines", sLines},
	{"order", false, "the customer's order or contract reference", sText},
}

var rangeReferenceFields = []field{
	{"pre", true, "the reference-antenna measurement before the unit, a Touchstone or CSV file (or {file, csv})", sFileRef},
	{"post", false, "the reference-antenna measurement after the unit (or {file, csv})", sFileRef},
	{"parameter", false, "the transmission parameter, S21 (default) or another Sij", &shape{kind: kText, pattern: transmissionParameterPattern()}},
}

// beamFields are the keys of a run's beam. Only id is needed in the file:
// a beam of the spec's beam_plan inherits the rest; a beam of the run
// alone must have theta_deg, transmission and noise (checked when the run
// is resolved against its spec).
var beamFields = []field{
	{"id", true, "the beam's identifier, e.g. b00", sIdent},
	{"theta_deg", false, "the scan angle from boresight in degrees, 0 <= theta < 90", sTheta},
	{"phi_deg", false, "the scan plane in degrees", sNumber},
	{"polarization", false, "free text", sText},
	{"transmission", false, "a Touchstone or CSV file relative to this folder (or {file, csv})", sFileRef},
	{"noise", false, "a mapping {file, quantity, noise_bandwidth_hz, integration_s, csv} or a list of them", sNoise},
	{"passive_gain_dbi", false, "the passive gain in dBi", sNumber},
}

var runFields = []field{
	{"schema", true, "schema: 1", sSchema},
	{"serial", true, "the unit's serial number", sIdent},
	{"product", true, "the product code of a spec in specs/", sIdent},
	{"station", true, "the id of a station in stations/", sIdent},
	{"reference", true, "the id of a reference antenna in references/", sIdent},
	{"started", true, "the start time in RFC 3339, e.g. 2026-11-03T09:15:00Z", sInstant},
	{"operator", true, "the operator's initials or name", sText},
	{"ambient_c", true, fmt.Sprintf("the ambient temperature in degrees Celsius, %d to %d", minAmbientC, maxAmbientC), &shape{kind: kNumber, min: fp(minAmbientC), max: fp(maxAmbientC)}},
	{"firmware", false, "free text", sText},
	{"range_reference", true, "a mapping {pre: FILE, post: FILE, parameter: S21}", mapOf(rangeReferenceFields)},
	{"beams", false, "a list of beams (id, theta_deg, phi_deg, transmission, noise); without it, the beams of the spec's beam_plan", &shape{kind: kList, items: mapOf(beamFields), minItems: 1, maxItems: MaxRunBeams}},
	{"elements", false, "an elements CSV file relative to this folder", sText},
	{"notes", false, "a Markdown file relative to this folder", sText},
	{"customer", false, "who this run is for, when not the spec's customer: {name, address: [lines], order}", mapOf(customerFields)},
}

// Distributions a station's uncertainty term may declare.
var distributions = []string{"normal", "rectangular", "u-shaped", "triangular"}

var termFields = []field{
	{"name", true, "the term's name", sText},
	{"applies_to", true, "a list of gain and/or gt", &shape{kind: kList, items: enumOf("gain", "gt"), minItems: 1, unique: true}},
	{"value_db", true, "the term's value in dB, >= 0 (half-width, or expanded at coverage_k for normal)", sNonNegative},
	{"distribution", true, "normal, rectangular, u-shaped or triangular", enumOf(distributions...)},
	{"coverage_k", false, "the coverage factor of a normal term's value_db, above 0 (normal terms only)", sPositive},
}

// termRule: coverage_k is required for a normal term and refused for the
// others (parseTerm).
var termRule = []kv{{"if", obj(kv{"properties", obj(kv{"distribution", obj(kv{"const", "normal"})})}, kv{"required", []string{"distribution"}})},
	{"then", obj(kv{"required", []string{"coverage_k"}})},
	{"else", obj(kv{"not", obj(kv{"required", []string{"coverage_k"}})})}}

var stationFields = []field{
	{"schema", true, "schema: 1", sSchema},
	{"id", true, "the station's identifier, as runs name it", sIdent},
	{"description", false, "free text", sText},
	{"receiver_match", true, "the receiver port's residual |Gamma|, 0 <= value < 1", &shape{kind: kNumber, min: fp(0), max: fp(1), exMax: true}},
	{"drift_tolerance_db", true, "the allowed |pre - post| range-loss change in dB, above 0", sPositive},
	{"method_tolerance_db", true, "the allowed difference between the two noise forms in dB, above 0", sPositive},
	{"uncertainty", true, "a list of uncertainty terms (name, applies_to, value_db, distribution, coverage_k)", listOf(mapOf(termFields, termRule...), 0)},
	{"csv_formats", false, "named csv: mappings of the files this station's instruments write, e.g. {analyser-export: {delimiter: \";\", decimal: \",\"}}", &shape{kind: kDict, values: sCSVMapping}},
	{"check_units", false, "serial numbers of the check units (golden units) measured on this range, e.g. [KP16-GOLD-01]", listOf(sIdent, 1)},
}

var referenceFields = []field{
	{"schema", true, "schema: 1", sSchema},
	{"id", true, "the reference antenna's identifier, as runs name it", sIdent},
	{"description", false, "free text", sText},
	{"gain_kind", true, "realized or gain", enumOf("realized", "gain")},
	{"calibrated", true, "the calibration date, YYYY-MM-DD", sDate},
	{"due", true, "the date the calibration is due, YYYY-MM-DD, not before calibrated", sDate},
	{"certificate", true, "the calibration certificate's number", sText},
	{"coverage_k", true, "the coverage factor of the table's expanded uncertainties, above 0", sPositive},
	{"table", false, "a list of [frequency_ghz, gain_dbi, expanded_uncertainty_db] rows, frequencies strictly increasing", listOf(&shape{kind: kTuple, tuple: []*shape{sPositive, sNumber, sNonNegative}}, 1)},
	{"table_file", false, "a CSV file (frequency_ghz,gain_dbi,uncertainty_db) relative to this file's folder", sText},
	{"csv", false, "a csv: mapping of table_file, when it is not in the contract's form", sCSVMapping},
}

// referenceRule: table or table_file, not both; csv only with table_file.
var referenceRule = []kv{
	{"oneOf", []any{obj(kv{"required", []string{"table"}}), obj(kv{"required", []string{"table_file"}})}},
	{"dependentRequired", obj(kv{"csv", []string{"table_file"}})},
}

var selectorFields = []field{
	{"ids", false, "a list of beam ids", &shape{kind: kList, items: sText, minItems: 1, unique: true}},
	{"min_theta_deg", false, "a scan angle in degrees, 0 <= theta < 90", sTheta},
	{"max_theta_deg", false, "a scan angle in degrees, 0 <= theta < 90", sTheta},
}

// selectorRule: ids, or a theta range, not both and not neither.
var selectorRule = []kv{{"oneOf", []any{
	obj(kv{"required", []string{"ids"}}),
	obj(kv{"anyOf", []any{obj(kv{"required", []string{"min_theta_deg"}}), obj(kv{"required", []string{"max_theta_deg"}})}}),
}}}

var limitFields = []field{
	{"name", true, "the limit's name", sText},
	{"quantity", true, "gt (dB/K) or gain (dBi)", enumOf("gt", "gain")},
	{"beams", true, "{ids: [..]} or {min_theta_deg: .., max_theta_deg: ..}", mapOf(selectorFields, selectorRule...)},
	{"band_ghz", true, "[low, high] in GHz with 0 < low < high", &shape{kind: kTuple, tuple: []*shape{sPositive, sPositive}}},
	{"statistic", true, "min or mean", enumOf("min", "mean")},
	{"limit", true, "a list of [frequency_ghz, value] points, frequencies strictly increasing", listOf(&shape{kind: kTuple, tuple: []*shape{sPositive, sNumber}}, 1)},
	{"scan_exponent", false, "the exponent n of limit(f) + 10*n*log10(cos theta), >= 0", sNonNegative},
}

// planBeamFields are the keys of a beam of a spec's beam_plan: a run's
// beam entry of that id inherits them.
var planBeamFields = []field{
	{"id", true, "the beam's identifier, e.g. b00", sIdent},
	{"theta_deg", true, "the scan angle from boresight in degrees, 0 <= theta < 90", sTheta},
	{"phi_deg", false, "the scan plane in degrees", sNumber},
	{"polarization", false, "free text", sText},
	{"transmission", false, "the beam's transmission file in the run folder, when not the plan's files (or {file, csv})", sFileRef},
	{"noise", false, "the beam's noise entries, when not the plan's files", sNoise},
	{"passive_gain_dbi", false, "the passive gain in dBi", sNumber},
}

var planFilesFields = []field{
	{"transmission", false, `a glob in the run folder with {beam} for the beam id, e.g. "{beam}.*": it must match exactly one file (or {file, csv})`, sFileRef},
	{"noise", false, "noise entries with {beam} in file; each whose file is in the run folder is used", sNoise},
}

var beamPlanFields = []field{
	{"files", false, "where a run finds each beam's files: {transmission: GLOB, noise: [entries]}", mapOf(planFilesFields)},
	{"beams", true, "the beams every unit is measured in (id, theta_deg, phi_deg, polarization)", &shape{kind: kList, items: mapOf(planBeamFields), minItems: 1, maxItems: MaxRunBeams}},
}

var specFields = []field{
	{"schema", true, "schema: 1", sSchema},
	{"product", true, "the product code runs refer to", sIdent},
	{"title", false, "free text", sText},
	{"decision_rule", true, "simple or guarded", enumOf("simple", "guarded")},
	{"limits", true, "a list of limits (name, quantity, beams, band_ghz, statistic, limit)", listOf(mapOf(limitFields), 1)},
	{"operating_antenna_k", false, "the antenna temperature in K the projected G/T is stated at, above 0", sPositive},
	{"element_phase_rms_tolerance_deg", false, "the allowed rms of the residual element phase in degrees, above 0", sPositive},
	{"customer", false, "who the units are tested for: {name, address: [lines], order}", mapOf(customerFields)},
	{"beam_plan", false, "the beams every unit of the product is measured in, and where a run finds their files", mapOf(beamPlanFields)},
}

var labFields = []field{
	{"schema", true, "schema: 1", sSchema},
	{"name", true, "the laboratory's name", sText},
	{"address", true, "the laboratory's address, a list of lines", sLines},
	{"contact", false, "an address or telephone number for questions about reports", sText},
	{"accreditation", false, "free text: the accreditation body and number", sText},
	{"report_prefix", true, "the start of every report number, e.g. EATL-GT (1 to 64 of A-Z a-z 0-9 . _ -)", sIdent},
}

// Verdicts an approval may name: those of an issuable unit.
var approvableVerdicts = []string{"pass", "conditional-pass", "conditional-fail", "fail"}

var approvalFields = []field{
	{"schema", true, "schema: 1", sSchema},
	{"serial", true, "the unit's serial number (the folder's name)", sIdent},
	{"inputs_sha256", true, "the unit's inputs_sha256, 64 lower-case hex digits, as its report and manifest show it", &shape{kind: kText, pattern: "^[0-9a-f]{64}$"}},
	{"verdict", true, "the verdict approved: pass, conditional-pass, conditional-fail or fail", enumOf(approvableVerdicts...)},
	{"approved_by", true, "the name of the person who approves", sLine},
	{"role", false, "the person's role, e.g. Quality engineer", sText},
	{"date", true, "when it was approved, RFC 3339, e.g. 2026-11-04T10:00:00Z", sInstant},
	{"comment", false, "free text", sText},
}

// field returns the field of key in fields (the reader's messages use its
// expect).
func fieldOf(fields []field, key string) field {
	for _, f := range fields {
		if f.key == key {
			return f
		}
	}
	return field{key: key}
}
