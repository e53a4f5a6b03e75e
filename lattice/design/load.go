package design

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"reflect"
	"slices"
	"strconv"
	"strings"

	"dimerpath/internal/atomicfile"
	"dimerpath/lattice"
)

// Limits on a design file. They keep a malformed or hostile file from
// making dimerpath allocate without bound; a file beyond one is refused
// with a message naming the limit.
const (
	MaxFileBytes = 64 << 20 // bytes of a design file
	MaxFieldNM   = 10000.0  // side of the field, nm (10 µm)
	MaxVariants  = 100
	MaxRegions   = 10000   // per variant
	MaxShapes    = 100000  // per region
	MaxPoints    = 100000  // per shape or terrace boundary
	MaxListLen   = 1 << 20 // any other list
	// MaxArrayCopies bounds the copies of one array and, summed, of all
	// arrays of a variant.
	MaxArrayCopies = 2_000_000
	// MaxPaintedWords bounds the storage of all painted and erased site
	// sets of a file together, in 64-bit words (256 MiB).
	MaxPaintedWords = 1 << 25
	// MaxProblems is the most problems one ValidationError lists.
	MaxProblems = 500
)

// ErrInvalid is wrapped by every *ValidationError, for errors.Is.
var ErrInvalid = errors.New("invalid design")

// Problem is one thing wrong with a design: Path is the JSON path of the
// bad value ("variants[1].regions[3].shapes[0].points_nm[1][0]"), empty
// for the file as a whole, and Message says what is wrong, quoting the
// value.
type Problem struct {
	Path    string
	Message string
}

// String returns "path: message".
func (p Problem) String() string {
	if p.Path == "" {
		return p.Message
	}
	return p.Path + ": " + p.Message
}

// ValidationError lists every problem found in a design. File names the
// design file, empty for a design not read from one.
type ValidationError struct {
	File     string
	Problems []Problem
}

// Error returns one line per problem, each "file: path: message".
func (e *ValidationError) Error() string {
	var b strings.Builder
	for i, p := range e.Problems {
		if i > 0 {
			b.WriteByte('\n')
		}
		if e.File != "" {
			b.WriteString(e.File)
			b.WriteString(": ")
		}
		b.WriteString(p.String())
	}
	return b.String()
}

// Unwrap returns ErrInvalid.
func (e *ValidationError) Unwrap() error { return ErrInvalid }

// problems collects Problems up to MaxProblems.
type problems struct {
	list      []Problem
	truncated bool
}

func (ps *problems) add(path, format string, args ...any) {
	if len(ps.list) >= MaxProblems {
		ps.truncated = true
		return
	}
	ps.list = append(ps.list, Problem{Path: path, Message: fmt.Sprintf(format, args...)})
}

func (ps *problems) err(file string) error {
	if len(ps.list) == 0 {
		return nil
	}
	list := ps.list
	if ps.truncated {
		list = append(list, Problem{Message: fmt.Sprintf("more problems not shown (the first %d are listed)", MaxProblems)})
	}
	return &ValidationError{File: file, Problems: list}
}

// Load reads and validates the design file at path; see Parse.
func Load(path string) (*Design, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, MaxFileBytes+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return Parse(path, data)
}

