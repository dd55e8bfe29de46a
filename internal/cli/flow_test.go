package cli

import (
	"encoding/json"
	"testing"

	"github.com/rfledger/rfledger/internal/schematest"
)

// TestSignalFlowSchema: the render-output schema holds the rows of "signal_flow" to their
// shape: a demo's rows pass, a row of an unknown kind or without a level does not.
func TestSignalFlowSchema(t *testing.T) {
	_, schema, _ := run(t, "schema", "--render-output")
	code, out, stderr := run(t, "render", "../../worksheets/hill-relay-backhaul.toml", "--json", "--trials", "100")
	if code != ExitOK {
		t.Fatal(stderr)
	}
	if errs := schematest.Validate([]byte(schema), []byte(out)); len(errs) > 0 {
		t.Fatalf("the demo's JSON does not match the schema: %v", errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	rows, _ := doc["signal_flow"].([]any)
	if len(rows) < 10 {
		t.Fatalf("signal_flow has %d rows", len(rows))
	}
	for name, spoil := range map[string]func(map[string]any){
		"unknown kind":  func(r map[string]any) { r["kind"] = "bar" },
		"no level":      func(r map[string]any) { delete(r, "level") },
		"extra field":   func(r map[string]any) { r["share"] = 0.5 },
		"change a text": func(r map[string]any) { r["change"] = "-0.5 dB" },
	} {
		row := rows[1].(map[string]any)
		saved := map[string]any{}
		for k, v := range row {
			saved[k] = v
		}
		spoil(row)
		bad, _ := json.Marshal(doc)
		if errs := schematest.Validate([]byte(schema), bad); len(errs) == 0 {
			t.Errorf("%s: a spoilt signal_flow row passes the schema", name)
		}
		for k := range row {
			delete(row, k)
		}
		for k, v := range saved {
			row[k] = v
		}
	}
}
