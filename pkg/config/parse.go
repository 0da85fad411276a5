package config

import (
	"errors"
	"fmt"
	"os"
	"reflect"
	"sort"
	"strings"

	"go.yaml.in/yaml/v3"
)

// Load reads and checks the configuration file at path.
func Load(path string) (Config, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return Config{}, fmt.Errorf("config: %w", err)
	}
	return Parse(data, path)
}

// Parse checks a configuration file's bytes; name is used in errors. It
// returns every problem found, joined, not just the first.
func Parse(data []byte, name string) (Config, error) {
	cfg := Default()
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return cfg, &FieldError{File: name, Msg: "not valid YAML: " + strings.TrimPrefix(err.Error(), "yaml: ")}
	}
	p := parser{file: name, lines: map[string]int{}}
	if len(doc.Content) > 0 {
		p.decode(doc.Content[0], reflect.ValueOf(&cfg).Elem(), "")
	}
	if len(p.errs) == 0 {
		p.errs = append(p.errs, cfg.validate(name, p.lines)...)
	}
	return cfg, errors.Join(p.errs...)
}

// parser walks the YAML tree against the Config struct, field by field, so
// that every error knows its key path and line.
type parser struct {
	file  string
	lines map[string]int // key path -> line where it was set
	errs  []error
}

func (p *parser) fail(line int, path, format string, a ...any) {
	p.errs = append(p.errs, &FieldError{File: p.file, Line: line, Path: path, Msg: fmt.Sprintf(format, a...)})
}

func (p *parser) decode(n *yaml.Node, v reflect.Value, path string) {
	if v.Kind() == reflect.Slice {
		p.list(n, v, path)
		return
	}
	if v.Kind() != reflect.Struct {
		p.scalar(n, v, path)
		return
	}
	if n.Kind == yaml.ScalarNode && n.Tag == "!!null" {
		return // an empty section keeps its defaults
	}
	if n.Kind != yaml.MappingNode {
		p.fail(n.Line, orTop(path), "must be a section of keys, got %s", describe(n))
		return
	}
	fields := map[string]int{}
	for i := range v.NumField() {
		fields[v.Type().Field(i).Tag.Get("yaml")] = i
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		key, val := n.Content[i], n.Content[i+1]
		kp := join(path, key.Value)
		idx, ok := fields[key.Value]
		switch {
		case !ok:
			p.fail(key.Line, kp, "unknown key (known here: %s)", known(fields))
		case seen[key.Value]:
			p.fail(key.Line, kp, "set twice (first on line %d)", p.lines[kp])
		default:
			seen[key.Value] = true
			p.lines[kp] = key.Line
			p.decode(val, v.Field(idx), kp)
		}
	}
}

// list decodes a list of single values, such as broker URLs.
func (p *parser) list(n *yaml.Node, v reflect.Value, path string) {
	if n.Kind != yaml.SequenceNode {
		p.fail(n.Line, path, "must be a list ([a, b] or one '- item' per line), got %s", describe(n))
		return
	}
	out := reflect.MakeSlice(v.Type(), len(n.Content), len(n.Content))
	for i, item := range n.Content {
		p.scalar(item, out.Index(i), fmt.Sprintf("%s[%d]", path, i))
	}
	v.Set(out)
}

func (p *parser) scalar(n *yaml.Node, v reflect.Value, path string) {
	if n.Kind != yaml.ScalarNode {
		p.fail(n.Line, path, "must be a single value, got %s", describe(n))
		return
	}
	if n.Tag == "!!null" {
		p.fail(n.Line, path, "has no value (leave the key out to take the default)")
		return
	}
	want := map[reflect.Kind]string{reflect.String: "text", reflect.Int: "a whole number",
		reflect.Float64: "a number", reflect.Bool: "true or false"}[v.Kind()]
	ok := map[reflect.Kind][]string{reflect.String: {"!!str"}, reflect.Int: {"!!int"},
		reflect.Float64: {"!!int", "!!float"}, reflect.Bool: {"!!bool"}}[v.Kind()]
	if !contains(ok, n.Tag) {
		p.fail(n.Line, path, "must be %s, got %q", want, n.Value)
		return
	}
	if err := n.Decode(v.Addr().Interface()); err != nil {
		p.fail(n.Line, path, "must be %s, got %q", want, n.Value)
	}
}

func describe(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a section"
	case yaml.SequenceNode:
		return "a list"
	}
	return fmt.Sprintf("%q", n.Value)
}

func known(fields map[string]int) string {
	names := make([]string, 0, len(fields))
	for k := range fields {
		names = append(names, k)
	}
	sort.Strings(names)
	return strings.Join(names, ", ")
}

func contains(xs []string, x string) bool {
	for _, s := range xs {
		if s == x {
			return true
		}
	}
	return false
}

func join(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

func orTop(path string) string {
	if path == "" {
		return "(top level)"
	}
	return path
}