// Parse decodes and validates a design file; name is used in messages
// only. It reports every problem it finds, each with its JSON path and
// the bad value, as a *ValidationError: first the file's structure
// (syntax, types, unknown fields, non-finite numbers such as NaN, which
// JSON cannot hold but hand-edited files do), then, when the structure is
// sound, the design's meaning (see Validate). It never panics, whatever
// the input.
func Parse(name string, data []byte) (*Design, error) {
	var ps problems
	if len(data) > MaxFileBytes {
		ps.add("", "the file is larger than %d MiB, the limit", MaxFileBytes>>20)
		return nil, ps.err(name)
	}
	clean, edits := replaceNonFinite(data)
	dec := json.NewDecoder(bytes.NewReader(clean))
	dec.UseNumber()
	var tree any
	if err := dec.Decode(&tree); err != nil {
		ps.add("", "%s", syntaxMessage(err, data, edits))
		return nil, ps.err(name)
	}
	if _, err := dec.Token(); err != io.EOF {
		ps.add("", "%s: more data after the design's closing brace", position(data, mapOffset(dec.InputOffset(), edits)))
		return nil, ps.err(name)
	}
	w := walker{ps: &ps}
	if !w.walk("", tree, reflect.TypeFor[Design]()) {
		return nil, ps.err(name)
	}
	// The walk removed every value it refused, so what is left decodes;
	// check its meaning too, so that one run reports every problem, but
	// say nothing more about values already refused.
	src := clean
	if len(ps.list) > 0 {
		var err error
		if src, err = json.Marshal(tree); err != nil {
			ps.add("", "%v", err)
			return nil, ps.err(name)
		}
	}
	var d Design
	if err := json.Unmarshal(src, &d); err != nil {
		// The walk accepts only what decodes; this is a safety net.
		ps.add("", "%v", err)
		return nil, ps.err(name)
	}
	var meaning problems
	d.validate(&meaning)
	for _, p := range meaning.list {
		if !w.refusedUnder(p.Path) {
			ps.add(p.Path, "%s", p.Message)
		}
	}
	ps.truncated = ps.truncated || meaning.truncated
	if err := ps.err(name); err != nil {
		return nil, err
	}
	return &d, nil
}

// Marshal returns the design as indented JSON (objects one field a line,
// short lists of numbers on one line), without validating it.
func Marshal(d *Design) ([]byte, error) {
	compact, err := json.Marshal(d)
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	var b bytes.Buffer
	b.Grow(len(compact) + len(compact)/4)
	formatValue(&b, compact, 0, 0)
	b.WriteByte('\n')
	return b.Bytes(), nil
}

// Save validates d and writes it to path atomically: to a temporary file
// in the same directory, renamed over path only once it is complete, so
// a failed save leaves the old file untouched. It sets Format and Version
// to this program's. A design that does not validate is not written.
func Save(path string, d *Design) error {
	d.Format, d.Version = FormatName, FormatVersion
	if err := d.Validate(); err != nil {
		if ve, ok := err.(*ValidationError); ok {
			ve.File = path
		}
		return err
	}
	data, err := Marshal(d)
	if err != nil {
		return err
	}
	return atomicfile.WriteBytes(path, data, 0o644)
}

// Validate checks the meaning of a design built in memory (as the GUI
// does) and returns a *ValidationError listing every problem, or nil.
func (d *Design) Validate() error {
	var ps problems
	d.validate(&ps)
	return ps.err("")
}

// nonFinite is how replaceNonFinite marks a NaN or infinity token: as a
// JSON string starting with a NUL, which no design field accepts.
const nonFinite = "\x00"

type edit struct{ at, delta int } // at: offset in the output after which offsets shift by delta

// replaceNonFinite rewrites the bare tokens NaN, Infinity and -Infinity
// (outside strings) as marked strings, so the decoder reads them and the
// walk can report them at their JSON path.
func replaceNonFinite(data []byte) ([]byte, []edit) {
	tokens := []string{"-Infinity", "+Infinity", "Infinity", "-NaN", "NaN", "-inf", "inf", "nan"}
	var out []byte
	var edits []edit
	inString, escaped := false, false
	last := 0
	for i := 0; i < len(data); i++ {
		c := data[i]
		if inString {
			switch {
			case escaped:
				escaped = false
			case c == '\\':
				escaped = true
			case c == '"':
				inString = false
			}
			continue
		}
		if c == '"' {
			inString = true
			continue
		}
		if c != 'N' && c != 'I' && c != '-' && c != '+' && c != 'i' && c != 'n' {
			continue
		}
		if i > 0 && !isDelimiter(data[i-1]) {
			continue
		}
		for _, tok := range tokens {
			end := i + len(tok)
			if end <= len(data) && string(data[i:end]) == tok && (end == len(data) || isDelimiter(data[end])) {
				if out == nil {
					out = make([]byte, 0, len(data)+16)
				}
				out = append(out, data[last:i]...)
				repl := `"\u0000` + tok + `"`
				out = append(out, repl...)
				edits = append(edits, edit{at: len(out), delta: len(repl) - len(tok)})
				last = end
				i = end - 1
				break
			}
		}
	}
	if out == nil {
		return data, nil
	}
	return append(out, data[last:]...), edits
}

