// Package schematest checks JSON documents against the JSON Schemas rfledger ships, for the
// tests of the writers and the command line. It knows the part of JSON Schema draft 2020-12
// those schemas use (type, const, enum, properties, required, additionalProperties, items,
// minimum, maximum, maxProperties, oneOf, $ref to #/$defs) and refuses a schema that uses any
// other keyword, so a schema cannot say more than the tests check.
package schematest

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"sort"
	"strings"
)

// annotations are keywords that describe and do not constrain.
var annotations = map[string]bool{"$schema": true, "$id": true, "$defs": true, "title": true, "description": true, "$comment": true}

var known = map[string]bool{
	"type": true, "const": true, "enum": true, "properties": true, "required": true, "additionalProperties": true,
	"items": true, "minimum": true, "maximum": true, "maxProperties": true, "oneOf": true, "$ref": true,
}

// Validate checks doc against schema and returns every violation, each with the JSON path
// where it is ("$.sheets[0].verdict"); nil means the document is valid.
func Validate(schema, doc []byte) []string {
	var root, v any
	if err := decode(schema, &root); err != nil {
		return []string{"schema: " + err.Error()}
	}
	if err := decode(doc, &v); err != nil {
		return []string{"document: " + err.Error()}
	}
	c := &checker{root: root}
	c.check(root, v, "$")
	return c.errs
}

func decode(b []byte, v *any) error {
	d := json.NewDecoder(bytes.NewReader(b))
	d.UseNumber()
	if err := d.Decode(v); err != nil {
		return err
	}
	if d.More() {
		return fmt.Errorf("more than one JSON value")
	}
	return nil
}

type checker struct {
	root any
	errs []string
}

func (c *checker) fail(path, format string, args ...any) {
	c.errs = append(c.errs, path+": "+fmt.Sprintf(format, args...))
}

func (c *checker) check(schema, v any, path string) {
	s, ok := schema.(map[string]any)
	if !ok {
		if b, isBool := schema.(bool); isBool {
			if !b {
				c.fail(path, "not allowed here")
			}
			return
		}
		c.fail(path, "schema is not an object")
		return
	}
	for _, k := range sortedKeys(s) {
		if !known[k] && !annotations[k] {
			c.fail(path, "schema uses %q, which this checker does not know", k)
		}
	}
	if ref, ok := s["$ref"].(string); ok {
		c.check(c.resolve(ref, path), v, path)
	}
	if t, ok := s["type"]; ok && !typeOK(t, v) {
		c.fail(path, "is %s, want type %v", typeName(v), t)
		return
	}
	if k, ok := s["const"]; ok && !equal(k, v) {
		c.fail(path, "is %v, want %v", v, k)
	}
	if e, ok := s["enum"].([]any); ok && !contains(e, v) {
		c.fail(path, "is %v, want one of %v", v, e)
	}
	if n, ok := v.(json.Number); ok {
		c.bounds(s, n, path)
	}
	if o, ok := v.(map[string]any); ok {
		c.object(s, o, path)
	}
	if a, ok := v.([]any); ok {
		if items, ok := s["items"]; ok {
			for i, x := range a {
				c.check(items, x, fmt.Sprintf("%s[%d]", path, i))
			}
		}
	}
	if alts, ok := s["oneOf"].([]any); ok {
		matched := 0
		for _, alt := range alts {
			sub := &checker{root: c.root}
			sub.check(alt, v, path)
			if len(sub.errs) == 0 {
				matched++
			}
		}
		if matched != 1 {
			c.fail(path, "matches %d of the oneOf alternatives, want exactly 1", matched)
		}
	}
}

func (c *checker) bounds(s map[string]any, n json.Number, path string) {
	x, _ := n.Float64()
	if m, ok := s["minimum"].(json.Number); ok {
		if lo, _ := m.Float64(); x < lo {
			c.fail(path, "is %v, below the minimum %v", x, lo)
		}
	}
	if m, ok := s["maximum"].(json.Number); ok {
		if hi, _ := m.Float64(); x > hi {
			c.fail(path, "is %v, above the maximum %v", x, hi)
		}
	}
}

func (c *checker) object(s map[string]any, o map[string]any, path string) {
	if req, ok := s["required"].([]any); ok {
		for _, r := range req {
			if _, has := o[r.(string)]; !has {
				c.fail(path, "lacks the required %q", r)
			}
		}
	}
	if m, ok := s["maxProperties"].(json.Number); ok {
		if n, _ := m.Int64(); int64(len(o)) > n {
			c.fail(path, "has %d properties, at most %d allowed", len(o), n)
		}
	}
	props, _ := s["properties"].(map[string]any)
	extra, hasExtra := s["additionalProperties"]
	for _, k := range sortedKeys(o) {
		p := path + "." + k
		if ps, ok := props[k]; ok {
			c.check(ps, o[k], p)
		} else if hasExtra {
			c.check(extra, o[k], p)
		}
	}
}

func (c *checker) resolve(ref, path string) any {
	name, ok := strings.CutPrefix(ref, "#/$defs/")
	defs, _ := c.root.(map[string]any)["$defs"].(map[string]any)
	if def, found := defs[name]; ok && found {
		return def
	}
	c.fail(path, "schema reference %q does not resolve", ref)
	return true
}

func typeOK(t, v any) bool {
	switch t := t.(type) {
	case string:
		return isType(t, v)
	case []any:
		for _, x := range t {
			if s, ok := x.(string); ok && isType(s, v) {
				return true
			}
		}
	}
	return false
}

func isType(t string, v any) bool {
	switch t {
	case "null":
		return v == nil
	case "boolean":
		_, ok := v.(bool)
		return ok
	case "string":
		_, ok := v.(string)
		return ok
	case "number":
		_, ok := v.(json.Number)
		return ok
	case "integer":
		n, ok := v.(json.Number)
		if !ok {
			return false
		}
		f, err := n.Float64()
		return err == nil && f == math.Trunc(f)
	case "array":
		_, ok := v.([]any)
		return ok
	case "object":
		_, ok := v.(map[string]any)
		return ok
	}
	return false
}

func typeName(v any) string {
	for _, t := range []string{"null", "boolean", "string", "integer", "number", "array", "object"} {
		if isType(t, v) {
			return t
		}
	}
	return "unknown"
}

// equal compares JSON values, numbers by value (2 equals 2.0).
func equal(a, b any) bool {
	an, aok := a.(json.Number)
	bn, bok := b.(json.Number)
	if aok && bok {
		x, _ := an.Float64()
		y, _ := bn.Float64()
		return x == y
	}
	return reflect.DeepEqual(a, b)
}

func contains(list []any, v any) bool {
	for _, x := range list {
		if equal(x, v) {
			return true
		}
	}
	return false
}

func sortedKeys(m map[string]any) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}
