package jsonfile

import (
	"encoding"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"
	"sync"
)

// Options tune Decode. The zero value decodes with the default limits.
type Options struct {
	// What names the document in messages ("the design"); "the JSON
	// value" when empty.
	What string
	// MaxString is the longest string accepted, in bytes (default 64 KiB).
	MaxString int
	// MaxList is the most entries of any one list (default 2^20).
	MaxList int
	// MaxDepth is the deepest nesting of objects and lists (default 64).
	MaxDepth int
	// Required asks for every struct field whose json tag does not say
	// omitempty: a field left out is a problem ("missing").
	Required bool
	// Types decodes values of the given types (keyed by the value's type,
	// not a pointer to it) instead of the default rules: the function gets
	// the value's JSON text and the value to set. An error places a
	// problem at the value's path, or inside it for a *ValueError.
	Types map[reflect.Type]func(raw []byte, dst reflect.Value) error
}

func (o Options) what() string {
	if o.What == "" {
		return "the JSON value"
	}
	return o.What
}

// ValueError places a problem inside a value decoded by an Options.Types
// function or an UnmarshalJSON method: Path is relative to the value
// ("rows[3][4]"), "" for the value itself.
type ValueError struct {
	Path    string
	Message string
}

func (e *ValueError) Error() string {
	if e.Path == "" {
		return e.Message
	}
	return e.Path + ": " + e.Message
}

// Decode reads data, one JSON value, into the value v points to, by the
// json tags of its struct types, and adds every problem it finds to ps
// with its JSON path, line and column. Fields the input leaves out keep
// what v held (so a preset can be overlaid); a refused value is left at
// its zero value, and decoding goes on so that one run finds every
// problem. It returns false when the input could not be read to its end
// (a syntax error, which is fatal): v then holds what came before it.
//
// Decode refuses: unknown keys and keys in another case than the tag's,
// a key given twice, values of the wrong type, null where a value is
// needed (null is allowed for pointers, lists and maps), numbers that are
// not finite (NaN, Infinity, 1e400), fractions and exponents where a
// whole number is wanted, strings and lists beyond the limits, nesting
// beyond MaxDepth, and anything after the value. It never panics on its
// input and never quotes more than MaxQuote bytes of it.
func Decode(data []byte, v any, ps *Problems, opt Options) bool {
	rv := reflect.ValueOf(v)
	if rv.Kind() != reflect.Pointer || rv.IsNil() {
		panic("jsonfile: Decode needs a non-nil pointer")
	}
	if opt.MaxString <= 0 {
		opt.MaxString = 64 << 10
	}
	if opt.MaxList <= 0 {
		opt.MaxList = 1 << 20
	}
	if opt.MaxDepth <= 0 {
		opt.MaxDepth = 64
	}
	d := &decoder{scanner: scanner{data: data}, opt: opt, ps: ps, lines: lineCounter{data: data}}
	if d.peek() == 0 {
		d.failEOF()
	} else {
		d.value(rv.Elem())
		if d.err == nil && d.peek() != 0 {
			d.fail(d.pos, "more data after %s", d.opt.what())
		}
	}
	if d.err != nil {
		ps.Add(syntaxProblem(data, d.err, d.opt.what()))
		return false
	}
	return true
}

func syntaxProblem(data []byte, e *syntaxError, what string) Problem {
	if what == "" {
		what = "the JSON value"
	}
	p := Problem{Err: ErrSyntax}
	if e.eof {
		p.Message = fmt.Sprintf("the file ends before %s does (truncated?)", what)
	} else {
		lc := lineCounter{data: data}
		p.Line, p.Column = lc.at(e.off)
		p.Message = "not valid JSON: " + e.msg
	}
	return p
}

type decoder struct {
	scanner
	opt   Options
	ps    *Problems
	path  []segment
	depth int
	lines lineCounter
}

// segment is one step of a JSON path: a key, or an index when key is
// empty and index >= 0.
type segment struct {
	key   string
	index int
}

