package serve

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	_ "modernc.org/sqlite" // pure-Go SQLite driver "sqlite"
)

// Record is one stored plan or assessment: its inputs and its output,
// kept so that a plan can be shown again exactly as it was produced.
type Record struct {
	ID             int64           `json:"id"`
	Kind           string          `json:"kind"` // "plan" or "assess"
	Flight         string          `json:"flight"`
	CreatedAt      string          `json:"created_at"` // RFC3339 UTC
	Token          string          `json:"token"`      // token name ("" without --tokens)
	Version        string          `json:"program_version"`
	Aircraft       string          `json:"aircraft"`
	AircraftDigest string          `json:"aircraft_digest"`
	Weather        []string        `json:"weather"`
	WeatherDigests []string        `json:"weather_digests"`
	RouteDigest    string          `json:"route_digest"`
	Request        json.RawMessage `json:"request"`
	Output         json.RawMessage `json:"output"`
}

// migrations are applied in order; the schema version is the number
// applied, kept in schema_migrations. A migration is never edited once
// released: a change is a new entry.
var migrations = []string{
	`CREATE TABLE records (
		id INTEGER PRIMARY KEY AUTOINCREMENT,
		kind TEXT NOT NULL,
		flight TEXT NOT NULL,
		created_at TEXT NOT NULL,
		token TEXT NOT NULL,
		program_version TEXT NOT NULL,
		aircraft TEXT NOT NULL,
		aircraft_digest TEXT NOT NULL,
		weather TEXT NOT NULL,
		weather_digests TEXT NOT NULL,
		request TEXT NOT NULL,
		output TEXT NOT NULL
	);
	CREATE INDEX records_flight ON records(flight, id);`,
	// 2: the route's digest (SHA-256 of the file named, or of the inline
	// route as sent); records from before have "".
	`ALTER TABLE records ADD COLUMN route_digest TEXT NOT NULL DEFAULT '';`,
}

// SchemaVersion is the schema version this program writes.
var SchemaVersion = len(migrations)

// store keeps records in SQLite (WAL journal, synchronous=FULL: a
// committed record survives the process being killed and the machine
// losing power).
type store struct {
	db *sql.DB
}

func openStore(path string) (*store, error) {
	dsn := "file:" + path + "?_pragma=journal_mode(WAL)&_pragma=synchronous(FULL)&_pragma=busy_timeout(10000)&_pragma=foreign_keys(1)"
	db, err := sql.Open("sqlite", dsn)
	if err != nil {
		return nil, err
	}
	db.SetMaxOpenConns(4)
	s := &store{db: db}
	if err := s.migrate(); err != nil {
		db.Close()
		return nil, fmt.Errorf("database %s: %w", path, err)
	}
	return s, nil
}

