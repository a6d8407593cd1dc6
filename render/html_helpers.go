package render

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"encoding/json"
	"fmt"
	"html/template"
	"math"
	"strconv"
	"strings"
	"sync"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/renderer"
	"github.com/yuin/goldmark/renderer/html"
	"github.com/yuin/goldmark/util"

	"gtpack.example/gtpack/reduce"
	"gtpack.example/gtpack/templates"
)

// The HTML pages are html/template documents that inline everything they
// need (style, our own script, the chart library and the data), so that a
// page copied alone to a machine without a network still works. Every
// value from the results reaches the page through html/template's
// contextual escaping; the only values marked safe are the ones built here
// (chart options marshalled as JSON, the CSV data URL, Markdown rendered
// with raw HTML off, the page's policy).
//
// Every page carries a Content-Security-Policy (pagePolicy) that forbids
// every load from outside the page: a page opened from a site on a file
// share or a web server cannot fetch anything, even where a value from
// the results made its way into an address.

var (
	pagesOnce sync.Once
	pages     *template.Template
	pagesErr  error
	assets    struct {
		css, js, lib []byte
		policy       string
	}
)

// loadPages parses the page templates and reads the inlined assets once.
func loadPages() (*template.Template, error) {
	pagesOnce.Do(func() {
		t := template.New("pages").Funcs(template.FuncMap{
			"db":      fmtDB,
			"db2":     func(v float64) string { return fmtFixed(v, 2) },
			"signed":  fmtSigned,
			"ghz":     fmtGHz,
			"fixed":   fmtFixed,
			"verdict": verdictLabel,
			"vclass":  verdictClass,
			"pct":     func(v float64) string { return fmtFixed(100*v, 1) + " %" },
			"inc":     func(i int) int { return i + 1 },
			"noise":   noiseLabel,
			"time":    timeText,
			"date":    dateOf,
			"count":   func(m map[reduce.Verdict]int, v string) int { return m[reduce.Verdict(v)] },
		})
		t, err := t.ParseFS(templates.FS, "*.tmpl")
		if err != nil {
			pagesErr = fmt.Errorf("render: page templates: %w", err)
			return
		}
		for _, a := range []struct {
			name string
			dst  *[]byte
		}{{"page.css", &assets.css}, {"page.js", &assets.js}, {"vendor/echarts.custom.min.js", &assets.lib}} {
			b, err := templates.FS.ReadFile(a.name)
			if err != nil {
				pagesErr = fmt.Errorf("render: page asset: %w", err)
				return
			}
			*a.dst = b
		}
		assets.policy = pagePolicy(assets.lib, assets.js)
		pages = t
	})
	return pages, pagesErr
}

// pageAssets is what every page inlines, and the page's policy as the
// attribute content="..." of its <meta http-equiv="Content-Security-Policy">.
type pageAssets struct {
	CSS    template.CSS
	JS     template.JS
	Lib    template.JS
	Policy template.HTMLAttr
}

func inlineAssets() pageAssets {
	return pageAssets{CSS: template.CSS(assets.css), JS: template.JS(assets.js), Lib: template.JS(assets.lib),
		Policy: template.HTMLAttr(`content="` + assets.policy + `"`)}
}

// pagePolicy is the Content-Security-Policy of every page: nothing from
// outside the page, by any means (default-src 'none', and the directives
// that do not fall back to it: form-action, base-uri). What the page does
// itself stays allowed: its inline scripts, named by their SHA-256 so that
// no other script can run (scripts are their texts exactly as the page
// carries them); inline styles (the style sheet, ECharts' tooltips and the
// charts' heights); images and fonts from data: URLs.
// The CSV download is a data: URL too: a download is not a load the policy
// governs. The result has no double quote, so it sits in an attribute as
// it is.
func pagePolicy(scripts ...[]byte) string {
	var b strings.Builder
	b.WriteString("default-src 'none'; script-src")
	for _, s := range scripts {
		sum := sha256.Sum256(s)
		b.WriteString(" 'sha256-")
		b.WriteString(base64.StdEncoding.EncodeToString(sum[:]))
		b.WriteString("'")
	}
	b.WriteString("; style-src 'unsafe-inline'; img-src data:; font-src data:; connect-src 'none'; form-action 'none'; base-uri 'none'")
	return b.String()
}

func execute(name string, data any) ([]byte, error) {
	return executeSized(name, data, 0)
}

// executeSized is execute with room for size bytes from the start, so that
// a page of a megabyte is not copied over and over as its buffer grows.
func executeSized(name string, data any, size int) ([]byte, error) {
	t, err := loadPages()
	if err != nil {
		return nil, err
	}
	buf := bytes.NewBuffer(make([]byte, 0, size))
	if err := t.ExecuteTemplate(buf, name, data); err != nil {
		return nil, fmt.Errorf("render: %s: %w", name, err)
	}
	return buf.Bytes(), nil
}