func (d *decoder) pathString() string {
	return formatPath(d.path)
}

func formatPath(path []segment) string {
	var b strings.Builder
	for _, s := range path {
		if s.key == "" && s.index >= 0 {
			b.WriteByte('[')
			b.WriteString(strconv.Itoa(s.index))
			b.WriteByte(']')
			continue
		}
		if isIdentifier(s.key) && len(s.key) <= MaxQuote {
			if b.Len() > 0 {
				b.WriteByte('.')
			}
			b.WriteString(s.key)
			continue
		}
		b.WriteString("[")
		b.WriteString(strconv.Quote(Prefix(s.key, MaxQuote)))
		b.WriteString("]")
	}
	return b.String()
}

func isIdentifier(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c == '_' || c == '-' || (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (i > 0 && c >= '0' && c <= '9')) {
			return false
		}
	}
	return true
}

// problem records a problem with the value starting at off.
func (d *decoder) problem(off int, format string, args ...any) {
	p := Problem{Path: d.pathString(), Message: fmt.Sprintf(format, args...)}
	p.Line, p.Column = d.lines.at(off)
	d.ps.Add(p)
}

// refuse skips the value at the position and records a problem with it,
// unless the value is not even valid JSON (a syntax error, recorded
// instead). The message is formatted before the value is skipped, so it
// may describe it.
func (d *decoder) refuse(format string, args ...any) {
	d.skipSpace()
	start := d.pos
	msg := fmt.Sprintf(format, args...)
	d.skipValue()
	if d.err == nil {
		d.problem(start, "%s", msg)
	}
}

var (
	unmarshalerType     = reflect.TypeFor[json.Unmarshaler]()
	textUnmarshalerType = reflect.TypeFor[encoding.TextUnmarshaler]()
)

// value decodes the value at the position into v (settable).
func (d *decoder) value(v reflect.Value) {
	if d.err != nil {
		return
	}
	c := d.peek()
	if c == 0 {
		d.failEOF()
		return
	}
	t := v.Type()
	if fn, ok := d.opt.Types[t]; ok {
		d.custom(v, func(raw []byte) error { return fn(raw, v) })
		return
	}
	if t.Kind() != reflect.Pointer && reflect.PointerTo(t).Implements(unmarshalerType) {
		d.custom(v, func(raw []byte) error { return v.Addr().Interface().(json.Unmarshaler).UnmarshalJSON(raw) })
		return
	}
	if c == 'n' && d.nonFinite() == "" {
		switch t.Kind() {
		case reflect.Pointer, reflect.Slice, reflect.Map, reflect.Interface:
			if _, ok := d.literal(); ok {
				v.SetZero()
			}
			return
		}
	}
	if t.Kind() != reflect.Pointer && reflect.PointerTo(t).Implements(textUnmarshalerType) {
		if c != '"' {
			d.refuse("want a string, not %s", d.describeValue())
			return
		}
		start := d.pos
		s, ok := d.str()
		if !ok {
			return
		}
		if err := v.Addr().Interface().(encoding.TextUnmarshaler).UnmarshalText([]byte(s)); err != nil {
			d.problem(start, "%s", Prefix(err.Error(), 200))
		}
		return
	}
	switch t.Kind() {
	case reflect.Pointer:
		if v.IsNil() {
			v.Set(reflect.New(t.Elem()))
		}
		d.value(v.Elem())
	case reflect.Struct:
		d.object(v)
	case reflect.Slice:
		d.list(v)
	case reflect.Array:
		d.array(v)
	case reflect.String:
		if c != '"' {
			d.refuse("want a string, not %s", d.describeValue())
			return
		}
		if s, ok := d.str(); ok {
			v.SetString(s)
		}
	case reflect.Float64, reflect.Float32:
		d.float(v)
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		d.integer(v)
	case reflect.Bool:
		if c != 't' && c != 'f' {
			d.refuse("want true or false, not %s", d.describeValue())
			return
		}
		if w, ok := d.literal(); ok {
			v.SetBool(w == "true")
		}
	case reflect.Interface, reflect.Map:
		// Generic values (not in dimerpath's file types): decoded by
		// encoding/json from the checked text.
		d.custom(v, func(raw []byte) error { return json.Unmarshal(raw, v.Addr().Interface()) })
	default:
		d.refuse("cannot hold a value here (internal: %v)", t)
	}
}

