package ingest

import (
	"fmt"
	"strings"
	"unicode/utf8"
)

// MaxIdentifierLength is the longest identifier the contract allows.
const MaxIdentifierLength = 64

// identExpect is what every identifier message says is expected.
const identExpect = "expected 1 to 64 of A-Z a-z 0-9 . _ - starting with a letter or digit"

// reservedNames are the device names that Windows refuses as a file or
// folder name, whatever the case and whatever the extension ("con.txt" is
// the console too). Identifiers become folder and file names of the site,
// so a serial "AUX" would make a site that cannot be copied there.
var reservedNames = map[string]bool{"CON": true, "PRN": true, "AUX": true, "NUL": true}

func init() {
	for d := '1'; d <= '9'; d++ {
		reservedNames["COM"+string(d)] = true
		reservedNames["LPT"+string(d)] = true
	}
}

// CheckIdentifier says whether s is a portable name, as the contract wants
// every identifier (serial, product, station id, reference id, beam id) to
// be: 1 to 64 characters of A-Z a-z 0-9 . _ -, starting with a letter or
// digit, not ending in '.', and not a reserved device name (CON, PRN, AUX,
// NUL, COM1-9, LPT1-9 in any case, with or without an extension). The error
// quotes s with %q, so that a control or bidirectional character shows; the
// caller puts the kind of identifier and the file and line in front.
//
// Case is not looked at here: that QDA-1 and qda-1 are one unit is a
// matter of the archive as a whole (see Open).
func CheckIdentifier(s string) error {
	if s == "" {
		return fmt.Errorf("is empty; %s", identExpect)
	}
	// The character set first: it is the rule that keeps a name from
	// leaving its folder ("../x", "a/b", "a\b"), and the message names the
	// character, counted from 1.
	n := 0
	for i, r := range s {
		n++
		if !identChar(r) {
			// Not UTF-8 shows as the byte itself (size 1).
			_, size := utf8.DecodeRuneInString(s[i:])
			return fmt.Errorf("%q has %q at character %d; %s", s, s[i:i+size], n, identExpect)
		}
	}
	switch {
	case n > MaxIdentifierLength:
		return fmt.Errorf("%q has %d characters; %s", s, n, identExpect)
	case !identAlnum(rune(s[0])):
		return fmt.Errorf("%q starts with %q; %s", s, s[:1], identExpect)
	case strings.HasSuffix(s, "."):
		// Windows drops a trailing dot: "QDA-1." would be the folder QDA-1.
		return fmt.Errorf("%q ends with \".\"; %s, not ending in \".\"", s, identExpect)
	}
	base, _, _ := strings.Cut(s, ".")
	if reservedNames[strings.ToUpper(base)] {
		return fmt.Errorf("%q is the reserved device name %s (with or without an extension, in any case); expected a name that is not CON, PRN, AUX, NUL, COM1-9 or LPT1-9", s, strings.ToUpper(base))
	}
	return nil
}

func identAlnum(r rune) bool {
	return (r >= 'A' && r <= 'Z') || (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9')
}

func identChar(r rune) bool {
	return identAlnum(r) || r == '.' || r == '_' || r == '-'
}
