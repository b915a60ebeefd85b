package batch

import (
	"fmt"
	"io"
	"strings"
	"sync"
	"time"
)

// Progress pacing.
const (
	tick      = 100 * time.Millisecond // least time between redraws of the TTY line
	plainStep = 5                      // percent between plain lines
	plainMax  = 10 * time.Second       // most time between plain lines
)

// progress reports a run on a terminal (one line rewritten with '\r' at
// most every tick) or, for logs, as plain lines at every plainStep percent
// and at least every plainMax. Safe for concurrent use.
type progress struct {
	mu       sync.Mutex
	w        io.Writer
	tty      bool
	total    int
	done     int
	failed   int
	start    time.Time
	lastDraw time.Time
	nextPct  int
	drawn    bool // a TTY line is on screen
}

func newProgress(w io.Writer, tty bool) *progress {
	if w == nil {
		w = io.Discard
	}
	return &progress{w: w, tty: tty}
}

// begin announces the run.
func (p *progress) begin(total, skipped, badRows, workers int) {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.total = total
	p.start = time.Now()
	p.lastDraw = p.start
	p.nextPct = plainStep
	fmt.Fprintf(p.w, "batch: %d plans to make with %d workers", total, workers)
	if skipped > 0 {
		fmt.Fprintf(p.w, ", %d already recorded", skipped)
	}
	if badRows > 0 {
		fmt.Fprintf(p.w, ", %d bad schedule row(s) (see errors.csv)", badRows)
	}
	fmt.Fprintln(p.w)
}

// step counts one finished plan.
func (p *progress) step(failed bool) {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done++
	if failed {
		p.failed++
	}
	now := time.Now()
	if p.tty {
		if p.done == p.total || now.Sub(p.lastDraw) >= tick {
			p.draw(now)
		}
		return
	}
	pct := 0
	if p.total > 0 {
		pct = 100 * p.done / p.total
	}
	if pct >= p.nextPct || now.Sub(p.lastDraw) >= plainMax || p.done == p.total {
		for p.nextPct <= pct {
			p.nextPct += plainStep
		}
		p.lastDraw = now
		fmt.Fprintf(p.w, "batch: %s\n", p.status(now))
	}
}

// note prints a message on its own line without garbling the bar.
func (p *progress) note(msg string) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.tty && p.drawn {
		fmt.Fprint(p.w, "\r"+strings.Repeat(" ", 79)+"\r")
	}
	fmt.Fprintln(p.w, strings.TrimRight(msg, "\n"))
	if p.tty && p.drawn {
		p.draw(time.Now())
	}
}

// end finishes the bar and says how the run ended.
func (p *progress) end(stopped bool, pending int) {
	p.mu.Lock()
	defer p.mu.Unlock()
	now := time.Now()
	if p.tty {
		p.draw(now)
		fmt.Fprintln(p.w)
	}
	if stopped {
		fmt.Fprintf(p.w, "batch: stopped with %d plans not made; the records written are kept (resume the run to finish)\n", pending)
		return
	}
	fmt.Fprintf(p.w, "batch: %d plans made in %s, %d failed\n", p.done, now.Sub(p.start).Round(time.Millisecond), p.failed)
}

func (p *progress) draw(now time.Time) {
	const width = 24
	fill := width
	if p.total > 0 {
		fill = width * p.done / p.total
	}
	bar := strings.Repeat("#", fill) + strings.Repeat("-", width-fill)
	line := fmt.Sprintf("\r[%s] %s", bar, p.status(now))
	if len(line) < 80 {
		line += strings.Repeat(" ", 80-len(line))
	}
	fmt.Fprint(p.w, line)
	p.lastDraw = now
	p.drawn = true
}

// status is "512/1000 (51%), 3 failed, 41.2/s, ETA 12s".
func (p *progress) status(now time.Time) string {
	pct := 100
	if p.total > 0 {
		pct = 100 * p.done / p.total
	}
	s := fmt.Sprintf("%d/%d (%d%%), %d failed", p.done, p.total, pct, p.failed)
	el := now.Sub(p.start).Seconds()
	if el > 0 && p.done > 0 {
		rate := float64(p.done) / el
		eta := time.Duration(float64(p.total-p.done) / rate * float64(time.Second))
		s += fmt.Sprintf(", %.1f/s, ETA %s", rate, eta.Round(time.Second))
	}
	return s
}
