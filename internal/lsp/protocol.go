package lsp

import "go.lsp.dev/protocol"

// The parts of LSP 3.17 that go.lsp.dev/protocol (written for 3.16) does not declare, and
// the one message whose type there cannot tell an absent field from a zero one.

// inlayHintParams is the parameter of textDocument/inlayHint.
type inlayHintParams struct {
	TextDocument protocol.TextDocumentIdentifier `json:"textDocument"`
	Range        protocol.Range                  `json:"range"`
}

// inlayHint is one hint shown at a position in the document.
type inlayHint struct {
	Position    protocol.Position `json:"position"`
	Label       string            `json:"label"`
	Tooltip     string            `json:"tooltip,omitempty"`
	PaddingLeft bool              `json:"paddingLeft,omitempty"`
}

// serverCapabilities adds inlayHintProvider to the 3.16 capabilities.
type serverCapabilities struct {
	protocol.ServerCapabilities
	InlayHintProvider bool `json:"inlayHintProvider,omitempty"`
}

type initializeResult struct {
	Capabilities serverCapabilities  `json:"capabilities"`
	ServerInfo   protocol.ServerInfo `json:"serverInfo"`
}

// initializeParams holds what the server reads of the client's initialize request; the
// 3.17 inlay hint refresh capability among it.
type initializeParams struct {
	Capabilities struct {
		Workspace struct {
			InlayHint struct {
				RefreshSupport bool `json:"refreshSupport"`
			} `json:"inlayHint"`
		} `json:"workspace"`
	} `json:"capabilities"`
}

// changeEvent is one change of textDocument/didChange: a range and its new text, or the
// whole new text when the range is absent (protocol.TextDocumentContentChangeEvent holds the
// range by value, so a whole-text change would read as an insertion at 0:0).
type changeEvent struct {
	Range *protocol.Range `json:"range,omitempty"`
	Text  string          `json:"text"`
}

type didChangeParams struct {
	TextDocument   protocol.VersionedTextDocumentIdentifier `json:"textDocument"`
	ContentChanges []changeEvent                            `json:"contentChanges"`
}
