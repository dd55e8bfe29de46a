// Package lsp is rfledger's language server: it speaks the Language Server Protocol over a
// stream (standard input and output for `rfledger lsp`), evaluates each open worksheet as it
// is typed, and answers the editor with the values of the quantities beside their lines
// (inlay hints), every error and warning of the worksheet (diagnostics), hovers, completions,
// definitions and references.
//
// Each open document keeps its last load and evaluation; an edit loads the worksheet again
// with the earlier load as engine.Options.Previous (unchanged formulas are not parsed again)
// and evaluates it with EvalFrom (only what the edit changed is computed again). Parts that
// a worksheet uses are read from the editor's open buffers when they are open and from disk
// otherwise. A document that cannot be evaluated keeps its last good values, marked stale.
//
// The JSON-RPC framing and the protocol's types come from go.lsp.dev/jsonrpc2 and
// go.lsp.dev/protocol; inlay hints, newer than that module, are declared in protocol.go.
package lsp
