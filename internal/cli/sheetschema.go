package cli

import (
	"bytes"
	"encoding/json"

	"github.com/rfledger/rfledger/engine"
)

// The JSON Schema of the worksheet format, for TOML editors and linters (taplo, and the
// editors built on it) to complete keys, show what each means and flag a misspelt one.
//
// It is built from the loader's own key lists (engine.WorksheetKeys), so a key the loader
// accepts is in the schema and no other. The shape of each key's value is said here, in
// valueSchemas; a key with none there still appears, taking any value.
//
// It is draft-07, which taplo reads. One thing it cannot see: whether a table was written
// inline. The loader reads power = { tol = "1 dB", x = "2 dB" } as a misspelt long form but
// [power] with the same two keys as a group, and in JSON both are one object, so the schema
// takes both as a group (the loader still reports the first).

type obj = map[string]any

// quantityPattern is what a quantity's text starts with: "=" (a formula), or the number the
// unit parser reads first (a sign, ASCII or U+2212, then a digit or a point and a digit).
const quantityPattern = `^\s*(=|[-+−]?\.?[0-9])`

// valuePattern is a number with an optional unit, without a formula.
const valuePattern = `^\s*[-+−]?\.?[0-9]`

func ref(name string) obj { return obj{"$ref": "#/definitions/" + name} }

// described gives a value schema a key's description; a $ref is wrapped in allOf, since
// draft-07 ignores the keywords beside a $ref.
func described(s obj, doc string) obj {
	out := obj{"description": doc}
	if _, isRef := s["$ref"]; isRef {
		out["allOf"] = []any{s}
		return out
	}
	for k, v := range s {
		out[k] = v
	}
	return out
}

func text() obj { return obj{"type": "string"} }

func listOf(items obj) obj { return obj{"type": "array", "items": items} }

// valueSchemas holds, for each table of the format, the shape of its keys' values.
func valueSchemas(ks engine.KeySet) map[string]map[string]obj {
	value := obj{"type": []any{"string", "number"}, "pattern": valuePattern}
	freq := obj{"type": "string", "pattern": valuePattern}
	band := obj{"type": "array", "items": freq, "minItems": 2, "maxItems": 2}
	names := obj{"type": "object", "propertyNames": obj{"pattern": ks.NamePattern}, "additionalProperties": text()}
	stage := map[string]obj{}
	for _, k := range ks.StageText {
		stage[k.Name] = text()
	}
	for _, k := range ks.StageValue {
		stage[k.Name] = ref("quantity")
	}
	return map[string]map[string]obj{
		"top": {
			"title": text(), "summary": text(), "focus": text(), "use": names,
			"require": listOf(ref("require")), "sweep": listOf(ref("sweep")), "solve": listOf(ref("solve")),
			"spurs": listOf(ref("spurs")), "products": listOf(ref("products")), "case": listOf(ref("case")),
		},
		"quantity": {
			"is":    {"type": []any{"string", "number"}, "pattern": quantityPattern},
			"tol":   {"type": []any{"string", "array"}, "pattern": valuePattern, "items": freq, "minItems": 2, "maxItems": 2},
			"sigma": {"type": "string", "pattern": valuePattern},
			"dist":  {"enum": stringsAny(ks.Dists)}, "note": text(), "show": text(), "source": text(),
			"export": {"type": []any{"boolean", "string"}, "pattern": ks.MacroPattern},
		},
		"stage":   stage,
		"group":   {"chain_input": ref("quantity"), "chain_bandwidth": ref("quantity"), "chain_backoff": ref("quantity")},
		"require": {"that": text(), "note": text()},
		"sweep": {
			"vary": text(), "from": value, "to": value,
			"steps": {"type": "integer", "minimum": 2, "maximum": engine.MaxSweepSteps},
			"scale": {"enum": []any{"lin", "linear", "log"}},
			"plot":  {"type": []any{"string", "array"}, "items": text()},
		},
		"solve": {
			"name": text(), "vary": text(), "so_that": text(), "equals": value,
			"within": {"type": "array", "items": value, "minItems": 2, "maxItems": 2},
		},
		"spurs": {
			"name": text(), "note": text(), "lo": ref("quantity"), "if": band, "rf": band,
			"order":  {"type": "integer"},
			"reject": {"type": "object", "propertyNames": obj{"pattern": ks.RejectPattern}, "additionalProperties": freq},
		},
		"case": {
			"name": text(), "note": text(), "focus": text(), "analyses": {"type": "boolean"},
			"set": {"type": "object", "additionalProperties": value},
		},
		"products": {
			"name": text(), "note": text(), "order": {"type": "integer"},
			"tones":   {"type": "array", "items": freq, "minItems": 1},
			"protect": {"type": "array", "items": band, "minItems": 1},
		},
	}
}

func stringsAny(ss []string) []any {
	out := make([]any, len(ss))
	for i, s := range ss {
		out[i] = s
	}
	return out
}

