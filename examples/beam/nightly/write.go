package nightly

import (
	"bufio"
	"context"
	"fmt"
	"slices"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem"
)

// shardFn keys every output record by the shard file it goes to.
type shardFn struct {
	Shards int
}

// ProcessElement emits the record's line under its shard's file name.
func (f *shardFn) ProcessElement(r Record, emit func(string, string)) {
	emit(ShardName(r.Output, shardOf(r.Key, f.Shards), f.Shards), r.Line)
}

// ShardName is the file name (without directory) of shard i of n of an
// output: "forecasts-00003-of-00008.csv".
func ShardName(output string, i, n int) string {
	return fmt.Sprintf("%s-%05d-of-%05d.csv", output, i, n)
}

// allShardsFn names every shard file once, with an empty line, so that
// every shard is written (with its header) even when it holds no rows.
type allShardsFn struct {
	Shards int
}

// ProcessElement emits an empty line for every output's every shard.
func (f *allShardsFn) ProcessElement(_ []byte, emit func(string, string)) {
	for _, o := range Outputs {
		for i := range f.Shards {
			emit(ShardName(o, i, f.Shards), "")
		}
	}
}

// writeFn writes one shard file: the output's header, then its lines in
// sorted order, so a shard's content does not depend on how the runner
// scheduled the work.
type writeFn struct {
	Dir    string
	Levels []float64
}

// ProcessElement writes the shard called name.
func (f *writeFn) ProcessElement(ctx context.Context, name string, it func(*string) bool) error {
	var lines []string
	var l string
	for it(&l) {
		if l != "" {
			lines = append(lines, l)
		}
	}
	slices.Sort(lines)
	output, _, _ := strings.Cut(name, "-")
	var header []string
	switch output {
	case OutputForecasts:
		header = ForecastHeader(f.Levels)
	case OutputAccuracy:
		header = AccuracyHeader(f.Levels)
	case OutputStatus:
		header = StatusHeader
	default:
		header = DeadLetterHeader
	}
	path := strings.TrimSuffix(f.Dir, "/") + "/" + name
	fs, err := filesystem.New(ctx, path)
	if err != nil {
		return err
	}
	defer fs.Close()
	w, err := fs.OpenWrite(ctx, path)
	if err != nil {
		return fmt.Errorf("nightly: writing %s: %w", path, err)
	}
	bw := bufio.NewWriter(w)
	bw.WriteString(csvLine(header...))
	bw.WriteByte('\n')
	for _, l := range lines {
		bw.WriteString(l)
		bw.WriteByte('\n')
	}
	if err := bw.Flush(); err != nil {
		w.Close()
		return fmt.Errorf("nightly: writing %s: %w", path, err)
	}
	if err := w.Close(); err != nil {
		return fmt.Errorf("nightly: writing %s: %w", path, err)
	}
	return nil
}
