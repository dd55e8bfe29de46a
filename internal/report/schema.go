package report

import _ "embed"

// RenderSchema is the JSON Schema (draft 2020-12) of the JSON contract written by JSON.
//
//go:embed schema/render.schema.json
var RenderSchema []byte

// CheckSchema is the JSON Schema (draft 2020-12) of the check verdicts written by CheckJSON.
//
//go:embed schema/check.schema.json
var CheckSchema []byte
