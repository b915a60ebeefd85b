package main

import (
	"context"
	"crypto/tls"
	"log"
	"net"
	"os/signal"
	"path/filepath"
	"syscall"
	"time"

	"github.com/spf13/cobra"

	"levelpath/cmd/levelpath/internal/serve"
)

func newServeCmd() *cobra.Command {
	var (
		addr, data, tokens, cert, key, db string
		timeout, queueWait, drain         time.Duration
		workers, queue                    int
	)
	c := &cobra.Command{
		Use:   "serve",
		Short: "Serve the planning API and the dispatcher's page over HTTP",
		Long: `serve runs the planning service: a JSON API under /v1/ (plan, assess,
envelope, aircraft, routes, weather, records), the dispatcher's page at /,
/healthz and /metrics. Requests name files inside --data only. Every plan and
assessment is kept in the SQLite file --db with its inputs. Without --tokens
the service has no authentication and listens on loopback only.`,
		Example: `  levelpath demo && levelpath serve --data levelpath-demo
  levelpath serve --addr :8443 --data /srv/levelpath --tokens tokens.txt --tls-cert cert.pem --tls-key key.pem`,
		Args: cobra.NoArgs,
	}
	fl := c.Flags()
	fl.StringVar(&addr, "addr", "127.0.0.1:8080", "listen address")
	fl.StringVar(&data, "data", "", "directory of the routes, aircraft and weather files requests may name")
	fl.StringVar(&tokens, "tokens", "", "file of bearer tokens, one name:sha256-hex a line")
	fl.StringVar(&cert, "tls-cert", "", "TLS certificate (PEM); with --tls-key serves HTTPS")
	fl.StringVar(&key, "tls-key", "", "TLS private key (PEM)")
	fl.StringVar(&db, "db", "", "SQLite file of plan records (default DATA/levelpath-records.db)")
	fl.DurationVar(&timeout, "timeout", 30*time.Second, "time limit of one request")
	fl.IntVar(&workers, "workers", 0, "plans computed at once (default: the number of CPUs)")
	fl.DurationVar(&queueWait, "queue-wait", 2*time.Second, "longest wait for a free worker before 503")
	fl.IntVar(&queue, "queue", 0, "requests waiting for a free worker at most, beyond which 429 at once (default: 2 x workers)")
	fl.DurationVar(&drain, "drain", 30*time.Second, "on SIGTERM, longest wait for requests in flight")
	c.RunE = func(cmd *cobra.Command, _ []string) error {
		if data == "" {
			return badInputf("--data is required: the directory of routes, aircraft and weather files")
		}
		if (cert == "") != (key == "") {
			return badInputf("--tls-cert and --tls-key go together")
		}
		if cert != "" {
			if _, err := tls.LoadX509KeyPair(cert, key); err != nil {
				return badInputf("--tls-cert/--tls-key: %v", err)
			}
		}
		if timeout <= 0 || workers < 0 || queue < 0 || queueWait <= 0 || drain < 0 {
			return badInputf("--timeout and --queue-wait must be positive, --workers, --queue and --drain not negative")
		}
		if db == "" {
			db = filepath.Join(data, "levelpath-records.db")
		}
		logger := log.New(cmd.ErrOrStderr(), "levelpath serve: ", log.LstdFlags|log.LUTC)
		s, err := serve.New(serve.Config{DataDir: data, DB: db, TokensFile: tokens, Version: version,
			Timeout: timeout, Workers: workers, Queue: queue, QueueWait: queueWait, Logger: logger})
		if err != nil {
			return badInput(err)
		}
		defer s.Close()
		if err := s.CheckListen(addr); err != nil {
			return badInput(err)
		}
		ln, err := net.Listen("tcp", addr)
		if err != nil {
			return badInputf("--addr %s: %v", addr, err)
		}
		scheme := "http"
		if cert != "" {
			scheme = "https"
		}
		if s.Authenticated() {
			logger.Printf("bearer tokens from %s required", tokens)
		} else {
			logger.Printf("no --tokens: no authentication, listening on loopback only")
		}
		logger.Printf("serving %s://%s/ (data %s, records %s)", scheme, ln.Addr(), data, db)
		ctx, stop := signal.NotifyContext(context.Background(), syscall.SIGTERM, syscall.SIGINT)
		defer stop()
		if err := s.Serve(ctx, ln, cert, key, drain); err != nil {
			return err
		}
		logger.Printf("stopped")
		return nil
	}
	return c
}