// Number formats. Tables print dB values to 0.01 dB (the uncertainties are
// tenths of a dB), frequencies in GHz to 1 kHz; a NaN or infinity prints as
// a dash rather than as Go's spelling.

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func fmtFixed(v float64, decimals int) string {
	if !finite(v) {
		return "–"
	}
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" { // no "-0.00"
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

func fmtDB(v float64) string { return fmtFixed(v, 2) }

func fmtSigned(v float64) string {
	s := fmtFixed(v, 2)
	if finite(v) && !strings.HasPrefix(s, "-") && strings.Trim(s, "0.") != "" {
		return "+" + s
	}
	return s
}

func fmtGHz(hz float64) string {
	if !finite(hz) {
		return "–"
	}
	// 0.1 MHz: finer than any grid step the reports see, short enough to read.
	return strconv.FormatFloat(math.Round(hz/1e5)/1e4, 'f', -1, 64)
}

// compact is a number written to a fixed number of decimals in chart JSON
// (shortest form of the rounded value); NaN and infinities become null.
type compact struct {
	v        float64
	decimals int
}

func (c compact) MarshalJSON() ([]byte, error) {
	if !finite(c.v) {
		return []byte("null"), nil
	}
	p := math.Pow(10, float64(c.decimals))
	r := math.Round(c.v*p) / p
	if r == 0 {
		r = 0 // no -0
	}
	return []byte(strconv.FormatFloat(r, 'f', -1, 64)), nil
}

func r3(v float64) compact { return compact{v, 3} }

func ghz(hz float64) compact { return compact{hz / 1e9, 6} }

// csvNumber writes a dB value to the given decimals (3: 0.001 dB), the
// printed precision of the per-frequency CSV: far below any uncertainty
// here, and it keeps the embedded file small.
func csvNumber(v float64, decimals int) string {
	if !finite(v) {
		return ""
	}
	return string(appendDecimal(nil, v, decimals))
}

func verdictLabel(v reduce.Verdict) string {
	switch v {
	case reduce.VerdictPass:
		return "PASS"
	case reduce.VerdictConditionalPass:
		return "CONDITIONAL PASS"
	case reduce.VerdictConditionalFail:
		return "CONDITIONAL FAIL"
	case reduce.VerdictFail:
		return "FAIL"
	case reduce.VerdictIncomplete:
		return "INCOMPLETE"
	case "":
		return "–"
	}
	return strings.ToUpper(string(v))
}

// verdictClass is the CSS class of a verdict; unknown verdicts get the
// neutral class so a stray value cannot pick a style.
func verdictClass(v reduce.Verdict) string {
	switch v {
	case reduce.VerdictPass:
		return "v-pass"
	case reduce.VerdictConditionalPass:
		return "v-cpass"
	case reduce.VerdictConditionalFail:
		return "v-cfail"
	case reduce.VerdictFail:
		return "v-fail"
	}
	return "v-none"
}

type countRow struct {
	Verdict reduce.Verdict
	N       int
}

// markdown renders notes with goldmark. Its defaults leave raw HTML out
// (replaced by a comment), so nothing in the notes can run or carry a
// style. notesRenderer adds that the notes load and link nothing outside
// the page.
func markdown(src string) (template.HTML, error) {
	var buf bytes.Buffer
	if err := notesMarkdown.Convert([]byte(src), &buf); err != nil {
		return "", fmt.Errorf("render: notes: %w", err)
	}
	return template.HTML(buf.String()), nil
}

var notesMarkdown = goldmark.New(goldmark.WithRendererOptions(
	// A lower number registers later and wins over goldmark's own
	// renderer (priority 1000) for the kinds it names.
	renderer.WithNodeRenderers(util.Prioritized(notesRenderer{}, 100)),
))

// notesRenderer renders the notes' images and links so that a report
// opened anywhere fetches nothing, not even on a click: an image is drawn
// only from a data: URL of a kind goldmark calls safe (PNG, GIF, JPEG,
// WebP), which the page's policy lets load too; any other image is its alt
// text and its address as text, with a note. A link stays a link only
// within the page (#...); any other link, autolinks included, is its text
// and its address as text (titles are left out). The address is shown as
// written, so that a reader can still see and copy it.
type notesRenderer struct{}

func (notesRenderer) RegisterFuncs(r renderer.NodeRendererFuncRegisterer) {
	r.Register(ast.KindImage, renderNotesImage)
	r.Register(ast.KindLink, renderNotesLink)
	r.Register(ast.KindAutoLink, renderNotesAutoLink)
}

func renderNotesImage(w util.BufWriter, source []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	n := node.(*ast.Image)
	alt := plainText(source, n)
	dest := util.URLEscape(n.Destination, true)
	if hasPrefixFold(dest, "data:") && !html.IsDangerousURL(dest) {
		_, _ = w.WriteString(`<img src="`)
		_, _ = w.Write(util.EscapeHTML(dest))
		_, _ = w.WriteString(`" alt="`)
		_, _ = w.Write(util.EscapeHTML(alt))
		_, _ = w.WriteString(`">`)
		return ast.WalkSkipChildren, nil
	}
	_, _ = w.WriteString(`<span class="remote-image">`)
	if len(alt) > 0 {
		_, _ = w.Write(util.EscapeHTML(alt))
		_ = w.WriteByte(' ')
	}
	writeAddress(w, n.Destination)
	if hasPrefixFold(dest, "data:") {
		_, _ = w.WriteString(` <span class="hint">(image not shown: only PNG, GIF, JPEG and WebP data are)</span></span>`)
	} else {
		_, _ = w.WriteString(` <span class="hint">(remote image not loaded)</span></span>`)
	}
	return ast.WalkSkipChildren, nil
}

func renderNotesLink(w util.BufWriter, source []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	n := node.(*ast.Link)
	inPage := len(n.Destination) > 0 && n.Destination[0] == '#'
	switch {
	case inPage && entering:
		_, _ = w.WriteString(`<a href="`)
		_, _ = w.Write(util.EscapeHTML(util.URLEscape(n.Destination, true)))
		_, _ = w.WriteString(`">`)
	case inPage:
		_, _ = w.WriteString("</a>")
	case entering:
		_, _ = w.WriteString(`<span class="remote-link">`)
	default:
		if len(n.Destination) > 0 {
			_ = w.WriteByte(' ')
			writeAddress(w, n.Destination)
			_, _ = w.WriteString(` <span class="hint">(link not followed)</span>`)
		}
		_, _ = w.WriteString("</span>")
	}
	return ast.WalkContinue, nil
}

func renderNotesAutoLink(w util.BufWriter, source []byte, node ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	n := node.(*ast.AutoLink)
	_, _ = w.WriteString(`<span class="remote-link">`)
	writeAddress(w, n.Label(source))
	_, _ = w.WriteString(`</span>`)
	return ast.WalkSkipChildren, nil
}

// writeAddress writes an address of the notes as a code span.
func writeAddress(w util.BufWriter, addr []byte) {
	_, _ = w.WriteString("<code>")
	_, _ = w.Write(util.EscapeHTML(addr))
	_, _ = w.WriteString("</code>")
}

// plainText is the text of a node's inlines without their markup (an
// image's alt text).
func plainText(source []byte, n ast.Node) []byte {
	var b []byte
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		switch c := c.(type) {
		case *ast.Text:
			b = append(b, c.Value(source)...)
			if c.SoftLineBreak() || c.HardLineBreak() {
				b = append(b, ' ')
			}
		case *ast.String:
			b = append(b, c.Value...)
		default:
			b = append(b, plainText(source, c)...)
		}
	}
	return b
}

