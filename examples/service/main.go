// Command service is a small HTTP service that classifies client sessions
// with the session-triage model compiled into it (SYNTHETIC training data,
// see examples/triage).
//
//	POST /classify  {"features": {"req_per_min": 3.1, "agent_family": "browser", "resp_kb": null, ...}}
//	                    one session by input name, with raw values: numbers,
//	                    strings for category inputs, null for a missing value
//	                {"rows": [[3.1, 0.02, ...], ...]}  sessions as rows in the model's input order
//	GET  /healthz   the model's classes and inputs
//	POST /reload    re-read the model file given by -model and swap it in
//
// The model's own encoder turns the raw values into the net's inputs, as in
// training: a missing value is filled by its input's rule, or refused. Bad
// requests get status 400 and a JSON body {"field": ..., "error": ...}
// naming the offending field, e.g. "features.agent_family" or "rows[2][5]".
//
// The model sits behind an atomic.Pointer: a request loads it once and
// uses that model to the end, so a reload never mixes two models in one
// answer and needs no lock.
//
// Run it from the repository root:
//
//	go run ./examples/service [-addr 127.0.0.1:8080] [-model path/to/model.seine.json]
package main

import (
	"context"
	"embed"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"log"
	"net"
	"net/http"
	"os"
	"os/signal"
	"slices"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/nn"
)

// files holds the model written by `go run ./examples/service/gen`.
//
//go:embed triage.seine.json
var files embed.FS

const embeddedName = "triage.seine.json"

func main() {
	flags := flag.NewFlagSet("service", flag.ExitOnError)
	addr := flags.String("addr", "127.0.0.1:8080", "address to listen on")
	model := flags.String("model", "", "model file to serve and re-read on POST /reload; empty serves the embedded model")
	flags.Parse(os.Args[1:])

	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	logger := log.New(os.Stderr, "service: ", log.LstdFlags)
	if err := run(ctx, *addr, *model, logger); err != nil {
		logger.Print(err)
		os.Exit(1)
	}
}

// run serves on addr until ctx is done, then shuts down gracefully.
func run(ctx context.Context, addr, modelPath string, logger *log.Logger) error {
	s, err := newServer(modelPath, logger)
	if err != nil {
		return err
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return err
	}
	logger.Printf("listening on %s", ln.Addr())
	return s.serve(ctx, ln)
}

// server answers classification requests with the current model.
type server struct {
	model     atomic.Pointer[served]
	modelPath string // file re-read by /reload; "" means the embedded model, no reload
	logger    *log.Logger
}

// served is a model with its inputs bound in the order requests use.
type served struct {
	m *nn.Model
	b *nn.Binding
}

// serve binds m's inputs in their own order.
func bind(m *nn.Model) (*served, error) {
	b, err := m.Bind(m.Features())
	if err != nil {
		return nil, err
	}
	return &served{m: m, b: b}, nil
}

// newServer loads the model from modelPath, or the embedded one when
// modelPath is empty.
func newServer(modelPath string, logger *log.Logger) (*server, error) {
	if logger == nil {
		logger = log.New(io.Discard, "", 0)
	}
	s := &server{modelPath: modelPath, logger: logger}
	var m *nn.Model
	var err error
	if modelPath == "" {
		m, err = nn.LoadFS(files, embeddedName)
	} else {
		m, err = nn.Load(modelPath)
	}
	if err != nil {
		return nil, err
	}
	sv, err := bind(m)
	if err != nil {
		return nil, err
	}
	s.model.Store(sv)
	return s, nil
}

// handler returns the routes of the service.
func (s *server) handler() http.Handler {
	mux := http.NewServeMux()
	mux.HandleFunc("POST /classify", s.classify)
	mux.HandleFunc("GET /healthz", s.healthz)
	mux.HandleFunc("POST /reload", s.reload)
	return mux
}

// shutdownGrace is how long in-flight requests may take after a signal.
const shutdownGrace = 10 * time.Second

