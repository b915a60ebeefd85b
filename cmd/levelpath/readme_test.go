package main

import (
	"bufio"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// readmeCommands returns the levelpath command lines of the README's sh
// blocks, continuation lines joined. Lines that need a shell (variables,
// globs) are left out: they belong to the cluster recipes.
func readmeCommands(t *testing.T, path string) []string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var cmds []string
	in, cur := false, ""
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		switch {
		case strings.HasPrefix(line, "```sh"):
			in = true
			continue
		case strings.HasPrefix(line, "```"):
			in = false
			continue
		case !in:
			continue
		}
		line = strings.TrimSpace(line)
		if cur != "" {
			line = cur + " " + line
			cur = ""
		}
		if before, ok := strings.CutSuffix(line, `\`); ok {
			cur = strings.TrimSpace(before)
			continue
		}
		if i := strings.Index(line, " #"); i >= 0 {
			line = strings.TrimSpace(line[:i])
		}
		if strings.HasPrefix(line, "levelpath ") && !strings.ContainsAny(line, "$*") {
			cmds = append(cmds, line)
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return cmds
}

// splitWords splits a command line as a POSIX shell would for the simple
// quoting the README uses (double and single quotes, no escapes).
func splitWords(s string) []string {
	var out []string
	var b strings.Builder
	quote, word := rune(0), false
	for _, r := range s {
		switch {
		case quote != 0 && r == quote:
			quote = 0
		case quote != 0:
			b.WriteRune(r)
		case r == '"' || r == '\'':
			quote, word = r, true
		case r == ' ' || r == '\t':
			if word {
				out = append(out, b.String())
				b.Reset()
				word = false
			}
		default:
			b.WriteRune(r)
			word = true
		}
	}
	if word {
		out = append(out, b.String())
	}
	return out
}

// TestReadmeCommands runs every levelpath command in the README's examples
// on the demo scenario, in a fresh directory, as a new user would after
// `levelpath demo`, and then the commands that demo itself prints: each
// must succeed, so the README cannot drift from the program.
func TestReadmeCommands(t *testing.T) {
	readme, err := filepath.Abs("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	cmds := readmeCommands(t, readme)
	if len(cmds) < 6 {
		t.Fatalf("found %d levelpath commands in the README, want the examples (at least 6): %q", len(cmds), cmds)
	}
	t.Chdir(t.TempDir())
	code, _, errs := runCLI(t, "demo")
	if code != 0 {
		t.Fatalf("levelpath demo: exit %d: %s", code, errs)
	}
	for line := range strings.SplitSeq(errs, "\n") {
		if l := strings.TrimSpace(line); strings.HasPrefix(l, "levelpath ") {
			cmds = append(cmds, l)
		} else if i := strings.Index(l, ": levelpath "); i >= 0 {
			cmds = append(cmds, l[i+2:])
		}
	}
	ran := 0
	for _, c := range cmds {
		args := splitWords(c)[1:]
		if args[0] == "demo" {
			continue
		}
		ran++
		code, _, errs := runCLI(t, args...)
		if code != 0 {
			t.Errorf("%s: exit %d: %s", c, code, errs)
		}
	}
	t.Logf("ran %d commands from the README and the demo's own output", ran)
}