// custom hands the value's text to fn and places its error.
func (d *decoder) custom(v reflect.Value, fn func(raw []byte) error) {
	start, end := d.skipValue()
	if d.err != nil {
		return
	}
	err := fn(d.data[start:end])
	if err == nil {
		return
	}
	v.SetZero()
	var ve *ValueError
	if errors.As(err, &ve) {
		p := Problem{Path: joinPath(d.pathString(), ve.Path), Message: Prefix(ve.Message, 500)}
		at := start
		if off := offsetOf(d.data[start:end], ve.Path); off > 0 {
			at += off
		}
		p.Line, p.Column = d.lines.at(at)
		d.ps.Add(p)
		return
	}
	d.problem(start, "%s", Prefix(strings.TrimPrefix(err.Error(), "json: "), 500))
}

// joinPath appends a relative path ("rows[3]", "[2].x") to a path.
func joinPath(path, rel string) string {
	switch {
	case rel == "":
		return path
	case path == "" || strings.HasPrefix(rel, "["):
		return path + rel
	}
	return path + "." + rel
}

// str scans a string within the length limit.
func (d *decoder) str() (string, bool) {
	start := d.pos
	raw, esc := d.stringBytes()
	if d.err != nil {
		return "", false
	}
	if len(raw) > d.opt.MaxString {
		d.problem(start, "string of %d bytes is longer than the limit of %d", len(raw), d.opt.MaxString)
		return "", false
	}
	return unescape(raw, esc), true
}

func (d *decoder) float(v reflect.Value) {
	start := d.pos
	if tok := d.nonFinite(); tok != "" {
		d.pos += len(tok)
		d.problem(start, "%s is not a finite number", tok)
		return
	}
	c := d.data[start]
	if c != '-' && (c < '0' || c > '9') {
		d.refuse("want a number, not %s", d.describeValue())
		return
	}
	text := d.number()
	if d.err != nil {
		return
	}
	f, err := strconv.ParseFloat(string(text), v.Type().Bits())
	if err != nil || math.IsInf(f, 0) {
		d.problem(start, "%s is not a finite number", Prefix(string(text), MaxQuote))
		return
	}
	v.SetFloat(f)
}

func (d *decoder) integer(v reflect.Value) {
	start := d.pos
	c := d.data[start]
	if tok := d.nonFinite(); tok != "" {
		d.pos += len(tok)
		d.problem(start, "%s is not a whole number", tok)
		return
	}
	if c != '-' && (c < '0' || c > '9') {
		d.refuse("want a whole number, not %s", d.describeValue())
		return
	}
	text := d.number()
	if d.err != nil {
		return
	}
	s := string(text)
	bits := v.Type().Bits()
	if bits == 64 && (v.Kind() == reflect.Int || v.Kind() == reflect.Uint) {
		bits = 32 // a file's counts and indices fit in 32 bits on every platform
	}
	var err error
	switch v.Kind() {
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		var n uint64
		if n, err = strconv.ParseUint(s, 10, bits); err == nil {
			v.SetUint(n)
			return
		}
	default:
		var n int64
		if n, err = strconv.ParseInt(s, 10, bits); err == nil {
			v.SetInt(n)
			return
		}
	}
	q := Prefix(s, MaxQuote)
	f, ferr := strconv.ParseFloat(s, 64)
	switch {
	case strings.HasPrefix(s, "-") && v.Kind() >= reflect.Uint && v.Kind() <= reflect.Uint64:
		d.problem(start, "%s must not be negative", q)
	case ferr == nil && f == math.Trunc(f) && math.Abs(f) < 1e9 && !errors.Is(err, strconv.ErrRange):
		d.problem(start, "%s: write whole numbers without a fraction or exponent", q)
	case ferr == nil && f != math.Trunc(f) && math.Abs(f) < 1e15:
		d.problem(start, "%s is not a whole number", q)
	default:
		d.problem(start, "%s is out of range", q)
	}
}