// serve answers on ln until ctx is done, then stops accepting connections
// and waits up to shutdownGrace for requests in flight.
func (s *server) serve(ctx context.Context, ln net.Listener) error {
	srv := &http.Server{
		Handler:           s.handler(),
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       30 * time.Second,
		WriteTimeout:      30 * time.Second,
		IdleTimeout:       2 * time.Minute,
		ErrorLog:          s.logger,
	}
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	select {
	case err := <-errc:
		return err
	case <-ctx.Done():
	}
	s.logger.Print("shutting down")
	sctx, cancel := context.WithTimeout(context.Background(), shutdownGrace)
	defer cancel()
	err := srv.Shutdown(sctx)
	if serr := <-errc; !errors.Is(serr, http.ErrServerClosed) && err == nil {
		err = serr
	}
	return err
}

// maxBody is the largest request body read, in bytes.
const maxBody = 1 << 20

func (s *server) classify(w http.ResponseWriter, r *http.Request) {
	sv := s.model.Load() // one model for the whole request
	m := sv.m
	rows, single, ferr := parseRequest(http.MaxBytesReader(w, r.Body, maxBody), m.Features())
	if ferr != nil {
		status := http.StatusBadRequest
		var tooBig *http.MaxBytesError
		if errors.As(ferr.err, &tooBig) {
			status = http.StatusRequestEntityTooLarge
		}
		writeError(w, status, ferr.field, ferr.Error())
		return
	}
	results := make([]result, len(rows))
	p := make([]float64, len(m.Classes()))
	for i, x := range rows {
		p, err := sv.b.Probabilities(p, x)
		if err != nil {
			field := "features"
			var fe *encode.FieldError
			if errors.As(err, &fe) {
				field += "." + fe.Field
				if !single {
					field = fmt.Sprintf("rows[%d][%d]", i, slices.Index(m.Features(), fe.Field))
				}
			}
			writeError(w, http.StatusBadRequest, field, fmt.Sprintf("%s: %v", field, errors.Unwrap(err)))
			return
		}
		probs := make(map[string]float64, len(p))
		best := 0
		for k, v := range p {
			probs[m.Classes()[k]] = v
			if v > p[best] {
				best = k
			}
		}
		results[i] = result{Class: m.Classes()[best], Probabilities: probs}
	}
	if single {
		writeJSON(w, http.StatusOK, results[0])
		return
	}
	writeJSON(w, http.StatusOK, struct {
		Results []result `json:"results"`
	}{results})
}

// result is the answer for one session.
type result struct {
	Class         string             `json:"class"`
	Probabilities map[string]float64 `json:"probabilities"`
}

func (s *server) healthz(w http.ResponseWriter, r *http.Request) {
	m := s.model.Load().m
	type input struct {
		Name   string   `json:"name"`
		Type   string   `json:"type"`
		Levels []string `json:"levels,omitempty"`
	}
	var inputs []input
	for _, in := range m.Encoder().Inputs() {
		inputs = append(inputs, input{Name: in.Name, Type: in.Type.String(), Levels: in.Levels})
	}
	writeJSON(w, http.StatusOK, map[string]any{
		"status":   "ok",
		"classes":  m.Classes(),
		"features": m.Features(),
		"inputs":   inputs,
		"params":   m.Net().NumParams(),
	})
}

// reload re-reads the model file and swaps it in. On failure the previous
// model keeps serving.
func (s *server) reload(w http.ResponseWriter, r *http.Request) {
	if s.modelPath == "" {
		writeError(w, http.StatusConflict, "model", "model: serving the embedded model; start with -model to enable reload")
		return
	}
	m, err := nn.Load(s.modelPath)
	if err != nil {
		s.logger.Printf("reload %s: %v", s.modelPath, err)
		writeError(w, http.StatusInternalServerError, "model", fmt.Sprintf("model: reload failed, previous model kept: %v", err))
		return
	}
	sv, err := bind(m)
	if err != nil {
		writeError(w, http.StatusInternalServerError, "model", fmt.Sprintf("model: reload failed, previous model kept: %v", err))
		return
	}
	s.model.Store(sv)
	s.logger.Printf("reloaded %s", s.modelPath)
	writeJSON(w, http.StatusOK, map[string]any{"status": "reloaded", "params": m.Net().NumParams()})
}

func writeError(w http.ResponseWriter, status int, field, msg string) {
	writeJSON(w, status, struct {
		Field string `json:"field"`
		Error string `json:"error"`
	}{field, msg})
}

func writeJSON(w http.ResponseWriter, status int, v any) {
	w.Header().Set("Content-Type", "application/json")
	w.WriteHeader(status)
	json.NewEncoder(w).Encode(v) // the client may be gone; nothing to do about it
}
