package main

import (
	"context"
	"database/sql"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"net/url"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"

	_ "modernc.org/sqlite" // the pure-Go SQLite driver, registered as "sqlite"
)

// schema creates the tables when they do not exist yet. Values of a
// series are kept as a blob of little-endian float64 bit patterns, so
// they come back bit for bit, missing values (NaN) included.
const schema = `
CREATE TABLE IF NOT EXISTS series (
	key     TEXT PRIMARY KEY,
	start   TEXT NOT NULL,
	unit    TEXT NOT NULL,
	every   INTEGER NOT NULL,
	vals    BLOB NOT NULL,
	missing INTEGER NOT NULL,
	updated TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS models (
	id         INTEGER PRIMARY KEY AUTOINCREMENT,
	series_key TEXT NOT NULL,
	method     TEXT NOT NULL,
	options    TEXT NOT NULL,
	label      TEXT NOT NULL,
	form       TEXT NOT NULL,
	body       BLOB NOT NULL,
	seen       INTEGER NOT NULL,
	digest     TEXT NOT NULL,
	added      INTEGER NOT NULL,
	refits     INTEGER NOT NULL,
	created    TEXT NOT NULL,
	updated    TEXT NOT NULL
);
CREATE INDEX IF NOT EXISTS models_by_series ON models(series_key, id);
`

// schemaVersion is the version of schema, kept in the database's
// user_version: a database of a newer version is refused rather than
// misread.
const schemaVersion = 1

// migrate creates the schema of a new database and checks the version of
// an existing one.
func migrate(db *sql.DB) error {
	var v int
	if err := db.QueryRow(`PRAGMA user_version`).Scan(&v); err != nil {
		return err
	}
	if v > schemaVersion {
		return fmt.Errorf("the database has schema version %d; this program knows up to %d", v, schemaVersion)
	}
	tx, err := db.Begin()
	if err != nil {
		return err
	}
	defer tx.Rollback()
	if _, err := tx.Exec(schema); err != nil {
		return err
	}
	if _, err := tx.Exec(fmt.Sprintf(`PRAGMA user_version = %d`, schemaVersion)); err != nil {
		return err
	}
	return tx.Commit()
}

// SQLiteStore is the Store kept in one SQLite database file, through the
// pure-Go driver modernc.org/sqlite (no cgo). It is safe for concurrent
// use: the database is opened with one connection, so writes are
// serialised, and each write is one transaction.
type SQLiteStore struct {
	db *sql.DB
}

var _ Store = (*SQLiteStore)(nil)

// OpenSQLite opens (creating when needed) the database file path and its
// schema. The journal is written ahead (WAL) and every commit is synced,
// so a store closed or killed after a write returns keeps it.
func OpenSQLite(path string) (*SQLiteStore, error) {
	if path == "" {
		return nil, fmt.Errorf("service: open store: %w: empty database path", ErrStore)
	}
	q := url.Values{}
	q.Add("_pragma", "busy_timeout(5000)")
	q.Add("_pragma", "journal_mode(WAL)")
	q.Add("_pragma", "synchronous(FULL)")
	// The path goes into a file: URI, where %, ? and # have meanings of
	// their own: escape them so the file opened is the one named.
	uri := strings.NewReplacer("%", "%25", "?", "%3f", "#", "%23").Replace(path)
	db, err := sql.Open("sqlite", "file:"+uri+"?"+q.Encode())
	if err != nil {
		return nil, fmt.Errorf("service: open store %s: %w: %w", path, ErrStore, err)
	}
	db.SetMaxOpenConns(1)
	if err := migrate(db); err != nil {
		db.Close()
		return nil, fmt.Errorf("service: open store %s: %w: %w", path, ErrStore, err)
	}
	return &SQLiteStore{db: db}, nil
}

// Close closes the database.
func (s *SQLiteStore) Close() error {
	if err := s.db.Close(); err != nil {
		return fmt.Errorf("service: close store: %w: %w", ErrStore, err)
	}
	return nil
}

// storeErr wraps a database error in ErrStore, keeping a context error
// visible to errors.Is.
func storeErr(what string, err error) error {
	return fmt.Errorf("service: store: %s: %w: %w", what, ErrStore, err)
}

// inTx runs f in one transaction, committed when f returns nil.
func (s *SQLiteStore) inTx(ctx context.Context, what string, f func(tx *sql.Tx) error) error {
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return storeErr(what, err)
	}
	if err := f(tx); err != nil {
		tx.Rollback()
		return err
	}
	if err := tx.Commit(); err != nil {
		return storeErr(what, err)
	}
	return nil
}

func encodeValues(v []float64) []byte {
	b := make([]byte, 8*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(x))
	}
	return b
}

