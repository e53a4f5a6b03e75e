package jsonfile

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"math"
	"reflect"
	"strconv"
)

// Style lays out the JSON dimerpath writes. Whatever the style, the
// encoding is encoding/json's (the shortest decimal that reads back to
// the same float64, no HTML escaping), fields in struct order.
type Style struct {
	// Indent is one level of indentation.
	Indent string
	// Inline reports whether the value at depth (0 for the document),
	// given in its compact encoding, is written on one line; nil writes
	// every non-empty object and list over several lines. Empty objects
	// and lists are always written {} and [].
	Inline func(depth int, compact []byte) bool
	// Spaced puts a space after each comma and colon of an inline value.
	Spaced bool
}

// Indented is encoding/json's MarshalIndent layout with two spaces: one
// field or entry a line.
var Indented = Style{Indent: "  "}

// Compact writes every value below the top level on one line without
// spaces, and the top level one field a line: the layout of the plan
// file, whose long lists are written with Writer.List, one entry a line.
var Compact = Style{Indent: "  ", Inline: func(depth int, _ []byte) bool { return depth > 0 }}

// Readable keeps short objects (at most 80 bytes) and short lists (at
// most 100 bytes) on one line when they hold no object, with spaces:
// points, pairs and small records stay on one line, and everything else
// is one field or entry a line.
var Readable = Style{Indent: "  ", Spaced: true, Inline: func(_ int, c []byte) bool {
	if bytes.IndexByte(c[1:], '{') >= 0 {
		return false
	}
	if c[0] == '{' {
		return len(c) <= 80
	}
	return len(c) <= 100
}}

// Marshal returns v encoded in style s, ending with a newline. A NaN or
// an infinity anywhere in v is refused with an *Error naming its path.
func Marshal(v any, s Style) ([]byte, error) {
	compact, err := compactOf(v)
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	b.Grow(len(compact) + len(compact)/4)
	s.format(&b, compact, 0, 0)
	b.WriteByte('\n')
	return b.Bytes(), nil
}

// compactOf encodes v compactly, without HTML escaping and without the
// encoder's newline.
func compactOf(v any) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, encodeError(v, err)
	}
	return bytes.TrimSuffix(buf.Bytes(), []byte("\n")), nil
}

// encodeError names the path of the value json could not encode.
func encodeError(v any, err error) error {
	var ue *json.UnsupportedValueError
	if errors.As(err, &ue) {
		if path, x, ok := nonFinitePath(reflect.ValueOf(v), nil, 0); ok {
			return &Error{Problems: []Problem{{Path: path, Value: x, Message: "JSON cannot hold a number that is not finite"}}}
		}
	}
	return err
}

// nonFinitePath finds the first NaN or infinity in v, by json field names.
func nonFinitePath(v reflect.Value, path []segment, depth int) (string, float64, bool) {
	if depth > 100 || !v.IsValid() {
		return "", 0, false
	}
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if x := v.Float(); math.IsNaN(x) || math.IsInf(x, 0) {
			return formatPath(path), x, true
		}
	case reflect.Pointer, reflect.Interface:
		if !v.IsNil() {
			return nonFinitePath(v.Elem(), path, depth+1)
		}
	case reflect.Struct:
		t := v.Type()
		for i := range t.NumField() {
			name, _, ok := jsonName(t.Field(i))
			if !ok {
				continue
			}
			if p, x, ok := nonFinitePath(v.Field(i), append(path, segment{key: name, index: -1}), depth+1); ok {
				return p, x, true
			}
		}
	case reflect.Slice, reflect.Array:
		for i := range v.Len() {
			if p, x, ok := nonFinitePath(v.Index(i), append(path, segment{index: i}), depth+1); ok {
				return p, x, true
			}
		}
	case reflect.Map:
		iter := v.MapRange()
		for iter.Next() {
			if p, x, ok := nonFinitePath(iter.Value(), append(path, segment{key: iter.Key().String(), index: -1}), depth+1); ok {
				return p, x, true
			}
		}
	}
	return "", 0, false
}

// format writes the compact value at src[i] at depth and returns the
// offset after it.
func (s Style) format(b *bytes.Buffer, src []byte, i, depth int) int {
	switch src[i] {
	case '{', '[':
		end := skipCompact(src, i)
		if end-i == 2 || (s.Inline != nil && s.Inline(depth, src[i:end])) {
			s.inline(b, src[i:end])
			return end
		}
		closer := byte('}')
		if src[i] == '[' {
			closer = ']'
		}
		b.WriteByte(src[i])
		b.WriteByte('\n')
		i++
		for {
			s.indent(b, depth+1)
			if closer == '}' {
				k := skipCompact(src, i)
				b.Write(src[i:k])
				b.WriteString(": ")
				i = k + 1
			}
			i = s.format(b, src, i, depth+1)
			if src[i] == ',' {
				b.WriteString(",\n")
				i++
				continue
			}
			b.WriteByte('\n')
			s.indent(b, depth)
			b.WriteByte(closer)
			return i + 1
		}
	}
	end := skipCompact(src, i)
	b.Write(src[i:end])
	return end
}