func (s *store) migrate() error {
	ctx := context.Background()
	var mode string
	if err := s.db.QueryRowContext(ctx, "PRAGMA journal_mode").Scan(&mode); err != nil {
		return err
	}
	if mode != "wal" {
		return fmt.Errorf("journal mode %q, want wal", mode)
	}
	if _, err := s.db.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (version INTEGER PRIMARY KEY, applied_at TEXT NOT NULL)`); err != nil {
		return err
	}
	var have int
	if err := s.db.QueryRowContext(ctx, `SELECT COALESCE(MAX(version), 0) FROM schema_migrations`).Scan(&have); err != nil {
		return err
	}
	if have > len(migrations) {
		return fmt.Errorf("schema version %d is newer than this program's %d", have, len(migrations))
	}
	for v := have + 1; v <= len(migrations); v++ {
		tx, err := s.db.BeginTx(ctx, nil)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, migrations[v-1]); err != nil {
			tx.Rollback()
			return fmt.Errorf("migration %d: %w", v, err)
		}
		if _, err := tx.ExecContext(ctx, `INSERT INTO schema_migrations(version, applied_at) VALUES (?, ?)`, v, time.Now().UTC().Format(time.RFC3339)); err != nil {
			tx.Rollback()
			return err
		}
		if err := tx.Commit(); err != nil {
			return err
		}
	}
	return nil
}

func (s *store) version() (int, error) {
	var v int
	err := s.db.QueryRow(`SELECT COALESCE(MAX(version), 0) FROM schema_migrations`).Scan(&v)
	return v, err
}

// add stores r and returns its id; the record is durable when add
// returns nil.
func (s *store) add(ctx context.Context, r *Record) (int64, error) {
	w, _ := json.Marshal(nonNil(r.Weather))
	wd, _ := json.Marshal(nonNil(r.WeatherDigests))
	res, err := s.db.ExecContext(ctx, `INSERT INTO records(kind, flight, created_at, token, program_version, aircraft, aircraft_digest, weather, weather_digests, route_digest, request, output)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		r.Kind, r.Flight, r.CreatedAt, r.Token, r.Version, r.Aircraft, r.AircraftDigest, string(w), string(wd), r.RouteDigest, string(r.Request), string(r.Output))
	if err != nil {
		return 0, err
	}
	return res.LastInsertId()
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

const recordCols = `id, kind, flight, created_at, token, program_version, aircraft, aircraft_digest, weather, weather_digests, route_digest, request, output`

func scanRecord(row interface{ Scan(...any) error }) (*Record, error) {
	var r Record
	var w, wd, req, out string
	if err := row.Scan(&r.ID, &r.Kind, &r.Flight, &r.CreatedAt, &r.Token, &r.Version, &r.Aircraft, &r.AircraftDigest, &w, &wd, &r.RouteDigest, &req, &out); err != nil {
		return nil, err
	}
	if err := json.Unmarshal([]byte(w), &r.Weather); err != nil {
		return nil, err
	}
	if err := json.Unmarshal([]byte(wd), &r.WeatherDigests); err != nil {
		return nil, err
	}
	r.Request, r.Output = json.RawMessage(req), json.RawMessage(out)
	return &r, nil
}

// errNoRecord is returned by get for an unknown id.
var errNoRecord = errors.New("no such record")

func (s *store) get(ctx context.Context, id int64) (*Record, error) {
	r, err := scanRecord(s.db.QueryRowContext(ctx, `SELECT `+recordCols+` FROM records WHERE id = ?`, id))
	if errors.Is(err, sql.ErrNoRows) {
		return nil, errNoRecord
	}
	return r, err
}

// summary is a history line: the record without its request and output.
type summary struct {
	ID        int64  `json:"id"`
	Kind      string `json:"kind"`
	Flight    string `json:"flight"`
	CreatedAt string `json:"created_at"`
	Token     string `json:"token"`
	Aircraft  string `json:"aircraft"`
	Profile   string `json:"profile"`
	CostTotal any    `json:"cost"`
}

// history lists the records of one flight, newest first, at most limit.
func (s *store) history(ctx context.Context, flight string, limit int) ([]summary, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT id, kind, flight, created_at, token, aircraft,
		COALESCE(json_extract(output, '$.plan.profile'), ''), json_extract(output, '$.plan.totals.cost')
		FROM records WHERE flight = ? ORDER BY id DESC LIMIT ?`, flight, limit)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	out := []summary{}
	for rows.Next() {
		var m summary
		if err := rows.Scan(&m.ID, &m.Kind, &m.Flight, &m.CreatedAt, &m.Token, &m.Aircraft, &m.Profile, &m.CostTotal); err != nil {
			return nil, err
		}
		out = append(out, m)
	}
	return out, rows.Err()
}

func (s *store) count(ctx context.Context) (int64, error) {
	var n int64
	err := s.db.QueryRowContext(ctx, `SELECT COUNT(*) FROM records`).Scan(&n)
	return n, err
}

func (s *store) close() error { return s.db.Close() }