func decodeValues(b []byte) ([]float64, error) {
	if len(b)%8 != 0 {
		return nil, fmt.Errorf("values blob of %d bytes", len(b))
	}
	v := make([]float64, len(b)/8)
	for i := range v {
		v[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return v, nil
}

func timeText(t time.Time) string { return t.Format(time.RFC3339Nano) }

func countMissing(v []float64) int {
	n := 0
	for _, x := range v {
		if math.IsNaN(x) {
			n++
		}
	}
	return n
}

// PutSeries implements Store.
func (s *SQLiteStore) PutSeries(ctx context.Context, ys []almanac.Series) error {
	now := timeText(time.Now().UTC())
	return s.inTx(ctx, "put series", func(tx *sql.Tx) error {
		for _, y := range ys {
			_, err := tx.ExecContext(ctx, `INSERT INTO series(key, start, unit, every, vals, missing, updated) VALUES(?, ?, ?, ?, ?, ?, ?)
				ON CONFLICT(key) DO UPDATE SET start=excluded.start, unit=excluded.unit, every=excluded.every, vals=excluded.vals, missing=excluded.missing, updated=excluded.updated`,
				y.Key, timeText(y.Start), y.Freq.Unit.String(), y.Freq.N, encodeValues(y.Values), countMissing(y.Values), now)
			if err != nil {
				return storeErr("put series "+y.Key, err)
			}
		}
		return nil
	})
}

// scanSeries reads one series row.
func scanSeries(row interface{ Scan(...any) error }, key string) (almanac.Series, error) {
	var start, unit string
	var every int
	var blob []byte
	if err := row.Scan(&start, &unit, &every, &blob); err != nil {
		if errors.Is(err, sql.ErrNoRows) {
			return almanac.Series{}, fmt.Errorf("service: series %q: %w", key, ErrNotFound)
		}
		return almanac.Series{}, storeErr("read series "+key, err)
	}
	t, err := time.Parse(time.RFC3339Nano, start)
	if err != nil {
		return almanac.Series{}, storeErr("read series "+key, err)
	}
	v, err := decodeValues(blob)
	if err != nil {
		return almanac.Series{}, storeErr("read series "+key, err)
	}
	u := unitOf(unit)
	if u == calendar.UnitUnset {
		return almanac.Series{}, storeErr("read series "+key, fmt.Errorf("unit %q", unit))
	}
	y := almanac.Series{Key: key, Start: t, Freq: calendar.Frequency{Unit: u, N: every}, Values: v}
	return y, nil
}

// unitOf returns the unit named name, or UnitUnset.
func unitOf(name string) calendar.Unit {
	for u := calendar.Minute; u <= calendar.Year; u++ {
		if u.String() == name {
			return u
		}
	}
	return calendar.UnitUnset
}

// Series implements Store.
func (s *SQLiteStore) Series(ctx context.Context, key string) (almanac.Series, error) {
	row := s.db.QueryRowContext(ctx, `SELECT start, unit, every, vals FROM series WHERE key = ?`, key)
	return scanSeries(row, key)
}

// ExtendSeries implements Store.
func (s *SQLiteStore) ExtendSeries(ctx context.Context, key string, values []float64) (almanac.Series, error) {
	var y almanac.Series
	err := s.inTx(ctx, "extend series "+key, func(tx *sql.Tx) error {
		var err error
		y, err = scanSeries(tx.QueryRowContext(ctx, `SELECT start, unit, every, vals FROM series WHERE key = ?`, key), key)
		if err != nil {
			return err
		}
		y.Values = append(y.Values, values...)
		if err := y.Validate(); err != nil {
			return fmt.Errorf("service: extend series %q: %w", key, err)
		}
		_, err = tx.ExecContext(ctx, `UPDATE series SET vals = ?, missing = ?, updated = ? WHERE key = ?`,
			encodeValues(y.Values), countMissing(y.Values), timeText(time.Now().UTC()), key)
		if err != nil {
			return storeErr("extend series "+key, err)
		}
		return nil
	})
	if err != nil {
		return almanac.Series{}, err
	}
	return y, nil
}

// SeriesList implements Store.
func (s *SQLiteStore) SeriesList(ctx context.Context) ([]SeriesInfo, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT key, start, unit, every, length(vals)/8, missing FROM series ORDER BY key`)
	if err != nil {
		return nil, storeErr("list series", err)
	}
	defer rows.Close()
	out := []SeriesInfo{}
	for rows.Next() {
		var si SeriesInfo
		var start string
		if err := rows.Scan(&si.Key, &start, &si.Unit, &si.Every, &si.Length, &si.Missing); err != nil {
			return nil, storeErr("list series", err)
		}
		if si.Start, err = time.Parse(time.RFC3339Nano, start); err != nil {
			return nil, storeErr("list series", err)
		}
		out = append(out, si)
	}
	if err := rows.Err(); err != nil {
		return nil, storeErr("list series", err)
	}
	return out, nil
}

// AddModel implements Store.
func (s *SQLiteStore) AddModel(ctx context.Context, m ModelRecord) (int64, error) {
	var id int64
	now := time.Now().UTC()
	err := s.inTx(ctx, "add model", func(tx *sql.Tx) error {
		res, err := tx.ExecContext(ctx, `INSERT INTO models(series_key, method, options, label, form, body, seen, digest, added, refits, created, updated)
			VALUES(?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
			m.SeriesKey, m.Method, string(m.Options), m.Label, m.Form, m.Body, m.Seen, m.Digest, m.Added, m.Refits, timeText(now), timeText(now))
		if err != nil {
			return storeErr("add model", err)
		}
		if id, err = res.LastInsertId(); err != nil {
			return storeErr("add model", err)
		}
		return nil
	})
	return id, err
}

