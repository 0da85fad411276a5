package schema

import (
	"bytes"
	"errors"
	"fmt"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"

	"github.com/santhosh-tekuri/jsonschema/v6"
	jskind "github.com/santhosh-tekuri/jsonschema/v6/kind"
	"golang.org/x/text/language"
	"golang.org/x/text/message"
)

// BaseURL is the prefix of every schema's $id. The .invalid top-level
// domain is reserved (RFC 2606), so nothing is ever fetched from it.
const BaseURL = "https://auscult.invalid/schema/"

// StampPattern is the regular expression of every time the agent sends
// (publish.Stamp): UTC RFC 3339 with exactly three fractional digits and
// "Z". The schemas also assert the "date-time" format, which rejects
// impossible dates the pattern lets through.
const StampPattern = `^[0-9]{4}-(0[1-9]|1[0-2])-(0[1-9]|[12][0-9]|3[01])T([01][0-9]|2[0-3]):[0-5][0-9]:[0-5][0-9]\.[0-9]{3}Z$`

// Kinds lists the message kinds that have a schema, in topic order.
var Kinds = []string{"status", "alarm", "summary", "diagnostic", "state", "command", "response"}

// compiled is one kind's schema, compiled on first use.
type compiled struct {
	once sync.Once
	sch  *jsonschema.Schema
	err  error
}

// cache is written only by init; each entry's once guards its fields, so
// Validate is safe for concurrent use.
var cache = map[string]*compiled{}

func init() {
	for _, k := range Kinds {
		cache[k] = &compiled{}
	}
}

var printer = message.NewPrinter(language.English)

// URL returns the $id of kind's schema.
func URL(kind string) string { return BaseURL + kind + ".schema.json" }

// load compiles kind's schema from FS, with format assertions on (so
// "date-time" is checked, not only annotated) and no loader: a reference
// outside the file fails to compile instead of being fetched.
func load(kind string) (*jsonschema.Schema, error) {
	b, err := FS.ReadFile(kind + ".schema.json")
	if err != nil {
		return nil, err
	}
	doc, err := jsonschema.UnmarshalJSON(bytes.NewReader(b))
	if err != nil {
		return nil, fmt.Errorf("schema %s: %w", kind, err)
	}
	c := jsonschema.NewCompiler()
	c.DefaultDraft(jsonschema.Draft2020)
	c.AssertFormat()
	c.UseLoader(noLoader{})
	if err := c.AddResource(URL(kind), doc); err != nil {
		return nil, fmt.Errorf("schema %s: %w", kind, err)
	}
	sch, err := c.Compile(URL(kind))
	if err != nil {
		return nil, fmt.Errorf("schema %s: %w", kind, err)
	}
	return sch, nil
}

type noLoader struct{}

func (noLoader) Load(url string) (any, error) {
	return nil, fmt.Errorf("%s: schemas are not fetched", url)
}

// Validate checks payload, a JSON message of the given kind ("status",
// "alarm", "summary", "diagnostic", "state", "command" or "response"),
// against that kind's schema. The schema is compiled once, on first use.
// The error names the kind and, for each failure, the JSON pointer of the
// failing field, such as:
//
//	alarm payload: /seq: minimum: got 0, want 1
//
// Validate is safe for concurrent use.
func Validate(kind string, payload []byte) error {
	c, ok := cache[kind]
	if !ok {
		return fmt.Errorf("%q payload: no schema for this kind (want one of %s)", kind, strings.Join(Kinds, ", "))
	}
	c.once.Do(func() { c.sch, c.err = load(kind) })
	if c.err != nil {
		return c.err
	}
	v, err := jsonschema.UnmarshalJSON(bytes.NewReader(payload))
	if err != nil {
		return fmt.Errorf("%s payload: not JSON: %w", kind, err)
	}
	err = c.sch.Validate(v)
	var ve *jsonschema.ValidationError
	if errors.As(err, &ve) {
		return fmt.Errorf("%s payload: %s", kind, strings.Join(failures(ve, v), "; "))
	}
	if err != nil {
		return fmt.Errorf("%s payload: %w", kind, err)
	}
	return nil
}

// failures flattens a validation error of doc to one line per failing
// leaf, each starting with the JSON pointer of the field: the property
// itself for a missing, unexpected or badly named one, else the value that
// failed.
func failures(e *jsonschema.ValidationError, doc any) []string {
	var out []string
	var walk func(e *jsonschema.ValidationError)
	walk = func(e *jsonschema.ValidationError) {
		if k, ok := e.ErrorKind.(*jskind.PropertyNames); ok {
			// The library (v6.0.2) reports a bad property name at the
			// location of the name judged as a value of its own, the
			// root: find the object that holds it instead.
			var why []string
			for _, c := range e.Causes {
				why = append(why, strings.TrimPrefix(strings.Join(failures(c, nil), "; "), "(payload): "))
			}
			at := append(slices.Clone(e.InstanceLocation), k.Property)
			if loc, ok := locate(doc, k.Property); ok {
				at = loc
			}
			out = append(out, pointer(at)+": bad field name: "+strings.Join(why, "; "))
			return
		}
		for _, c := range e.Causes {
			walk(c)
		}
		if len(e.Causes) > 0 {
			return
		}
		at := pointer(e.InstanceLocation)
		msg := e.ErrorKind.LocalizedString(printer)
		var fields []string
		switch k := e.ErrorKind.(type) {
		case *jskind.Required:
			fields, msg = k.Missing, "missing"
		case *jskind.DependentRequired:
			fields, msg = k.Missing, fmt.Sprintf("missing (required with %q)", k.Prop)
		case *jskind.AdditionalProperties:
			fields, msg = k.Properties, "not allowed (unknown field)"
		case *jskind.FalseSchema, *jskind.Not:
			msg = "not allowed here"
		case *jskind.Pattern:
			if k.Want == StampPattern {
				msg = fmt.Sprintf("%q is not a UTC time with milliseconds such as 2026-12-02T03:14:07.250Z", k.Got)
			}
		}
		if len(fields) == 0 {
			out = append(out, at+": "+msg)
			return
		}
		for _, f := range fields {
			out = append(out, pointer(append(slices.Clone(e.InstanceLocation), f))+": "+msg)
		}
	}
	walk(e)
	sort.Strings(out)
	return slices.Compact(out)
}

// pointer is the JSON pointer (RFC 6901) of a location, or "(payload)"
// for the whole payload.
func pointer(loc []string) string {
	if len(loc) == 0 {
		return "(payload)"
	}
	var b strings.Builder
	for _, t := range loc {
		b.WriteByte('/')
		b.WriteString(strings.NewReplacer("~", "~0", "/", "~1").Replace(t))
	}
	return b.String()
}

// locate returns the location of the first property called name in v,
// searching objects in key order, depth first.
func locate(v any, name string) ([]string, bool) {
	switch v := v.(type) {
	case map[string]any:
		if _, ok := v[name]; ok {
			return []string{name}, true
		}
		keys := make([]string, 0, len(v))
		for k := range v {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			if loc, ok := locate(v[k], name); ok {
				return append([]string{k}, loc...), true
			}
		}
	case []any:
		for i, x := range v {
			if loc, ok := locate(x, name); ok {
				return append([]string{strconv.Itoa(i)}, loc...), true
			}
		}
	}
	return nil, false
}