// enter counts one level of nesting; false (with the value refused) when
// it is one too many.
func (d *decoder) enter() bool {
	if d.depth >= d.opt.MaxDepth {
		d.refuse("nested deeper than %d levels, the limit", d.opt.MaxDepth)
		return false
	}
	d.depth++
	return true
}

func (d *decoder) object(v reflect.Value) {
	if d.peek() != '{' {
		d.refuse("want an object, not %s", d.describeValue())
		return
	}
	if !d.enter() {
		return
	}
	defer func() { d.depth-- }()
	info := structInfoOf(v.Type())
	start := d.pos
	d.pos++
	var seen uint64
	var seenMore map[int]bool
	if d.opt.Required {
		defer func() {
			if d.err != nil {
				return
			}
			var missing []string
			for i, f := range info.fields {
				if !f.optional && !(i < 64 && seen&(1<<i) != 0) && !(i >= 64 && seenMore[i]) {
					missing = append(missing, f.name)
				}
			}
			switch {
			case len(missing) == 1:
				d.path = append(d.path, segment{key: missing[0], index: -1})
				d.problem(start, "missing")
				d.path = d.path[:len(d.path)-1]
			case len(missing) > 1:
				d.problem(start, "missing fields %s", strings.Join(missing, ", "))
			}
		}()
	}
	if d.peek() == '}' {
		d.pos++
		return
	}
	for d.err == nil {
		if d.peek() != '"' {
			d.expect('"', "a field name in double quotes")
			return
		}
		keyStart := d.pos
		raw, esc := d.stringBytes()
		if !d.expect(':', "':' after a field name") {
			return
		}
		var key string
		var idx int
		var found bool
		if esc {
			key = unescape(raw, true)
			idx, found = info.byName[key]
		} else {
			idx, found = info.byName[string(raw)]
			if found {
				key = info.fields[idx].name
			} else {
				key = unescape(raw, false)
			}
		}
		d.path = append(d.path, segment{key: key, index: -1})
		switch {
		case !found:
			d.problem(keyStart, "%s", info.unknown(key))
			d.skipValue()
		case idx < 64 && seen&(1<<idx) != 0, idx >= 64 && seenMore[idx]:
			d.problem(keyStart, "given twice in this object")
			d.skipValue()
		default:
			if idx < 64 {
				seen |= 1 << idx
			} else {
				if seenMore == nil {
					seenMore = map[int]bool{}
				}
				seenMore[idx] = true
			}
			d.value(v.Field(info.fields[idx].index))
		}
		d.path = d.path[:len(d.path)-1]
		if d.err != nil || !d.next('}') {
			return
		}
	}
}

// list decodes a JSON list into a slice, reusing its storage.
func (d *decoder) list(v reflect.Value) {
	if d.peek() != '[' {
		d.refuse("want a list, not %s", d.describeValue())
		return
	}
	if !d.enter() {
		return
	}
	defer func() { d.depth-- }()
	start := d.pos
	d.pos++
	v.SetLen(0)
	if d.peek() == ']' {
		d.pos++
		if v.IsNil() {
			v.Set(reflect.MakeSlice(v.Type(), 0, 0))
		}
		return
	}
	n := 0
	for d.err == nil {
		if n == d.opt.MaxList {
			// Count the rest without keeping it.
			for d.err == nil {
				d.skipValue()
				n++
				if d.peek() != ',' {
					break
				}
				d.pos++
			}
			if d.err == nil && d.expect(']', "',' or ']'") {
				d.problem(start, "has %d entries, more than the limit of %d", n, d.opt.MaxList)
			}
			v.SetZero()
			return
		}
		if n == v.Cap() {
			v.Grow(1)
		}
		v.SetLen(n + 1)
		e := v.Index(n)
		e.SetZero()
		d.path = append(d.path, segment{index: n})
		d.value(e)
		d.path = d.path[:len(d.path)-1]
		n++
		if d.err != nil || !d.next(']') {
			return
		}
	}
}

