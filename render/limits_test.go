package render

import (
	"bytes"
	"io"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/xuri/excelize/v2"

	"gtpack.example/gtpack/ingest"
	"gtpack.example/gtpack/reduce"
)

// The sheet limits of ingest are the format's, as excelize states them
// too (excelize.TotalRows, TotalCellChars, from the same published
// specification).
func TestSheetLimitsAgreeWithExcelize(t *testing.T) {
	if ingest.MaxSheetRows != excelize.TotalRows || ingest.MaxCellChars != excelize.TotalCellChars {
		t.Errorf("ingest: %d rows, %d characters; excelize: %d, %d", ingest.MaxSheetRows, ingest.MaxCellChars, excelize.TotalRows, excelize.TotalCellChars)
	}
}

// A table that would end past the last row of a sheet is an error before
// anything is written; one that ends on the last row is written, with its
// dimension on that row.
func TestWriteBulkSheetRowLimit(t *testing.T) {
	sheet := []byte(`<worksheet><dimension ref="A1"/><sheetData/></worksheet>`)
	col := bulkColumn{values: []float64{1}}
	atLimit := &bulkSheet{first: 2, rows: nil, cols: []bulkColumn{col}, n: ingest.MaxSheetRows - 1, width: 1}
	var w countingWriter
	if err := writeBulkSheet(&w, sheet, atLimit); err != nil {
		t.Fatalf("a table ending on row %d: %v", ingest.MaxSheetRows, err)
	}
	if !bytes.Contains(w.head, []byte(`<dimension ref="A1:A1048576"/>`)) {
		t.Errorf("dimension: %s", w.head)
	}
	for _, past := range []*bulkSheet{
		{first: 2, cols: []bulkColumn{col}, n: ingest.MaxSheetRows, width: 1},
		{first: 3, rows: [][]bulkCell{{numCell(1, 0)}}, cols: []bulkColumn{col}, n: ingest.MaxSheetRows - 2, width: 1},
		{first: 1, rows: [][]bulkCell{make([]bulkCell, excelize.MaxColumns+1)}, width: 1},
	} {
		var out bytes.Buffer
		err := writeBulkSheet(&out, sheet, past)
		if err == nil || out.Len() != 0 {
			t.Errorf("a table past the sheet (first %d, %d rows, %d numeric): err %v, %d bytes written", past.first, len(past.rows), past.n, err, out.Len())
		}
	}
	if err := writeBulkSheet(io.Discard, sheet, &bulkSheet{first: 1, rows: [][]bulkCell{make([]bulkCell, excelize.MaxColumns+1)}}); err == nil ||
		!strings.Contains(err.Error(), "16385 columns is wider than the 16384 columns of a sheet") {
		t.Errorf("too wide: %v", err)
	}
}

// countingWriter keeps the first bytes written and counts the rest.
type countingWriter struct {
	head []byte
	n    int
}

func (w *countingWriter) Write(p []byte) (int, error) {
	if len(w.head) < 4096 {
		w.head = append(w.head, p[:min(len(p), 4096-len(w.head))]...)
	}
	w.n += len(p)
	return len(p), nil
}

// cellText keeps a text that fits a cell, and cuts a longer one with a
// note that says how many characters are not shown, within the limit in
// UTF-16 units, never in the middle of a character.
func TestCellText(t *testing.T) {
	fits := strings.Repeat("a", ingest.MaxCellChars)
	if got := cellText(fits); got != fits {
		t.Error("a text of exactly the limit was changed")
	}
	// Two bytes a character in UTF-8, one unit in UTF-16: fits.
	if s := strings.Repeat("é", ingest.MaxCellChars); cellText(s) != s {
		t.Error("a text of the limit in UTF-16 units but longer in bytes was changed")
	}
	for _, c := range []struct {
		name string
		text string
	}{
		{"ascii", strings.Repeat("abcdefghij", 4000)},
		{"one past", strings.Repeat("a", ingest.MaxCellChars+1)},
		{"astral", strings.Repeat("\U0001F600x", 20000)}, // three UTF-16 units a pair
	} {
		got := cellText(c.text)
		if n := utf16Len(got); n > ingest.MaxCellChars {
			t.Errorf("%s: %d UTF-16 units, more than %d", c.name, n, ingest.MaxCellChars)
		}
		kept, note, ok := strings.Cut(got, " … [cut: ")
		if !ok || !strings.HasPrefix(c.text, kept) || !utf8.ValidString(kept) {
			t.Fatalf("%s: %q... does not start with the text and end with the note", c.name, got[:40])
		}
		wantNote := strconv.Itoa(utf8.RuneCountInString(c.text)-utf8.RuneCountInString(kept)) + " characters not shown; see the report]"
		if note != wantNote {
			t.Errorf("%s: note %q, want %q", c.name, note, wantNote)
		}
		// The note is made room for at the widest count it could need.
		if utf16Len(got) < ingest.MaxCellChars-len(strconv.Itoa(len(c.text))) {
			t.Errorf("%s: only %d units kept of %d", c.name, utf16Len(got), ingest.MaxCellChars)
		}
	}
}

// A text past a cell's limit reads back from the workbook, with openpyxl,
// as its beginning and the note, in both the unit workbook (its bulk rows)
// and the fleet workbook (excelize's cells, which would cut it without a
// word).
func TestWorkbookCutTextReadBack(t *testing.T) {
	long := "LONG " + strings.Repeat("range drift beyond the tolerance; ", 1200) // 40,805 characters
	want := cellText(long)
	if want == long {
		t.Fatal("the text fits a cell: the test needs a longer one")
	}
	u := fixtureUnit(t, 2, 11)
	u.Flags = append(u.Flags, reduce.Flag{Kind: "drift", Message: long})
	book, err := UnitWorkbook(u)
	if err != nil {
		t.Fatal(err)
	}
	flags := readWorkbook(t, book).sheet(t, "Flags")
	found := false
	for r := range flags.Rows {
		if v, ok := flags.cell(r+1, 5).(string); ok && strings.HasPrefix(v, "LONG ") {
			found = true
			if v != want || !strings.HasSuffix(v, "[cut: 8090 characters not shown; see the report]") {
				t.Errorf("unit workbook: cell of %d characters ending %q", utf8.RuneCountInString(v), v[max(0, len(v)-60):])
			}
		}
	}
	if !found {
		t.Error("unit workbook: the long flag is not on the Flags sheet")
	}

	fl := fixtureFleet(t)
	fl.Products[0].Limits[0].Name = long
	book, err = FleetWorkbook(fl)
	if err != nil {
		t.Fatal(err)
	}
	if v, _ := readWorkbook(t, book).sheet(t, "Limits").cell(2, 2).(string); v != want {
		t.Errorf("fleet workbook: Limits B2 holds %d characters, want the cut text of %d", len(v), len(want))
	}
}