func isDelimiter(c byte) bool {
	switch c {
	case ' ', '\t', '\n', '\r', ',', ':', '[', ']', '{', '}':
		return true
	}
	return false
}

// mapOffset maps an offset in the rewritten data back to the original.
func mapOffset(off int64, edits []edit) int64 {
	for i := len(edits) - 1; i >= 0; i-- {
		if off >= int64(edits[i].at) {
			off -= int64(edits[i].delta)
		}
	}
	return off
}

// position formats a byte offset of data as "line L, column C".
func position(data []byte, off int64) string {
	off = min(max(off, 0), int64(len(data)))
	line := 1 + bytes.Count(data[:off], []byte{'\n'})
	col := int(off) - bytes.LastIndexByte(data[:off], '\n')
	return fmt.Sprintf("line %d, column %d", line, col)
}

func syntaxMessage(err error, data []byte, edits []edit) string {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		// Offset counts the bad byte itself.
		return fmt.Sprintf("%s: not valid JSON: %v", position(data, mapOffset(se.Offset-1, edits)), strings.TrimPrefix(se.Error(), "json: "))
	}
	if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
		return "the file ends before the design does (truncated?)"
	}
	return "not valid JSON: " + err.Error()
}

// walker checks a decoded JSON tree against the Go types of the design
// model, reporting every mismatch at its JSON path.
type walker struct {
	ps          *problems
	siteWords   int
	wordsFailed bool
	refused     []string // paths of the values removed from the tree
}

// refusedUnder reports whether path is at or under a refused value.
func (w *walker) refusedUnder(path string) bool {
	for _, r := range w.refused {
		if path == r || r == "" || strings.HasPrefix(path, r+".") || strings.HasPrefix(path, r+"[") {
			return true
		}
	}
	return false
}

// refuse records a problem with the value at path and returns false, the
// walk's verdict that the value must be removed.
func (w *walker) refuse(path, format string, args ...any) bool {
	w.ps.add(path, format, args...)
	w.refused = append(w.refused, path)
	return false
}

var siteSetType = reflect.TypeFor[lattice.SiteSet]()

func join(path, field string) string {
	if path == "" {
		return field
	}
	return path + "." + field
}