// array decodes a JSON list into a Go array of fixed length.
func (d *decoder) array(v reflect.Value) {
	if d.peek() != '[' {
		d.refuse("want a list of %d %s, not %s", v.Len(), plural(v.Type().Elem()), d.describeValue())
		return
	}
	if !d.enter() {
		return
	}
	defer func() { d.depth-- }()
	start := d.pos
	d.pos++
	n := 0
	if d.peek() == ']' {
		d.pos++
	} else {
		for d.err == nil {
			if n < v.Len() {
				d.path = append(d.path, segment{index: n})
				d.value(v.Index(n))
				d.path = d.path[:len(d.path)-1]
			} else {
				d.skipValue()
			}
			n++
			if d.err != nil || !d.next(']') {
				break
			}
		}
	}
	if d.err != nil {
		return
	}
	if n != v.Len() {
		v.SetZero()
		d.problem(start, "want %d %s, has %d", v.Len(), plural(v.Type().Elem()), n)
	}
}

// plural names the JSON values of type t in the plural, for messages.
func plural(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Float32, reflect.Float64:
		return "numbers"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "whole numbers"
	case reflect.String:
		return "strings"
	}
	return "entries"
}

// structInfo is what decoding needs of a struct type.
type structInfo struct {
	fields []fieldInfo
	byName map[string]int
	lower  map[string]string // lower-case name -> name, for a hint
}

type fieldInfo struct {
	name     string
	index    int
	optional bool // omitempty
}

var structInfos sync.Map // reflect.Type -> *structInfo

func structInfoOf(t reflect.Type) *structInfo {
	if si, ok := structInfos.Load(t); ok {
		return si.(*structInfo)
	}
	si := &structInfo{byName: map[string]int{}, lower: map[string]string{}}
	for i := range t.NumField() {
		name, opts, ok := jsonName(t.Field(i))
		if !ok {
			continue
		}
		si.byName[name] = len(si.fields)
		si.lower[strings.ToLower(name)] = name
		optional := false
		for _, o := range strings.Split(opts, ",") {
			optional = optional || o == "omitempty" || o == "omitzero"
		}
		si.fields = append(si.fields, fieldInfo{name: name, index: i, optional: optional})
	}
	structInfos.Store(t, si)
	return si
}

// jsonName returns the name of struct field f in JSON and the options
// of its json tag; ok is false for a field JSON leaves out (unexported,
// or tagged "-").
func jsonName(f reflect.StructField) (name, opts string, ok bool) {
	if !f.IsExported() {
		return "", "", false
	}
	name, opts, _ = strings.Cut(f.Tag.Get("json"), ",")
	if name == "-" {
		return "", "", false
	}
	if name == "" {
		name = f.Name
	}
	return name, opts, true
}

// unknown explains an unknown key.
func (si *structInfo) unknown(key string) string {
	if name, ok := si.lower[strings.ToLower(key)]; ok {
		return fmt.Sprintf("unknown field: names are case-sensitive, did you mean %q?", name)
	}
	names := make([]string, len(si.fields))
	for i, f := range si.fields {
		names[i] = f.name
	}
	return "unknown field (known here: " + strings.Join(names, ", ") + ")"
}

// Key returns the path of the member key of the object at path, written
// as Decode writes paths: "regions.pad", or regions["pad/ap"] for a key
// that is not a plain name.
func Key(path, key string) string {
	return joinPath(path, formatPath([]segment{{key: key, index: -1}}))
}

// Under reports whether path is at or inside the value at prefix ("" is
// the whole file).
func Under(path, prefix string) bool {
	return prefix == "" || path == prefix || strings.HasPrefix(path, prefix+".") || strings.HasPrefix(path, prefix+"[")
}
