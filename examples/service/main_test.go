package main

import (
	"context"
	"io"
	"net/http"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

func TestRunFlags(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"no database", nil, "-db is required"},
		{"unknown flag", []string{"-db", "x.db", "-colour"}, "flag provided but not defined"},
		{"bad address", []string{"-db", filepath.Join(t.TempDir(), "x.db"), "-addr", "nowhere:-1"}, "invalid port"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := run(context.Background(), tt.args, io.Discard, nil)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Errorf("run(%q) = %v, want an error containing %q", tt.args, err, tt.want)
			}
		})
	}
}

// TestRunServes starts the command on a free port, stores a series over
// HTTP, stops it as a signal would, and starts it again on the same
// database file, which still holds the series.
func TestRunServes(t *testing.T) {
	t.Parallel()
	db := filepath.Join(t.TempDir(), "plan.db")
	serve := func(do func(base string)) {
		ctx, cancel := context.WithCancel(context.Background())
		ready := make(chan string, 1)
		done := make(chan error, 1)
		go func() {
			done <- run(ctx, []string{"-db", db, "-addr", "127.0.0.1:0", "-timeout", "30s"}, io.Discard, ready)
		}()
		select {
		case addr := <-ready:
			do("http://" + addr)
		case err := <-done:
			t.Fatalf("run stopped: %v", err)
		case <-time.After(30 * time.Second):
			t.Fatal("run did not start")
		}
		cancel()
		if err := <-done; err != nil {
			t.Errorf("run after shutdown: %v", err)
		}
	}
	serve(func(base string) {
		resp, err := http.Post(base+"/v1/series", "application/json", strings.NewReader(`{"series": [`+seriesJSON("west/nails", "2024-01-01", "week", []float64{3, 4, 5})+`]}`))
		if err != nil {
			t.Fatal(err)
		}
		resp.Body.Close()
		if resp.StatusCode != http.StatusCreated {
			t.Errorf("post: %s", resp.Status)
		}
	})
	serve(func(base string) {
		resp, err := http.Get(base + "/v1/series/west%2Fnails")
		if err != nil {
			t.Fatal(err)
		}
		b, _ := io.ReadAll(resp.Body)
		resp.Body.Close()
		if resp.StatusCode != http.StatusOK || !strings.Contains(string(b), `"values":[3,4,5]`) {
			t.Errorf("after the restart: %s %s", resp.Status, b)
		}
	})
}