// tableKeys lists the keys of each table of the format, under the names valueSchemas uses.
func tableKeys(ks engine.KeySet) map[string][]engine.Key {
	return map[string][]engine.Key{
		"top": ks.Top, "quantity": ks.Quantity, "stage": append(append([]engine.Key{}, ks.StageText...), ks.StageValue...),
		"require": ks.Require, "sweep": ks.Sweep, "solve": ks.Solve, "spurs": ks.Spurs, "products": ks.Products, "case": ks.Case,
		"group": ks.ChainGroup,
	}
}

// properties gives every key of a table its value schema and description, and lists the
// required ones.
func properties(keys []engine.Key, values map[string]obj) (obj, []any) {
	props := obj{}
	var required []any
	for _, k := range keys {
		v, ok := values[k.Name]
		if !ok {
			v = obj{}
		}
		props[k.Name] = described(v, k.Doc)
		if k.Required {
			required = append(required, k.Name)
		}
	}
	return props, required
}

// closedTable is a table that takes exactly the keys given.
func closedTable(keys []engine.Key, values map[string]obj, doc string) obj {
	props, required := properties(keys, values)
	t := obj{"type": "object", "description": doc, "properties": props, "additionalProperties": false}
	if len(required) > 0 {
		t["required"] = required
	}
	return t
}

// worksheetSchema builds the schema as indented JSON.
func worksheetSchema() ([]byte, error) {
	ks := engine.WorksheetKeys()
	values := valueSchemas(ks)
	tables := tableKeys(ks)
	top, _ := properties(ks.Top, values["top"])
	for _, b := range ks.Builtins {
		top[b] = obj{"not": obj{}, "description": b + " is built in (pi, c0 the speed of light, kB Boltzmann's constant, T0 = 290 K) and cannot be redefined; choose another name."}
	}
	groupKeys, _ := properties(ks.ChainGroup, values["group"])
	var qkeys []any
	for _, k := range ks.Quantity {
		qkeys = append(qkeys, k.Name)
	}
	defs := obj{
		"quantity": obj{
			"description": `A quantity: a number, a number with its unit in quotes ("14 dBm"), a formula ("= power - cable"), or the long form { is = "14 dBm", tol = "1 dB" }.`,
			"type":        []any{"string", "number", "object"}, "pattern": quantityPattern,
			"if": obj{"type": "object"}, "then": ref("longForm"),
		},
		"longForm": closedTable(ks.Quantity, values["quantity"], `A quantity's long form: is, with what is known about it.`),
		"member": obj{
			"description": `A name of the sheet: a quantity ("14 dBm", "= formula", a number or { is = ... }), a group of them ([name]) or a chain of stages ([[name]]).`,
			"type":        []any{"string", "number", "object", "array"}, "pattern": quantityPattern,
			"allOf": []any{
				obj{"if": obj{"type": "object"}, "then": ref("table")},
				obj{"if": obj{"type": "array"}, "then": ref("chain")},
			},
		},
		"table": obj{"if": obj{"required": []any{"is"}}, "then": ref("longForm"), "else": ref("group")},
		"group": obj{
			"description":          "A group: its keys name quantities, nested groups and chains; a group that holds a chain may give it chain_input, chain_bandwidth and chain_backoff.",
			"type":                 "object",
			"properties":           groupKeys,
			"propertyNames":        obj{"pattern": ks.NamePattern},
			"additionalProperties": ref("member"),
			// A table of nothing but long-form keys is a long form that lacks is, as the loader reads it.
			"if":   obj{"propertyNames": obj{"enum": qkeys}, "minProperties": 1},
			"then": obj{"required": []any{"is"}},
		},
		"chain": obj{"description": "A chain: its stages in signal order, each a [[name]] table.", "type": "array", "items": ref("stage")},
		"stage": closedTable(tables["stage"], values["stage"], "A stage of a chain: its label and values; functions such as cascade_nf(chain) take the chain."),
	}
	for _, name := range []string{"require", "sweep", "solve", "spurs", "products", "case"} {
		doc := ""
		for _, k := range ks.Top {
			if k.Name == name {
				doc = k.Doc
			}
		}
		defs[name] = closedTable(tables[name], values[name], doc)
	}
	s := obj{
		"$schema":              "http://json-schema.org/draft-07/schema#",
		"title":                "rfledger worksheet",
		"description":          "An RF link or receiver budget kept as a TOML worksheet (rfledger). Its own keys are below; every other key names a quantity, a group or a chain. Write it with: rfledger schema > rfledger.schema.json, and point a sheet at it with a first line #:schema ./rfledger.schema.json",
		"type":                 "object",
		"properties":           top,
		"propertyNames":        obj{"pattern": ks.NamePattern},
		"additionalProperties": ref("member"),
		"definitions":          defs,
	}
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false) // formulas hold >= and <=
	enc.SetIndent("", "  ")
	if err := enc.Encode(s); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
