package lsp

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/url"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"time"

	"go.lsp.dev/jsonrpc2"
	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/engine"
)

// DefaultDebounce is how long the server waits after an edit before it evaluates the
// document and publishes its diagnostics, so that a burst of keystrokes is evaluated once.
// A request (inlay hints, hover, completion...) that arrives sooner evaluates at once.
const DefaultDebounce = 15 * time.Millisecond

// Options configure a language server.
type Options struct {
	// Library holds the functions formulas may call (rflib.Library() for rfledger's own).
	Library *engine.Library
	// Debounce is the pause after an edit before evaluation; 0 means DefaultDebounce.
	Debounce time.Duration
	// Version is what the server reports as its version in the initialize response.
	Version string
}

// Serve runs a language server on rwc (standard input and output, or one end of a pipe)
// until the client sends exit or closes the stream. It returns nil when the client asked
// for shutdown before it left, and an error otherwise (the LSP's exit code 1).
func Serve(ctx context.Context, rwc io.ReadWriteCloser, opt Options) error {
	if opt.Debounce <= 0 {
		opt.Debounce = DefaultDebounce
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	s := &server{opt: opt, ctx: ctx, docs: map[protocol.DocumentURI]*document{}}
	s.conn = jsonrpc2.NewConn(jsonrpc2.NewStream(rwc))
	s.conn.Go(ctx, s.handle)
	select {
	case <-s.conn.Done():
	case <-ctx.Done():
		s.conn.Close()
		<-s.conn.Done()
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, d := range s.docs {
		d.stopTimer()
	}
	s.closed = true
	if !s.shutdown {
		return errors.New("the client left without asking for shutdown")
	}
	return nil
}

// server is one client's session: its open documents and the connection.
type server struct {
	opt  Options
	ctx  context.Context
	conn jsonrpc2.Conn

	mu          sync.Mutex
	docs        map[protocol.DocumentURI]*document
	initialized bool
	shutdown    bool
	closed      bool
	refresh     bool // the client takes workspace/inlayHint/refresh
}

// handle answers one message. It runs on the connection's reading goroutine, so messages
// are handled in the order they came; it never returns an error (that would end the
// connection): a bad request gets an error reply, a bad notification is dropped.
func (s *server) handle(ctx context.Context, reply jsonrpc2.Replier, req jsonrpc2.Request) (err error) {
	defer func() {
		if p := recover(); p != nil {
			err = reply(ctx, nil, jsonrpc2.Errorf(jsonrpc2.InternalError, "rfledger lsp: %s: %v", req.Method(), p))
		}
	}()
	_, isCall := req.(*jsonrpc2.Call)
	s.mu.Lock()
	defer s.mu.Unlock()
	method := req.Method()
	if !s.initialized && method != "initialize" && method != "exit" {
		if isCall {
			return reply(ctx, nil, jsonrpc2.Errorf(jsonrpc2.ServerNotInitialized, "initialize first"))
		}
		return nil
	}
	if h, ok := requests[method]; ok {
		if !isCall {
			return nil
		}
		res, err := h(s, req.Params())
		return reply(ctx, res, err)
	}
	if h, ok := notifications[method]; ok {
		if err := h(s, req.Params()); err != nil && isCall {
			return reply(ctx, nil, err)
		}
		if isCall {
			return reply(ctx, nil, nil)
		}
		return nil
	}
	if isCall {
		return reply(ctx, nil, jsonrpc2.Errorf(jsonrpc2.MethodNotFound, "method %q is not supported", method))
	}
	return nil // notifications the server does not use ($/cancelRequest, $/setTrace, ...)
}

var (
	requests      map[string]func(s *server, params json.RawMessage) (any, error)
	notifications map[string]func(s *server, params json.RawMessage) error
)

func init() {
	requests = map[string]func(*server, json.RawMessage) (any, error){
		"initialize":              (*server).initialize,
		"shutdown":                func(s *server, _ json.RawMessage) (any, error) { s.shutdown = true; return nil, nil },
		"textDocument/inlayHint":  (*server).inlayHints,
		"textDocument/hover":      (*server).hover,
		"textDocument/completion": (*server).completion,
		"textDocument/definition": (*server).definition,
		"textDocument/references": (*server).references,
	}
	notifications = map[string]func(*server, json.RawMessage) error{
		"initialized":            func(*server, json.RawMessage) error { return nil },
		"exit":                   (*server).exit,
		"textDocument/didOpen":   (*server).didOpen,
		"textDocument/didChange": (*server).didChange,
		"textDocument/didClose":  (*server).didClose,
		"textDocument/didSave":   func(*server, json.RawMessage) error { return nil },
	}
}

// decode reads a message's parameters.
func decode(params json.RawMessage, v any) error {
	if err := json.Unmarshal(params, v); err != nil {
		return jsonrpc2.Errorf(jsonrpc2.InvalidParams, "%v", err)
	}
	return nil
}

func (s *server) initialize(params json.RawMessage) (any, error) {
	var p initializeParams
	if err := decode(params, &p); err != nil {
		return nil, err
	}
	s.initialized = true
	s.refresh = p.Capabilities.Workspace.InlayHint.RefreshSupport
	caps := serverCapabilities{InlayHintProvider: true}
	caps.TextDocumentSync = &protocol.TextDocumentSyncOptions{OpenClose: true, Change: protocol.TextDocumentSyncKindIncremental}
	caps.HoverProvider = true
	caps.DefinitionProvider = true
	caps.ReferencesProvider = true
	caps.CompletionProvider = &protocol.CompletionOptions{TriggerCharacters: []string{"."}}
	return initializeResult{Capabilities: caps, ServerInfo: protocol.ServerInfo{Name: "rfledger", Version: s.opt.Version}}, nil
}

func (s *server) exit(json.RawMessage) error {
	s.conn.Close()
	return nil
}

func (s *server) didOpen(params json.RawMessage) error {
	var p protocol.DidOpenTextDocumentParams
	if err := decode(params, &p); err != nil {
		return err
	}
	d := newDocument(p.TextDocument.URI, p.TextDocument.Text, p.TextDocument.Version)
	d.lib = s.opt.Library
	if old := s.docs[d.uri]; old != nil {
		old.stopTimer()
	}
	s.docs[d.uri] = d
	s.refreshDoc(d)
	s.touched(d)
	return nil
}

func (s *server) didChange(params json.RawMessage) error {
	var p didChangeParams
	if err := decode(params, &p); err != nil {
		return err
	}
	d := s.docs[p.TextDocument.URI]
	if d == nil {
		return nil
	}
	for _, c := range p.ContentChanges {
		d.change(c.Range, c.Text)
	}
	d.version = p.TextDocument.Version
	s.schedule(d)
	return nil
}

func (s *server) didClose(params json.RawMessage) error {
	var p protocol.DidCloseTextDocumentParams
	if err := decode(params, &p); err != nil {
		return err
	}
	d := s.docs[p.TextDocument.URI]
	if d == nil {
		return nil
	}
	d.stopTimer()
	delete(s.docs, d.uri)
	s.publish(d.uri, 0, []protocol.Diagnostic{})
	s.touched(d) // worksheets using it read the file on disk again
	return nil
}

// schedule evaluates a document once the debounce has passed with no further edit.
func (s *server) schedule(d *document) {
	d.dirty = true
	d.gen++
	gen := d.gen
	d.stopTimer()
	d.timer = time.AfterFunc(s.opt.Debounce, func() {
		s.mu.Lock()
		defer s.mu.Unlock()
		if s.closed || s.docs[d.uri] != d || d.gen != gen || !d.dirty {
			return
		}
		s.refreshDoc(d)
		s.touched(d)
		if s.refresh {
			go s.conn.Call(s.ctx, "workspace/inlayHint/refresh", nil, nil) //nolint:errcheck // a hint to the client only
		}
	})
}

// fresh returns the open document of a request, evaluated if it was edited since.
func (s *server) fresh(uri protocol.DocumentURI) (*document, error) {
	d := s.docs[uri]
	if d == nil {
		return nil, jsonrpc2.Errorf(jsonrpc2.InvalidParams, "%s is not open", uri)
	}
	if d.dirty {
		s.refreshDoc(d)
		s.touched(d)
	}
	return d, nil
}

// refreshDoc evaluates a document and publishes its diagnostics.
func (s *server) refreshDoc(d *document) {
	s.evaluate(d)
	s.publish(d.uri, d.version, s.diagnostics(d))
}

// touched schedules the evaluation of every other open worksheet that uses d's file as a part.
func (s *server) touched(d *document) {
	if d.path == "" {
		return
	}
	for _, o := range s.sortedDocs() {
		if o != d && o.uses(d.path) {
			s.schedule(o)
		}
	}
}

func (s *server) sortedDocs() []*document {
	out := make([]*document, 0, len(s.docs))
	for _, d := range s.docs {
		out = append(out, d)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].uri < out[j].uri })
	return out
}

