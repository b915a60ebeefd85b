package serve

import (
	"bufio"
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// childEnv names the database the killed-writer child writes to.
const childEnv = "LEVELPATH_SERVE_KILL_CHILD"

// killChild writes records to the database at path without end, printing
// "ID TAG" after each commit, until it is killed.
func killChild(path string) int {
	s, err := openStore(path)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	pad := strings.Repeat("x", 32<<10) // a 32 KiB output: writes span pages
	for i := 0; ; i++ {
		tag := fmt.Sprintf("%d-%d", os.Getpid(), i)
		out, _ := json.Marshal(map[string]string{"tag": tag, "pad": pad})
		id, err := s.add(context.Background(), &Record{Kind: "plan", Flight: "KILL", CreatedAt: time.Now().UTC().Format(time.RFC3339Nano),
			Version: "test", Aircraft: "a", AircraftDigest: "d", Request: json.RawMessage(`{"tag":"` + tag + `"}`), Output: out})
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			return 1
		}
		fmt.Printf("%d %s\n", id, tag)
	}
}

// TestKilledWriter runs a child (this test binary again) that writes
// records and kills it with SIGKILL while it writes, three times over
// the same database: every record the child reported committed must be
// there, whole, and SQLite's integrity_check must answer "ok"
// (https://www.sqlite.org/pragma.html#pragma_integrity_check).
func TestKilledWriter(t *testing.T) {
	path := filepath.Join(t.TempDir(), "records.db")
	committed := map[int64]string{}
	for round := range 3 {
		cmd := exec.Command(os.Args[0], "-test.run=^$")
		cmd.Env = append(os.Environ(), childEnv+"="+path)
		cmd.Stderr = os.Stderr
		out, err := cmd.StdoutPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		sc := bufio.NewScanner(out)
		n := 0
		for n < 20+10*round && sc.Scan() {
			id, tag, _ := strings.Cut(sc.Text(), " ")
			v, err := strconv.ParseInt(id, 10, 64)
			if err != nil {
				t.Fatalf("child said %q", sc.Text())
			}
			committed[v] = tag
			n++
		}
		if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
			t.Fatal(err)
		}
		for sc.Scan() { // lines written before the kill landed
			id, tag, _ := strings.Cut(sc.Text(), " ")
			v, _ := strconv.ParseInt(id, 10, 64)
			committed[v] = tag
		}
		err = cmd.Wait()
		if ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus); !ok || !ws.Signaled() || ws.Signal() != syscall.SIGKILL {
			t.Fatalf("child was not killed by SIGKILL: %v", err)
		}
	}
	s, err := openStore(path)
	if err != nil {
		t.Fatalf("reopening after the kills: %v", err)
	}
	defer s.close()
	var ok string
	if err := s.db.QueryRow("PRAGMA integrity_check").Scan(&ok); err != nil || ok != "ok" {
		t.Fatalf("integrity_check: %q %v", ok, err)
	}
	for id, tag := range committed {
		r, err := s.get(context.Background(), id)
		if err != nil {
			t.Fatalf("committed record %d (%s): %v", id, tag, err)
		}
		var o map[string]string
		if err := json.Unmarshal(r.Output, &o); err != nil || o["tag"] != tag || len(o["pad"]) != 32<<10 {
			t.Fatalf("record %d: output damaged or not %s", id, tag)
		}
	}
	if len(committed) < 90 {
		t.Errorf("only %d records committed", len(committed))
	}
	// A new record still goes in after the kills.
	if _, err := s.add(context.Background(), &Record{Kind: "plan", Request: json.RawMessage("{}"), Output: json.RawMessage("{}")}); err != nil {
		t.Errorf("writing after the kills: %v", err)
	}
}

// TestSchema: a new database is in WAL mode at the current schema
// version; reopening applies nothing twice; a database from a newer
// program is refused.
func TestSchema(t *testing.T) {
	path := filepath.Join(t.TempDir(), "r.db")
	s, err := openStore(path)
	if err != nil {
		t.Fatal(err)
	}
	if v, err := s.version(); err != nil || v != SchemaVersion {
		t.Errorf("version %d %v, want %d", v, err, SchemaVersion)
	}
	s.close()
	if s, err = openStore(path); err != nil {
		t.Fatal(err)
	}
	var n int
	s.db.QueryRow("SELECT COUNT(*) FROM schema_migrations").Scan(&n)
	if n != SchemaVersion {
		t.Errorf("%d migration rows, want %d", n, SchemaVersion)
	}
	if _, err := s.db.Exec("INSERT INTO schema_migrations VALUES (?, 'later')", SchemaVersion+1); err != nil {
		t.Fatal(err)
	}
	s.close()
	if _, err := openStore(path); err == nil || !strings.Contains(err.Error(), "newer") {
		t.Errorf("newer schema: %v", err)
	}
	// The journal mode as SQLite itself reports it from a second
	// connection (https://www.sqlite.org/wal.html: WAL is persistent).
	db, err := sql.Open("sqlite", "file:"+path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var mode string
	if err := db.QueryRow("PRAGMA journal_mode").Scan(&mode); err != nil || mode != "wal" {
		t.Errorf("journal_mode %q %v", mode, err)
	}
}

// TestMigrateFromV1: a database written at schema version 1 is brought
// to the current version on open, its records kept.
func TestMigrateFromV1(t *testing.T) {
	path := filepath.Join(t.TempDir(), "v1.db")
	db, err := sql.Open("sqlite", "file:"+path+"?_pragma=journal_mode(WAL)")
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []string{`CREATE TABLE schema_migrations (version INTEGER PRIMARY KEY, applied_at TEXT NOT NULL)`, migrations[0],
		`INSERT INTO schema_migrations VALUES (1, 'then')`,
		`INSERT INTO records(kind, flight, created_at, token, program_version, aircraft, aircraft_digest, weather, weather_digests, request, output)
		 VALUES ('plan', 'OLD1', 't', '', 'v1', 'a', 'd', '[]', '[]', '{}', '{"plan":{}}')`} {
		if _, err := db.Exec(q); err != nil {
			t.Fatal(err)
		}
	}
	db.Close()
	s, err := openStore(path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.close()
	if v, _ := s.version(); v != SchemaVersion || SchemaVersion < 2 {
		t.Errorf("version %d, want %d", v, SchemaVersion)
	}
	r, err := s.get(context.Background(), 1)
	if err != nil || r.Flight != "OLD1" || r.RouteDigest != "" {
		t.Errorf("old record after the migration: %+v %v", r, err)
	}
}
