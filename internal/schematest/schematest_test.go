package schematest

import (
	"strings"
	"testing"
)

// The cases follow the meaning of each keyword in JSON Schema draft 2020-12 (json-schema.org,
// "JSON Schema Validation", sections 6.1 to 6.5, and "JSON Schema Core", 10.2 and 10.3).
func TestValidate(t *testing.T) {
	schema := `{"type": "object", "required": ["a"], "additionalProperties": false,
	  "properties": {
	    "a": {"const": 2},
	    "b": {"type": ["number", "null"], "minimum": 0, "maximum": 1},
	    "c": {"type": "array", "items": {"$ref": "#/$defs/s"}},
	    "d": {"oneOf": [{"type": "object", "maxProperties": 0}, {"type": "object", "required": ["x"]}]},
	    "e": {"enum": ["p", "q"]},
	    "f": {"type": "integer"},
	    "g": {"type": "object", "additionalProperties": {"type": "string"}}
	  },
	  "$defs": {"s": {"type": "string"}}}`
	for _, c := range []struct {
		doc  string
		want string // a substring of the first violation, "" for a valid document
	}{
		{`{"a": 2}`, ""},
		{`{"a": 2.0, "b": null, "c": ["x"], "d": {}, "e": "q", "f": 3, "g": {"k": "v"}}`, ""},
		{`{"a": 2, "d": {"x": 1}}`, ""},
		{`{}`, `lacks the required "a"`},
		{`{"a": 3}`, "want 2"},
		{`{"a": 2, "z": 1}`, "$.z: not allowed"},
		{`{"a": 2, "b": 1.5}`, "above the maximum"},
		{`{"a": 2, "b": -1}`, "below the minimum"},
		{`{"a": 2, "b": "1"}`, "want type"},
		{`{"a": 2, "c": ["x", 1]}`, "$.c[1]: is integer"},
		{`{"a": 2, "d": {"y": 1}}`, "matches 0 of the oneOf"},
		{`{"a": 2, "e": "r"}`, "want one of"},
		{`{"a": 2, "f": 1.5}`, "want type integer"},
		{`{"a": 2, "g": {"k": 1}}`, "$.g.k: is integer"},
		{`{"a": 2} {}`, "more than one JSON value"},
	} {
		errs := Validate([]byte(schema), []byte(c.doc))
		switch {
		case c.want == "" && len(errs) > 0:
			t.Errorf("%s: want valid, got %v", c.doc, errs)
		case c.want != "" && (len(errs) == 0 || !strings.Contains(errs[0], c.want)):
			t.Errorf("%s: want %q, got %v", c.doc, c.want, errs)
		}
	}
}

func TestUnknownKeywordRefused(t *testing.T) {
	errs := Validate([]byte(`{"type": "string", "pattern": "^a"}`), []byte(`"b"`))
	if len(errs) != 1 || !strings.Contains(errs[0], `"pattern"`) {
		t.Errorf("a keyword the checker does not implement must be refused, got %v", errs)
	}
	if errs := Validate([]byte(`{"$ref": "#/$defs/none"}`), []byte(`1`)); len(errs) == 0 {
		t.Error("a dangling $ref must be refused")
	}
}
