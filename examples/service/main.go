package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"log"
	"net"
	"net/http"
	"os"
	"os/signal"
	"syscall"
	"time"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	if err := run(ctx, os.Args[1:], os.Stderr, nil); err != nil {
		fmt.Fprintln(os.Stderr, "service:", err)
		os.Exit(1)
	}
}

// run parses the flags, opens the store and serves until ctx is done,
// then shuts down gracefully (requests in flight get a few seconds to
// finish) and closes the store. When ready is not nil it receives the
// address listened on once the server accepts connections.
func run(ctx context.Context, args []string, stderr io.Writer, ready chan<- string) error {
	fs := flag.NewFlagSet("service", flag.ContinueOnError)
	fs.SetOutput(stderr)
	dbPath := fs.String("db", "", "SQLite database `file` holding series and models (created when missing; required)")
	addr := fs.String("addr", "127.0.0.1:8360", "`address` to listen on")
	timeout := fs.Duration("timeout", 2*time.Minute, "longest time one request may take, fits included")
	maxBody := fs.Int64("max-body", 8<<20, "largest request body in `bytes`")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *dbPath == "" {
		fs.Usage()
		return errors.New("-db is required")
	}
	store, err := OpenSQLite(*dbPath)
	if err != nil {
		return err
	}
	defer store.Close()
	srv := &http.Server{
		Handler:           NewServer(store, Limits{Body: *maxBody, Timeout: *timeout}).Handler(),
		ReadHeaderTimeout: 10 * time.Second,
		ReadTimeout:       time.Minute,
		IdleTimeout:       2 * time.Minute,
		ErrorLog:          log.New(stderr, "service: ", log.LstdFlags),
	}
	ln, err := net.Listen("tcp", *addr)
	if err != nil {
		return err
	}
	fmt.Fprintf(stderr, "service: listening on http://%s, database %s\n", ln.Addr(), *dbPath)
	if ready != nil {
		ready <- ln.Addr().String()
	}
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	select {
	case err := <-errc:
		return err
	case <-ctx.Done():
	}
	shut, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	if err := srv.Shutdown(shut); err != nil {
		return err
	}
	if err := <-errc; !errors.Is(err, http.ErrServerClosed) {
		return err
	}
	return nil
}