// walk checks v against t and reports whether v is acceptable; values
// inside v that are not are removed from the tree (fields deleted, list
// entries set to null), so that the tree then decodes into t.
func (w *walker) walk(path string, v any, t reflect.Type) bool {
	if t == siteSetType {
		return w.siteSet(path, v)
	}
	if s, ok := v.(string); ok && strings.HasPrefix(s, nonFinite) && t.Kind() != reflect.Pointer {
		if k := t.Kind(); k == reflect.Float64 || k == reflect.Int {
			return w.refuse(path, "%s is not a finite number", s[len(nonFinite):])
		}
		return w.refuse(path, "want %s, not %s", describeType(t), s[len(nonFinite):])
	}
	switch t.Kind() {
	case reflect.Pointer:
		if v == nil {
			return true
		}
		return w.walk(path, v, t.Elem())
	case reflect.Struct:
		obj, ok := v.(map[string]any)
		if !ok {
			return w.refuse(path, "want an object, not %s", describeValue(v))
		}
		known := make(map[string]bool, t.NumField())
		var names []string
		for i := range t.NumField() {
			f := t.Field(i)
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			if name == "" || name == "-" {
				continue
			}
			known[name] = true
			names = append(names, name)
			if fv, present := obj[name]; present && !w.walk(join(path, name), fv, f.Type) {
				delete(obj, name)
			}
		}
		var unknown []string
		for k := range obj {
			if !known[k] {
				unknown = append(unknown, k)
			}
		}
		slices.Sort(unknown)
		for _, k := range unknown {
			w.refuse(join(path, k), "unknown field (known here: %s)", strings.Join(names, ", "))
			delete(obj, k)
		}
		return true
	case reflect.Slice, reflect.Array:
		list, ok := v.([]any)
		if !ok {
			if v == nil && t.Kind() == reflect.Slice {
				return true // null is an empty list
			}
			return w.refuse(path, "want %s, not %s", describeType(t), describeValue(v))
		}
		if t.Kind() == reflect.Array && len(list) != t.Len() {
			return w.refuse(path, "want %d numbers, has %d", t.Len(), len(list))
		}
		if len(list) > MaxListLen {
			return w.refuse(path, "has %d entries, more than the limit of %d", len(list), MaxListLen)
		}
		for i, e := range list {
			if !w.walk(fmt.Sprintf("%s[%d]", path, i), e, t.Elem()) {
				list[i] = nil
			}
		}
		return true
	case reflect.String:
		s, ok := v.(string)
		if !ok {
			return w.refuse(path, "want a string, not %s", describeValue(v))
		}
		if len(s) > 10000 {
			return w.refuse(path, "string of %d bytes is longer than the limit of 10000", len(s))
		}
		return true
	case reflect.Float64:
		n, ok := v.(json.Number)
		if !ok {
			return w.refuse(path, "want a number, not %s", describeValue(v))
		}
		if _, err := strconv.ParseFloat(string(n), 64); err != nil {
			return w.refuse(path, "%s is not a finite number", n)
		}
		return true
	case reflect.Int:
		n, ok := v.(json.Number)
		if !ok {
			return w.refuse(path, "want a whole number, not %s", describeValue(v))
		}
		if _, err := strconv.ParseInt(string(n), 10, 32); err != nil {
			f, ferr := strconv.ParseFloat(string(n), 64)
			switch {
			case ferr == nil && f == float64(int64(f)) && f > -1e9 && f < 1e9:
				return w.refuse(path, "%s: write whole numbers without a fraction or exponent", n)
			case ferr == nil && f > -1e9 && f < 1e9:
				return w.refuse(path, "%s is not a whole number", n)
			}
			return w.refuse(path, "%s is out of range", n)
		}
		return true
	}
	return w.refuse(path, "internal: unhandled type %v", t)
}

// siteSet checks an encoded site set by decoding it, within the file's
// storage budget.
func (w *walker) siteSet(path string, v any) bool {
	if _, ok := v.(map[string]any); !ok {
		return w.refuse(path, "want a site set {\"sites\": N, \"rows\": [...]}, not %s", describeValue(v))
	}
	if w.wordsFailed {
		return w.refuse(path, "not read: the file's site storage limit is already exceeded")
	}
	raw, err := json.Marshal(v)
	if err != nil {
		return w.refuse(path, "%v", err)
	}
	var s lattice.SiteSet
	if err := s.UnmarshalJSON(raw); err != nil {
		var se *lattice.SiteSetError
		if errors.As(err, &se) {
			p := path
			if se.Path != "" {
				p = join(path, se.Path)
			}
			w.ps.add(p, "%s", se.Msg)
			w.refused = append(w.refused, path)
			return false
		}
		return w.refuse(path, "%v", err)
	}
	w.siteWords += s.StorageWords()
	if w.siteWords > MaxPaintedWords {
		w.wordsFailed = true
		return w.refuse(path, "the painted and erased sites of the file need more than %d MiB of storage, the limit", MaxPaintedWords*8>>20)
	}
	return true
}

