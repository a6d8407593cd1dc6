package ingest

import (
	"bytes"
	"encoding/json"
	"fmt"
)

// SchemaKinds are the YAML kinds of the archive, in the order gtpack init
// and gtpack schema list them.
var SchemaKinds = []string{"run", "station", "reference", "spec", "lab", "approval"}

// kindTitles say what each kind's file is.
var kindTitles = map[string]string{
	"run":       "gtpack run.yaml: one test run of one unit",
	"station":   "gtpack stations/<id>.yaml: a test range and the uncertainty terms it adds",
	"reference": "gtpack references/<id>.yaml: a reference antenna's calibration",
	"spec":      "gtpack specs/<product>.yaml: acceptance limits of a product and its beam plan",
	"lab":       "gtpack lab.yaml: the issuing laboratory",
	"approval":  "gtpack approvals/<serial>/*.yaml: an approval of an issued report",
}

// kindFields are the top-level keys of each kind, and the rules the field
// list cannot say.
func kindFields(kind string) ([]field, []kv, bool) {
	switch kind {
	case "run":
		return runFields, nil, true
	case "station":
		return stationFields, nil, true
	case "reference":
		return referenceFields, referenceRule, true
	case "spec":
		return specFields, nil, true
	case "lab":
		return labFields, nil, true
	case "approval":
		return approvalFields, nil, true
	}
	return nil, nil, false
}

// SchemaFileName is the name gtpack init gives kind's schema in .schemas/.
func SchemaFileName(kind string) string { return kind + ".schema.json" }

// Schema returns the JSON Schema (draft 2020-12) of a YAML kind of the
// archive (SchemaKinds), made from the same field lists the strict reader
// declares its keys with.
func Schema(kind string) ([]byte, error) {
	fields, rule, ok := kindFields(kind)
	if !ok {
		return nil, fmt.Errorf("unknown kind %q; expected one of run, station, reference, spec, lab, approval", kind)
	}
	root := obj(
		kv{"$schema", "https://json-schema.org/draft/2020-12/schema"},
		kv{"$id", "https://gtpack.example/schema/1/" + SchemaFileName(kind)},
		kv{"title", kindTitles[kind]},
	)
	root = append(root, mapSchema(fields, rule)...)
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(root); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// kv is one key of an ordered JSON object.
type kv struct {
	k string
	v any
}

// object is a JSON object whose keys keep their order.
type object []kv

func obj(kvs ...kv) object { return object(kvs) }

func (o object) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, e := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		k, _ := json.Marshal(e.k)
		b.Write(k)
		b.WriteByte(':')
		var v bytes.Buffer
		enc := json.NewEncoder(&v)
		enc.SetEscapeHTML(false)
		if err := enc.Encode(e.v); err != nil {
			return nil, err
		}
		b.Write(bytes.TrimRight(v.Bytes(), "\n"))
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// identPattern is CheckIdentifier's rule as a regular expression (ECMA
// 262 and Python alike): 1 to 64 of A-Z a-z 0-9 . _ -, starting with a
// letter or digit, not ending in '.', not a reserved device name with or
// without an extension.
const identPattern = `^(?!(?:[Cc][Oo][Nn]|[Pp][Rr][Nn]|[Aa][Uu][Xx]|[Nn][Uu][Ll]|[Cc][Oo][Mm][1-9]|[Ll][Pp][Tt][1-9])(?:\.|$))[A-Za-z0-9](?:[A-Za-z0-9._-]{0,62}[A-Za-z0-9_-])?$`

func mapSchema(fields []field, extra []kv) object {
	props := object{}
	var req []string
	for _, f := range fields {
		s := valueSchema(f.shape)
		if f.expect != "" {
			s = append(object{{"description", f.expect}}, s...)
		}
		props = append(props, kv{f.key, s})
		if f.req {
			req = append(req, f.key)
		}
	}
	o := obj(kv{"type", "object"}, kv{"properties", props})
	if len(req) > 0 {
		o = append(o, kv{"required", req})
	}
	o = append(o, kv{"additionalProperties", false})
	return append(o, extra...)
}

func valueSchema(s *shape) object {
	if s == nil {
		return object{}
	}
	var o object
	bounds := func() {
		if s.min != nil {
			if s.exMin {
				o = append(o, kv{"exclusiveMinimum", *s.min})
			} else {
				o = append(o, kv{"minimum", *s.min})
			}
		}
		if s.max != nil {
			if s.exMax {
				o = append(o, kv{"exclusiveMaximum", *s.max})
			} else {
				o = append(o, kv{"maximum", *s.max})
			}
		}
	}
	switch s.kind {
	case kText:
		// The reader takes any non-blank scalar as text (a number or a
		// boolean reads as its text).
		o = obj(kv{"type", []string{"string", "number", "boolean"}})
		p := `\S`
		if s.pattern != "" {
			p = s.pattern
		}
		o = append(o, kv{"pattern", p})
	case kString:
		o = obj(kv{"type", "string"}, kv{"pattern", `\S`})
	case kIdent:
		o = obj(kv{"type", []string{"string", "number"}}, kv{"pattern", identPattern})
	case kNumber:
		o = obj(kv{"type", "number"})
		bounds()
	case kInteger:
		o = obj(kv{"type", "integer"})
		bounds()
	case kBool:
		o = obj(kv{"type", "boolean"})
	case kDate:
		o = obj(kv{"type", "string"}, kv{"pattern", `^[0-9]{4}-[0-9]{2}-[0-9]{2}$`})
	case kInstant:
		o = obj(kv{"type", "string"}, kv{"pattern", `^[0-9]{4}-[0-9]{2}-[0-9]{2}[Tt][0-9]{2}:[0-9]{2}:[0-9]{2}(?:\.[0-9]+)?(?:[Zz]|[+-][0-9]{2}:[0-9]{2})$`})
	case kEnum:
		o = obj(kv{"enum", s.enum})
	case kConst:
		o = obj(kv{"const", int(*s.min)})
	case kList:
		o = obj(kv{"type", "array"}, kv{"items", valueSchema(s.items)})
		if s.minItems > 0 {
			o = append(o, kv{"minItems", s.minItems})
		}
		if s.maxItems > 0 {
			o = append(o, kv{"maxItems", s.maxItems})
		}
		if s.unique {
			o = append(o, kv{"uniqueItems", true})
		}
	case kTuple:
		items := make([]any, len(s.tuple))
		for i, t := range s.tuple {
			items[i] = valueSchema(t)
		}
		o = obj(kv{"type", "array"}, kv{"prefixItems", items}, kv{"items", false}, kv{"minItems", len(s.tuple)})
	case kMap:
		o = mapSchema(s.fields, nil)
	case kDict:
		o = obj(kv{"type", "object"}, kv{"propertyNames", obj(kv{"pattern", identPattern})}, kv{"additionalProperties", valueSchema(s.values)})
	case kAnyOf:
		alts := make([]any, len(s.alts))
		for i, a := range s.alts {
			alts[i] = valueSchema(a)
		}
		o = obj(kv{"anyOf", alts})
	}
	return append(o, s.extra...)
}