// UpdateModel implements Store.
func (s *SQLiteStore) UpdateModel(ctx context.Context, m ModelRecord, base string) error {
	return s.inTx(ctx, "update model", func(tx *sql.Tx) error {
		res, err := tx.ExecContext(ctx, `UPDATE models SET label = ?, form = ?, body = ?, seen = ?, digest = ?, added = ?, refits = ?, updated = ? WHERE id = ? AND digest = ?`,
			m.Label, m.Form, m.Body, m.Seen, m.Digest, m.Added, m.Refits, timeText(time.Now().UTC()), m.ID, base)
		if err != nil {
			return storeErr("update model", err)
		}
		if n, err := res.RowsAffected(); err != nil {
			return storeErr("update model", err)
		} else if n == 0 {
			var one int
			switch err := tx.QueryRowContext(ctx, `SELECT 1 FROM models WHERE id = ?`, m.ID).Scan(&one); {
			case errors.Is(err, sql.ErrNoRows):
				return fmt.Errorf("service: model %d: %w", m.ID, ErrNotFound)
			case err != nil:
				return storeErr("update model", err)
			}
			return fmt.Errorf("service: model %d: %w: it was changed by another request meanwhile", m.ID, ErrConflict)
		}
		return nil
	})
}

const modelColumns = `id, series_key, method, options, label, form, seen, digest, added, refits, created, updated`

func scanModel(row interface{ Scan(...any) error }, body *[]byte) (ModelRecord, error) {
	var m ModelRecord
	var options, created, updated string
	dest := []any{&m.ID, &m.SeriesKey, &m.Method, &options, &m.Label, &m.Form, &m.Seen, &m.Digest, &m.Added, &m.Refits, &created, &updated}
	if body != nil {
		dest = append(dest, body)
	}
	if err := row.Scan(dest...); err != nil {
		return m, err
	}
	m.Options = []byte(options)
	var err error
	if m.Created, err = time.Parse(time.RFC3339Nano, created); err != nil {
		return m, err
	}
	if m.Updated, err = time.Parse(time.RFC3339Nano, updated); err != nil {
		return m, err
	}
	return m, nil
}

// Model implements Store.
func (s *SQLiteStore) Model(ctx context.Context, id int64) (ModelRecord, error) {
	var body []byte
	m, err := scanModel(s.db.QueryRowContext(ctx, `SELECT `+modelColumns+`, body FROM models WHERE id = ?`, id), &body)
	switch {
	case errors.Is(err, sql.ErrNoRows):
		return ModelRecord{}, fmt.Errorf("service: model %d: %w", id, ErrNotFound)
	case err != nil:
		return ModelRecord{}, storeErr(fmt.Sprintf("read model %d", id), err)
	}
	m.Body = body
	return m, nil
}

// Models implements Store.
func (s *SQLiteStore) Models(ctx context.Context, key string) ([]ModelRecord, error) {
	q, args := `SELECT `+modelColumns+` FROM models ORDER BY id`, []any{}
	if key != "" {
		q, args = `SELECT `+modelColumns+` FROM models WHERE series_key = ? ORDER BY id`, []any{key}
	}
	rows, err := s.db.QueryContext(ctx, q, args...)
	if err != nil {
		return nil, storeErr("list models", err)
	}
	defer rows.Close()
	out := []ModelRecord{}
	for rows.Next() {
		m, err := scanModel(rows, nil)
		if err != nil {
			return nil, storeErr("list models", err)
		}
		out = append(out, m)
	}
	if err := rows.Err(); err != nil {
		return nil, storeErr("list models", err)
	}
	return out, nil
}