func describeType(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Struct:
		return "an object"
	case reflect.Slice, reflect.Array:
		return "a list"
	case reflect.String:
		return "a string"
	case reflect.Float64, reflect.Int:
		return "a number"
	}
	return t.String()
}

func describeValue(v any) string {
	switch v := v.(type) {
	case nil:
		return "null"
	case bool:
		return strconv.FormatBool(v)
	case json.Number:
		return "the number " + string(v)
	case string:
		if strings.HasPrefix(v, nonFinite) {
			return v[len(nonFinite):]
		}
		if len(v) > 40 {
			v = v[:40] + "…"
		}
		return fmt.Sprintf("the string %q", v)
	case []any:
		return "a list"
	case map[string]any:
		return "an object"
	}
	return fmt.Sprintf("%v", v)
}

// formatValue writes the compact JSON value starting at src[i] to b,
// indented for depth, and returns the offset after it. Short objects and
// lists without nested objects stay on one line (points, fiducials,
// painted rows); others put one field or entry on a line.
func formatValue(b *bytes.Buffer, src []byte, i, depth int) int {
	switch src[i] {
	case '{':
		if end := skipValue(src, i); end-i <= 80 && !bytes.ContainsRune(src[i+1:end], '{') {
			return writeInline(b, src, i, end)
		}
		b.WriteString("{\n")
		i++
		for {
			indent(b, depth+1)
			end := skipString(src, i)
			b.Write(src[i:end])
			b.WriteString(": ")
			i = formatValue(b, src, end+1, depth+1)
			if src[i] == ',' {
				b.WriteString(",\n")
				i++
				continue
			}
			b.WriteByte('\n')
			indent(b, depth)
			b.WriteByte('}')
			return i + 1
		}
	case '[':
		if end := skipValue(src, i); src[i+1] == ']' || (end-i <= 100 && !bytes.ContainsRune(src[i:end], '{')) {
			return writeInline(b, src, i, end)
		}
		b.WriteString("[\n")
		i++
		for {
			indent(b, depth+1)
			i = formatValue(b, src, i, depth+1)
			if src[i] == ',' {
				b.WriteString(",\n")
				i++
				continue
			}
			b.WriteByte('\n')
			indent(b, depth)
			b.WriteByte(']')
			return i + 1
		}
	default:
		end := skipValue(src, i)
		b.Write(src[i:end])
		return end
	}
}

// writeInline writes src[i:end] on one line with a space after each
// comma and colon outside strings, and returns end.
func writeInline(b *bytes.Buffer, src []byte, i, end int) int {
	for j := i; j < end; j++ {
		if src[j] == '"' {
			k := skipString(src, j)
			b.Write(src[j:k])
			j = k - 1
			continue
		}
		b.WriteByte(src[j])
		if src[j] == ',' || src[j] == ':' {
			b.WriteByte(' ')
		}
	}
	return end
}

func indent(b *bytes.Buffer, depth int) {
	for range depth {
		b.WriteString("  ")
	}
}

// skipString returns the offset after the JSON string starting at src[i].
func skipString(src []byte, i int) int {
	for j := i + 1; j < len(src); j++ {
		switch src[j] {
		case '\\':
			j++
		case '"':
			return j + 1
		}
	}
	return len(src)
}

// skipValue returns the offset after the compact JSON value at src[i].
func skipValue(src []byte, i int) int {
	switch src[i] {
	case '"':
		return skipString(src, i)
	case '{', '[':
		depth := 0
		for j := i; j < len(src); j++ {
			switch src[j] {
			case '"':
				j = skipString(src, j) - 1
			case '{', '[':
				depth++
			case '}', ']':
				depth--
				if depth == 0 {
					return j + 1
				}
			}
		}
		return len(src)
	}
	j := i
	for j < len(src) && src[j] != ',' && src[j] != '}' && src[j] != ']' {
		j++
	}
	return j
}
