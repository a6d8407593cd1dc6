package main

import (
	"fmt"
	"io"
	"os"
	"sync"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progress reports finished units: a bar on a terminal, one plain line per
// unit otherwise, nothing with --quiet. Problems are always printed.
type progress struct {
	mu    sync.Mutex
	w     io.Writer
	bar   *progressbar.ProgressBar
	plain bool
	done  int
	total int
}

func newProgress(w io.Writer, total int, quiet bool) *progress {
	p := &progress{w: w, total: total}
	if quiet {
		return p
	}
	if f, ok := w.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		p.bar = progressbar.NewOptions(total,
			progressbar.OptionSetWriter(w),
			progressbar.OptionSetDescription("units"),
			progressbar.OptionShowCount(),
			progressbar.OptionSetPredictTime(true),
			progressbar.OptionClearOnFinish(),
		)
		return p
	}
	p.plain = true
	return p
}

func (p *progress) println(line string) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.bar != nil {
		p.bar.Clear()
	}
	fmt.Fprintln(p.w, line)
}

func (p *progress) unitDone(o unitOutcome) {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done++
	switch {
	case p.bar != nil:
		p.bar.Add(1)
	case p.plain:
		what := "built"
		switch {
		case o.err != nil:
			what = "failed"
		case o.skipped:
			what = "unchanged"
		}
		verdict := ""
		if o.state != nil {
			verdict = " " + string(o.state.Summary.Verdict)
		}
		fmt.Fprintf(p.w, "[%d/%d] %s %s%s\n", p.done, p.total, o.serial, what, verdict)
	}
}

func (p *progress) finish() {
	if p.bar != nil {
		p.bar.Finish()
	}
}
