// Package render turns reduced results into bytes: HTML pages, workbooks,
// JSON and CSV. It does no physics and reads no inputs: what it shows is
// what reduce returned. Output is deterministic: the same results give the
// same bytes.
package render

// Version is the tool's version, written into every output.
const Version = "0.1.0"