func (s *server) publish(uri protocol.DocumentURI, version int32, diags []protocol.Diagnostic) {
	p := protocol.PublishDiagnosticsParams{URI: uri, Diagnostics: diags}
	if version > 0 {
		p.Version = uint32(version)
	}
	s.conn.Notify(s.ctx, "textDocument/publishDiagnostics", p) //nolint:errcheck // a broken stream ends the session anyway
}

// overlay returns the file system d is loaded from and its name in it: d's folder on disk
// with every open buffer of that folder's tree in place of its file.
func (s *server) overlay(d *document) (overlay, string) {
	if d.path == "" {
		return overlay{bufs: map[string]string{d.name: d.text.s}}, d.name
	}
	o := overlay{dir: filepath.Dir(d.path), bufs: map[string]string{}}
	for _, b := range s.docs {
		if b.path == "" {
			continue
		}
		rel, err := filepath.Rel(o.dir, b.path)
		if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
			continue
		}
		o.bufs[filepath.ToSlash(rel)] = b.text.s
	}
	return o, d.name
}

// uriPath returns the file path of a file: URI, or "" for any other.
func uriPath(u protocol.DocumentURI) string {
	p, err := url.Parse(string(u))
	if err != nil || p.Scheme != "file" || p.Path == "" {
		return ""
	}
	path := p.Path
	if len(path) > 2 && path[0] == '/' && path[2] == ':' { // file:///C:/...
		path = path[1:]
	}
	return filepath.Clean(filepath.FromSlash(path))
}

// fileURI returns the URI of a file path.
func fileURI(path string) protocol.DocumentURI {
	p := filepath.ToSlash(path)
	if !strings.HasPrefix(p, "/") {
		p = "/" + p
	}
	return protocol.DocumentURI((&url.URL{Scheme: "file", Path: p}).String())
}

// errorf is an error reply.
func errorf(format string, args ...any) error {
	return jsonrpc2.Errorf(jsonrpc2.InvalidParams, "%s", fmt.Sprintf(format, args...))
}
