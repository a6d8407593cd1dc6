// Package render turns reduced results into bytes: HTML pages, workbooks,
// JSON and CSV. It does no physics and reads no inputs: what it shows is
// what reduce returned. Output is deterministic: the same results give the
// same bytes.
package render

// Version is the tool's version, written into every output. A build redoes
// every unit whose state records another version, so it goes up whenever
// what a unit's files hold changes (0.2.0: result.json, fleet.json and
// manifest.json schema 2; 0.2.1: the same contents in other bytes, the
// unit workbook made on a kept skeleton, JSON lists without a space
// after each comma, the report's U band drawn where it can be seen, and
// the workbook's frequency charts as XY charts; 0.3.0: the safe site
// (exit code 3, stale units, fleet.json's optional stale, no_report and
// notices) and the style rules for them in every page; 0.4.0: content
// records, unit manifests, SHA256SUMS, issued reports; 0.5.0: MA and DB
// Touchstone pairs converted by math.Sincos and math.Pow, which moves the
// last digits of full-precision values in results.csv and fleet.xlsx).
const Version = "0.5.0"
