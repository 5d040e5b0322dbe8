package main

import (
	"context"
	"time"

	"github.com/almanac-go/almanac"
)

// Store keeps series and fitted models. Every write is atomic: it either
// happens entirely or not at all. Implementations are safe for concurrent
// use. Methods return errors wrapping ErrNotFound for an unknown key or
// id, and ErrStore when the storage itself fails; a cancelled context
// stops a write before it commits.
type Store interface {
	// PutSeries stores ys, replacing stored series of the same keys, in
	// one transaction.
	PutSeries(ctx context.Context, ys []almanac.Series) error
	// ExtendSeries appends values to the stored series key and returns
	// the extended series.
	ExtendSeries(ctx context.Context, key string, values []float64) (almanac.Series, error)
	// Series returns the stored series key.
	Series(ctx context.Context, key string) (almanac.Series, error)
	// SeriesList describes every stored series, sorted by key.
	SeriesList(ctx context.Context) ([]SeriesInfo, error)

	// AddModel stores a new model and returns its id (m.ID is ignored).
	AddModel(ctx context.Context, m ModelRecord) (int64, error)
	// UpdateModel replaces the stored model m.ID (after a refresh or a
	// refit), keeping its creation time, provided its stored Digest is
	// still base: the update is based on that version, and one made from
	// an older version gives an error wrapping ErrConflict.
	UpdateModel(ctx context.Context, m ModelRecord, base string) error
	// Model returns the stored model id.
	Model(ctx context.Context, id int64) (ModelRecord, error)
	// Models lists the stored models, of the series key only when key is
	// not "", sorted by id. The records' Body is left empty.
	Models(ctx context.Context, key string) ([]ModelRecord, error)

	// Close releases the store.
	Close() error
}

// SeriesInfo describes a stored series.
type SeriesInfo struct {
	Key     string    `json:"key"`
	Start   time.Time `json:"start"`
	Unit    string    `json:"unit"`
	Every   int       `json:"every"`
	Length  int       `json:"length"`
	Missing int       `json:"missing"`
}

// Forms of a stored model body.
const (
	// FormDocument: the body is a saved-model document
	// (almanac.SaveModel), loaded by almanac.LoadModel.
	FormDocument = "document"
	// FormRecipe: the model cannot be saved as a document (its type does
	// not implement almanac.Storable), so the body holds the method, its
	// options and the data it was fitted to; loading fits it again, which
	// gives the same model because every method is deterministic.
	FormRecipe = "recipe"
)

// ModelRecord is a fitted model as stored.
type ModelRecord struct {
	ID        int64
	SeriesKey string
	// Method and Options say how the model was fitted (see methods.go);
	// Options is a JSON object.
	Method  string
	Options []byte
	// Label is the fitted model's String, e.g. "ETS(A,N,N)".
	Label string
	// Form is FormDocument or FormRecipe; Body is the document or the
	// recipe.
	Form string
	Body []byte
	// Seen is the number of observations of the series the model has
	// taken (fitted to or refreshed with), and Digest identifies those
	// observations with the series' start and frequency, so a refresh can
	// tell that the history it continues is unchanged.
	Seen   int
	Digest string
	// Added counts the observations taken by refreshes since the model
	// was last estimated; Refits counts the refits the refresh policy
	// asked for.
	Added  int
	Refits int
	// Created and Updated are the times of the first fit and of the last
	// change, in UTC.
	Created, Updated time.Time
}
