package jsonfile

import (
	"sort"
	"strconv"
	"strings"
)

// Locate sets the line and column of each problem in ps that has a path
// but no position, from data, the file the problems are about: problems
// found by checking a decoded value's meaning, after Decode. A path the
// file does not hold (a field left out) gets the position of its nearest
// enclosing value that it does hold. One pass over the file, skipping
// every value no path leads into.
func Locate(data []byte, ps []Problem) {
	var want []*wanted
	for i := range ps {
		if ps[i].Line == 0 {
			segs, ok := parsePath(ps[i].Path)
			if ok {
				want = append(want, &wanted{p: &ps[i], path: segs, off: -1})
			}
		}
	}
	if len(want) == 0 {
		return
	}
	s := &scanner{data: data}
	locate(s, want, 0)
	sort.Slice(want, func(i, j int) bool { return want[i].off < want[j].off })
	lc := lineCounter{data: data}
	for _, w := range want {
		if w.off >= 0 {
			w.p.Line, w.p.Column = lc.at(w.off)
		}
	}
}

// offsetOf returns the offset in data of the value at path, or of its
// nearest enclosing value that data holds; -1 when path does not parse.
func offsetOf(data []byte, path string) int {
	segs, ok := parsePath(path)
	if !ok {
		return -1
	}
	w := &wanted{path: segs, off: -1}
	locate(&scanner{data: data}, []*wanted{w}, 0)
	return w.off
}

type wanted struct {
	p    *Problem
	path []segment
	off  int // offset of the deepest value found on the path
}

// locate walks the value at the scanner's position, at depth along the
// wanted paths.
func locate(s *scanner, want []*wanted, depth int) {
	s.skipSpace()
	var deeper []*wanted
	for _, w := range want {
		w.off = s.pos
		if len(w.path) > depth {
			deeper = append(deeper, w)
		}
	}
	if len(deeper) == 0 || s.err != nil {
		s.skipValue()
		return
	}
	switch s.peek() {
	case '{':
		byKey := map[string][]*wanted{}
		for _, w := range deeper {
			if seg := w.path[depth]; seg.key != "" {
				byKey[seg.key] = append(byKey[seg.key], w)
			}
		}
		s.pos++
		if s.peek() == '}' {
			s.pos++
			return
		}
		for s.err == nil {
			if s.peek() != '"' {
				s.expect('"', "a field name")
				return
			}
			raw, esc := s.stringBytes()
			if !s.expect(':', "':'") {
				return
			}
			if next := byKey[unescape(raw, esc)]; len(next) > 0 {
				locate(s, next, depth+1)
			} else {
				s.skipValue()
			}
			if !s.next('}') {
				return
			}
		}
	case '[':
		byIndex := map[int][]*wanted{}
		for _, w := range deeper {
			if seg := w.path[depth]; seg.key == "" {
				byIndex[seg.index] = append(byIndex[seg.index], w)
			}
		}
		s.pos++
		if s.peek() == ']' {
			s.pos++
			return
		}
		for i := 0; s.err == nil; i++ {
			if next := byIndex[i]; len(next) > 0 {
				locate(s, next, depth+1)
			} else {
				s.skipValue()
			}
			if !s.next(']') {
				return
			}
		}
	default:
		s.skipValue()
	}
}

// parsePath splits a path as formatPath writes it.
func parsePath(path string) ([]segment, bool) {
	var segs []segment
	for path != "" {
		switch path[0] {
		case '.':
			path = path[1:]
		case '[':
			end := strings.IndexByte(path, ']')
			if end < 0 {
				return nil, false
			}
			inner := path[1:end]
			if strings.HasPrefix(inner, `"`) {
				// A quoted key may hold ']'.
				q, err := strconv.QuotedPrefix(path[1:])
				if err != nil {
					return nil, false
				}
				key, _ := strconv.Unquote(q)
				segs = append(segs, segment{key: key, index: -1})
				path = strings.TrimPrefix(path[1+len(q):], "]")
				continue
			}
			n, err := strconv.Atoi(inner)
			if err != nil {
				return nil, false
			}
			segs = append(segs, segment{index: n})
			path = path[end+1:]
		default:
			end := strings.IndexAny(path, ".[")
			if end < 0 {
				end = len(path)
			}
			segs = append(segs, segment{key: path[:end], index: -1})
			path = path[end:]
		}
	}
	return segs, true
}

// TopField returns the JSON text of the top-level field name of the
// object in data, found by a lenient scan that stops at the field: the
// values before it may hold NaN and the rest of the file may be
// malformed or cut off. ok is false when data is not an object or the
// field does not come before the first syntax error.
func TopField(data []byte, name string) (raw []byte, ok bool) {
	s := &scanner{data: data}
	if s.peek() != '{' {
		return nil, false
	}
	s.pos++
	if s.peek() == '}' {
		return nil, false
	}
	for s.err == nil {
		if s.peek() != '"' {
			return nil, false
		}
		k, esc := s.stringBytes()
		if !s.expect(':', "':'") {
			return nil, false
		}
		start, end := s.skipValue()
		if s.err != nil {
			return nil, false
		}
		if unescape(k, esc) == name {
			return data[start:end], true
		}
		if s.peek() != ',' {
			return nil, false
		}
		s.pos++
	}
	return nil, false
}

// TopString returns the top-level string field name (see TopField), or
// ok false when it is absent or not a string.
func TopString(data []byte, name string) (value string, ok bool) {
	raw, ok := TopField(data, name)
	if !ok || len(raw) < 2 || raw[0] != '"' {
		return "", false
	}
	s := &scanner{data: raw}
	content, esc := s.stringBytes()
	if s.err != nil {
		return "", false
	}
	return unescape(content, esc), true
}

// SyntaxProblem reports the first syntax error of data, one JSON value
// (what names it in the message), as Decode would, without decoding it.
func SyntaxProblem(data []byte, what string) (Problem, bool) {
	s := &scanner{data: data}
	if s.peek() == 0 {
		s.failEOF()
	} else {
		s.skipValue()
		if s.err == nil && s.peek() != 0 {
			s.fail(s.pos, "more data after %s", what)
		}
	}
	if s.err == nil {
		return Problem{}, false
	}
	return syntaxProblem(data, s.err, what), true
}