// inline writes a compact value on one line, spaced if the style says so.
func (s Style) inline(b *bytes.Buffer, v []byte) {
	if !s.Spaced {
		b.Write(v)
		return
	}
	for j := 0; j < len(v); j++ {
		if v[j] == '"' {
			k := skipCompact(v, j)
			b.Write(v[j:k])
			j = k - 1
			continue
		}
		b.WriteByte(v[j])
		if v[j] == ',' || v[j] == ':' {
			b.WriteByte(' ')
		}
	}
}

func (s Style) indent(b *bytes.Buffer, depth int) {
	for range depth {
		b.WriteString(s.Indent)
	}
}

// skipCompact returns the offset after the compact JSON value at src[i].
func skipCompact(src []byte, i int) int {
	switch src[i] {
	case '"':
		for j := i + 1; j < len(src); j++ {
			switch src[j] {
			case '\\':
				j++
			case '"':
				return j + 1
			}
		}
		return len(src)
	case '{', '[':
		depth := 0
		for j := i; j < len(src); j++ {
			switch src[j] {
			case '"':
				j = skipCompact(src, j) - 1
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

// Writer writes one JSON object field by field, so that a large file
// streams: Field writes a field laid out by the style at depth 1, List a
// list one entry a line, and Close the closing brace. The first error
// stops all writing and is returned by Close.
type Writer struct {
	w      *bufio.Writer
	style  Style
	buf    bytes.Buffer // the compact encoding of one value
	out    bytes.Buffer // its layout
	enc    *json.Encoder
	fields int
	err    error
}

// NewWriter returns a Writer on w in style s.
func NewWriter(w io.Writer, s Style) *Writer {
	jw := &Writer{w: bufio.NewWriterSize(w, 1<<16), style: s}
	jw.enc = json.NewEncoder(&jw.buf)
	jw.enc.SetEscapeHTML(false)
	return jw
}

func (w *Writer) raw(s string) {
	if w.err == nil {
		_, w.err = w.w.WriteString(s)
	}
}

// begin writes what comes before a field: the opening brace or a comma.
func (w *Writer) begin(name string) {
	if w.fields == 0 {
		w.raw("{\n")
	} else {
		w.raw(",\n")
	}
	w.fields++
	w.raw(w.style.Indent)
	w.raw(strconv.Quote(name))
	w.raw(": ")
}

// value writes v laid out at depth; name and index (-1 for none) name
// it in an error.
func (w *Writer) value(v any, depth int, name string, index int) {
	if w.err != nil {
		return
	}
	w.buf.Reset()
	if err := w.enc.Encode(v); err != nil {
		err = encodeError(v, err)
		if e, ok := err.(*Error); ok {
			path := []segment{{key: name, index: -1}}
			if index >= 0 {
				path = append(path, segment{index: index})
			}
			for i := range e.Problems {
				e.Problems[i].Path = joinPath(formatPath(path), e.Problems[i].Path)
			}
		}
		w.err = err
		return
	}
	compact := bytes.TrimSuffix(w.buf.Bytes(), []byte("\n"))
	w.out.Reset()
	w.style.format(&w.out, compact, 0, depth)
	_, w.err = w.w.Write(w.out.Bytes())
}

// Field writes the field name with value v.
func (w *Writer) Field(name string, v any) {
	w.begin(name)
	w.value(v, 1, name, -1)
}

// List writes the field name holding a list of n entries, one a line,
// entry i being elem(i).
func (w *Writer) List(name string, n int, elem func(i int) any) {
	w.begin(name)
	if n == 0 {
		w.raw("[]")
		return
	}
	w.raw("[\n")
	for i := range n {
		w.raw(w.style.Indent)
		w.raw(w.style.Indent)
		w.value(elem(i), 2, name, i)
		if i < n-1 {
			w.raw(",\n")
		}
		if w.err != nil {
			return
		}
	}
	w.raw("\n")
	w.raw(w.style.Indent)
	w.raw("]")
}

// Close ends the object and flushes; it returns the first error.
func (w *Writer) Close() error {
	if w.fields == 0 {
		w.raw("{")
	} else {
		w.raw("\n")
	}
	w.raw("}\n")
	if w.err != nil {
		return w.err
	}
	return w.w.Flush()
}
