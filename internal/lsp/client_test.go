package lsp

import (
	"context"
	"encoding/json"
	"net"
	"sync"
	"testing"
	"time"

	"go.lsp.dev/jsonrpc2"
	"go.lsp.dev/protocol"

	"github.com/rfledger/rfledger/internal/rflib"
)

// client is a language client for the tests: it talks to a real server over an in-memory
// pipe with the same framing an editor uses, and keeps every diagnostics notification.
type client struct {
	t    testing.TB
	conn jsonrpc2.Conn
	done chan error

	mu    sync.Mutex
	diags map[protocol.DocumentURI][]protocol.PublishDiagnosticsParams
	wake  chan struct{}
}

func newClient(t testing.TB, opt Options) *client {
	t.Helper()
	if opt.Library == nil {
		opt.Library = rflib.Library()
	}
	a, b := net.Pipe()
	c := &client{t: t, done: make(chan error, 1), diags: map[protocol.DocumentURI][]protocol.PublishDiagnosticsParams{}, wake: make(chan struct{}, 1)}
	go func() { c.done <- Serve(context.Background(), a, opt) }()
	c.conn = jsonrpc2.NewConn(jsonrpc2.NewStream(b))
	c.conn.Go(context.Background(), func(ctx context.Context, reply jsonrpc2.Replier, req jsonrpc2.Request) error {
		if req.Method() == "textDocument/publishDiagnostics" {
			var p protocol.PublishDiagnosticsParams
			if err := json.Unmarshal(req.Params(), &p); err != nil {
				c.t.Errorf("publishDiagnostics: %v", err)
			}
			c.mu.Lock()
			c.diags[p.URI] = append(c.diags[p.URI], p)
			c.mu.Unlock()
			select {
			case c.wake <- struct{}{}:
			default:
			}
		}
		return reply(ctx, nil, nil)
	})
	t.Cleanup(func() { c.conn.Close() })
	return c
}

// call sends a request and decodes its result into res.
func (c *client) call(method string, params, res any) {
	c.t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	if _, err := c.conn.Call(ctx, method, params, res); err != nil {
		c.t.Fatalf("%s: %v", method, err)
	}
}

func (c *client) notify(method string, params any) {
	c.t.Helper()
	if err := c.conn.Notify(context.Background(), method, params); err != nil {
		c.t.Fatalf("%s: %v", method, err)
	}
}

// waitDiags waits for the diagnostics of uri at version (0: any) and returns them.
func (c *client) waitDiags(uri protocol.DocumentURI, version int32) []protocol.Diagnostic {
	c.t.Helper()
	deadline := time.After(60 * time.Second)
	for {
		c.mu.Lock()
		for _, p := range c.diags[uri] {
			if version == 0 || p.Version == uint32(version) {
				c.diags[uri] = nil
				c.mu.Unlock()
				return p.Diagnostics
			}
		}
		c.mu.Unlock()
		select {
		case <-c.wake:
		case <-time.After(5 * time.Millisecond):
		case <-deadline:
			c.t.Fatalf("no diagnostics for %s version %d", uri, version)
		}
	}
}

func (c *client) initialize() {
	c.t.Helper()
	var res struct {
		Capabilities struct {
			InlayHintProvider bool `json:"inlayHintProvider"`
			TextDocumentSync  struct {
				Change int `json:"change"`
			} `json:"textDocumentSync"`
			HoverProvider      bool `json:"hoverProvider"`
			DefinitionProvider bool `json:"definitionProvider"`
		} `json:"capabilities"`
	}
	c.call("initialize", protocol.InitializeParams{}, &res)
	caps := res.Capabilities
	if !caps.InlayHintProvider || caps.TextDocumentSync.Change != 2 || !caps.HoverProvider || !caps.DefinitionProvider {
		c.t.Fatalf("initialize: capabilities %+v", caps)
	}
	c.notify("initialized", struct{}{})
}

func (c *client) open(uri protocol.DocumentURI, text string) {
	c.notify("textDocument/didOpen", protocol.DidOpenTextDocumentParams{TextDocument: protocol.TextDocumentItem{URI: uri, LanguageID: "toml", Version: 1, Text: text}})
}

// edit replaces a range of the document with text (an incremental change).
func (c *client) edit(uri protocol.DocumentURI, version int32, r protocol.Range, text string) {
	c.notify("textDocument/didChange", map[string]any{
		"textDocument":   map[string]any{"uri": uri, "version": version},
		"contentChanges": []map[string]any{{"range": r, "text": text}},
	})
}

func (c *client) hints(uri protocol.DocumentURI, lines int) []inlayHint {
	var hs []inlayHint
	c.call("textDocument/inlayHint", inlayHintParams{TextDocument: protocol.TextDocumentIdentifier{URI: uri}, Range: protocol.Range{End: protocol.Position{Line: uint32(lines)}}}, &hs)
	return hs
}

func (c *client) shutdown() {
	c.t.Helper()
	c.call("shutdown", nil, nil)
	c.notify("exit", nil)
	select {
	case err := <-c.done:
		if err != nil {
			c.t.Errorf("server: %v", err)
		}
	case <-time.After(10 * time.Second):
		c.t.Errorf("server did not stop after exit")
	}
}

func pos(line, char int) protocol.Position {
	return protocol.Position{Line: uint32(line), Character: uint32(char)}
}