func hasPrefixFold(b []byte, prefix string) bool {
	return len(b) >= len(prefix) && strings.EqualFold(string(b[:len(prefix)]), prefix)
}

// dataURLAttr is the attribute href="data:MIME,..." linking to data.
// Only bytes outside a small safe set are percent-encoded, so the link
// costs little more than the file itself; '"', '<', '>' and '&' are among
// the encoded ones, so the attribute is safe in HTML as it stands and goes
// into the page without another escaping pass (html/template's URL and
// attribute escapers took as long as making the CSV).
func dataURLAttr(mime string, data []byte) template.HTMLAttr {
	const hex = "0123456789ABCDEF"
	b := make([]byte, 0, len(`href="data:,"`)+len(mime)+len(data)+len(data)/8)
	b = append(b, `href="data:`...)
	b = append(b, mime...)
	b = append(b, ',')
	for _, c := range data {
		if urlSafe[c] {
			b = append(b, c)
		} else {
			b = append(b, '%', hex[c>>4], hex[c&15])
		}
	}
	b = append(b, '"')
	return template.HTMLAttr(b)
}

// urlSafe marks the bytes a data: URL carries as they are.
var urlSafe = func() (t [256]bool) {
	for c := 0; c < 256; c++ {
		t[c] = c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' ||
			strings.IndexByte("-._,:+=/", byte(c)) >= 0
	}
	return t
}()

// fileName keeps the letters, digits, '-', '_' and '.' of a serial for a
// download name.
func fileName(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '-', r == '_', r == '.':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	if b.Len() == 0 {
		return "unit"
	}
	return b.String()
}

// jsonJS marshals a value for a <script type="application/json"> block.
// encoding/json escapes <, > and & so the block cannot be closed early.
func jsonJS(v any) (template.JS, error) {
	b, err := json.Marshal(v)
	if err != nil {
		return "", err
	}
	return template.JS(b), nil
}

// cautions is the short footnote of method.md section 11.
const cautions = "Active antennas are powered electronics: receive tests must not radiate " +
	"(transmit paths off or terminated); RF exposure limits and laboratory safety rules are those of the " +
	"local authority; ESD and DC handling follow the unit's own instructions. This report supports a " +
	"decision: accredited calibration and test practice (ISO/IEC 17025) and the customer's contract govern it."

// noiseLabel is the short name of a noise quantity in the beam table.
func noiseLabel(quantity string) string {
	switch quantity {
	case "noise-density-dbm-hz":
		return "density"
	case "noise-relative-kt0-db":
		return "above kT0"
	case "system-noise-figure-db":
		return "system NF"
	}
	return quantity
}
