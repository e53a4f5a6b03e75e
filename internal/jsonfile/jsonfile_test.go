package jsonfile

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"runtime"
	"strconv"
	"strings"
	"testing"
)

// sample is a schema with every kind Decode handles.
type sample struct {
	Name   string       `json:"name"`
	Count  int          `json:"count"`
	Seed   int64        `json:"seed,omitempty"`
	Size   float64      `json:"size_nm"`
	On     bool         `json:"on"`
	At     [2]float64   `json:"at_nm"`
	Points [][2]float64 `json:"points_nm,omitempty"`
	Tags   []string     `json:"tags"`
	Inner  *inner       `json:"inner,omitempty"`
	Items  []inner      `json:"items"`
	Skip   string       `json:"-"`
	hidden int
}

type inner struct {
	Kind  string  `json:"kind"`
	Width float64 `json:"width"`
	Next  *inner  `json:"next,omitempty"`
}

var errSample = errors.New("invalid sample")

func decodeSample(t *testing.T, in string, opt Options) (sample, []Problem, bool) {
	t.Helper()
	var s sample
	var ps Problems
	ok := Decode([]byte(in), &s, &ps, opt)
	return s, ps.List(), ok
}

func TestDecodeAccepts(t *testing.T) {
	in := `{"name": "a\u00e9\n", "count": 3, "seed": -9007199254740993, "size_nm": 1.5e2, "on": true,
	  "at_nm": [1, -2.5], "points_nm": [[0, 0], [1e-3, 2E+2]], "tags": [], "inner": {"kind": "x", "width": 0},
	  "items": [{"kind": "y", "width": 2, "next": {"kind": "z", "width": 3}}, {"kind": "w", "width": -0}]}`
	got, ps, ok := decodeSample(t, in, Options{})
	if !ok || len(ps) != 0 {
		t.Fatalf("Decode = %v, %v", ok, ps)
	}
	// encoding/json is the reference for what valid JSON decodes to.
	var want sample
	if err := json.Unmarshal([]byte(in), &want); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("Decode = %+v\nencoding/json = %+v", got, want)
	}
}

func TestDecodeOverlaysAndNull(t *testing.T) {
	s := sample{Name: "keep", Count: 7, Tags: []string{"old"}, Inner: &inner{Kind: "k"}}
	var ps Problems
	if !Decode([]byte(`{"count": 2, "tags": null, "inner": null}`), &s, &ps, Options{}) || ps.Len() != 0 {
		t.Fatalf("problems %v", ps.List())
	}
	if s.Name != "keep" || s.Count != 2 || s.Tags != nil || s.Inner != nil {
		t.Errorf("after overlay: %+v", s)
	}
}

func TestDecodeRefuses(t *testing.T) {
	cases := []struct {
		name, in string
		want     []string // each problem as "line:col path: message" fragments, in order
		complete bool
	}{
		{"empty", ``, []string{"the file ends before the sample does (truncated?)"}, false},
		{"truncated", `{"name": "x", "count": 1`, []string{"the file ends before the sample does"}, false},
		{"syntax", "{\n  \"name\": \"x\",, }", []string{"2:15 not valid JSON: ',' where a field name in double quotes should be"}, false},
		{"bare word", `{"name": hello}`, []string{`1:10 not valid JSON: "hello" where a value should be`}, false},
		{"leading zero", `{"count": 012}`, []string{`not valid JSON: "012" is not a number`}, false},
		{"trailing data", `{"name": "x"} {}`, []string{"1:15 not valid JSON: more data after the sample"}, false},
		{"not an object", `[1, 2]`, []string{"1:1 want an object, not a list"}, true},
		{"unknown field", `{"name": "x", "colour": "red"}`, []string{"1:15 colour: unknown field (known here: name, count, seed, size_nm, on, at_nm, points_nm, tags, inner, items)"}, true},
		{"case", `{"NaMe": "x"}`, []string{`NaMe: unknown field: names are case-sensitive, did you mean "name"?`}, true},
		{"twice", `{"name": "x", "name": "y"}`, []string{"1:15 name: given twice in this object"}, true},
		{"NaN", `{"size_nm": NaN}`, []string{"1:13 size_nm: NaN is not a finite number"}, true},
		{"-Infinity in a list", `{"points_nm": [[0, 1], [2, -Infinity]]}`, []string{"points_nm[1][1]: -Infinity is not a finite number"}, true},
		{"1e400", `{"size_nm": 1e400}`, []string{"size_nm: 1e400 is not a finite number"}, true},
		{"string for number", `{"size_nm": "200"}`, []string{`size_nm: want a number, not the string "200"`}, true},
		{"number for string", `{"name": 7}`, []string{"name: want a string, not the number 7"}, true},
		{"fraction", `{"count": 1.5}`, []string{"count: 1.5 is not a whole number"}, true},
		{"exponent", `{"count": 1e3}`, []string{"count: 1e3: write whole numbers without a fraction or exponent"}, true},
		{"int range", `{"count": 99999999999}`, []string{"count: 99999999999 is out of range"}, true},
		{"NaN count", `{"count": NaN}`, []string{"count: NaN is not a whole number"}, true},
		{"null number", `{"size_nm": null}`, []string{"size_nm: want a number, not null"}, true},
		{"pair of three", `{"at_nm": [1, 2, 3]}`, []string{"1:11 at_nm: want 2 numbers, has 3"}, true},
		{"bool", `{"on": "yes"}`, []string{`on: want true or false, not the string "yes"`}, true},
		{"deep", `{"inner": {"kind": "a", "next": {"next": {"next": {"width": "w"}}}}}`, []string{"inner.next.next.next.width: want a number"}, true},
		{"every problem", `{"name": 1, "count": "2", "size_nm": NaN, "items": [{"kind": 3}, {"width": true}]}`, []string{
			"name: want a string", "count: want a whole number", "size_nm: NaN", "items[0].kind: want a string", "items[1].width: want a number"}, true},
		{"long value quoted short", `{"name": ` + strings.Repeat("9", 5000) + `}`, []string{"name: want a string, not the number 9999999999999999999999999999999999999999…"}, true},
		{"long key", `{"` + strings.Repeat("k", 5000) + `": 1}`, []string{`["kkkkkkkk`}, true},
		{"odd key", `{"a.b": 1}`, []string{`["a.b"]: unknown field`}, true},
		{"control character", "{\"name\": \"a\tb\"}", []string{"not valid JSON: control character U+0009 in a string"}, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, ps, ok := decodeSample(t, tc.in, Options{What: "the sample", MaxString: 100})
			if ok != tc.complete {
				t.Errorf("complete = %v, want %v", ok, tc.complete)
			}
			if len(ps) != len(tc.want) {
				t.Fatalf("%d problems %v, want %d", len(ps), ps, len(tc.want))
			}
			for i, w := range tc.want {
				got := ps[i].String()
				if ps[i].Line > 0 {
					got = strings.TrimSpace(strings.Join([]string{itoa(ps[i].Line) + ":" + itoa(ps[i].Column), got}, " "))
				}
				if !strings.Contains(got, w) {
					t.Errorf("problem %d = %q, want it to contain %q", i, got, w)
				}
				if len(got) > 300 {
					t.Errorf("problem %d is %d bytes long", i, len(got))
				}
			}
		})
	}
}

func itoa(n int) string { return strconv.Itoa(n) }

func TestDecodeLimits(t *testing.T) {
	t.Run("list", func(t *testing.T) {
		_, ps, _ := decodeSample(t, `{"tags": ["a", "b", "c", "d"]}`, Options{MaxList: 3})
		if len(ps) != 1 || !strings.Contains(ps[0].String(), "tags: has 4 entries, more than the limit of 3") {
			t.Errorf("problems %v", ps)
		}
	})
	t.Run("string", func(t *testing.T) {
		_, ps, _ := decodeSample(t, `{"name": "`+strings.Repeat("x", 101)+`"}`, Options{MaxString: 100})
		if len(ps) != 1 || !strings.Contains(ps[0].String(), "string of 101 bytes is longer than the limit of 100") {
			t.Errorf("problems %v", ps)
		}
	})
	t.Run("depth", func(t *testing.T) {
		in := `{"inner": ` + strings.Repeat(`{"next": `, 70) + `{}` + strings.Repeat("}", 71)
		_, ps, _ := decodeSample(t, in, Options{})
		if len(ps) != 1 || !strings.Contains(ps[0].String(), "nested deeper than 64 levels") {
			t.Errorf("problems %v", ps)
		}
	})
	t.Run("skipped depth", func(t *testing.T) {
		in := `{"colour": ` + strings.Repeat("[", 100000) + strings.Repeat("]", 100000) + `}`
		_, ps, ok := decodeSample(t, in, Options{})
		if ok || len(ps) != 2 || !strings.Contains(ps[1].String(), "nested deeper than 1000 levels") {
			t.Errorf("problems %v", ps)
		}
	})
	t.Run("problems", func(t *testing.T) {
		var b strings.Builder
		b.WriteString(`{"items": [`)
		for i := range 600 {
			if i > 0 {
				b.WriteString(",")
			}
			b.WriteString(`{"width": "w"}`)
		}
		b.WriteString("]}")
		var s sample
		var ps Problems
		Decode([]byte(b.String()), &s, &ps, Options{})
		err := ps.Err("f.json", errSample)
		if ps.Len() != 600 || len(ps.List()) != MaxProblems || !strings.HasSuffix(err.Error(), "f.json: 100 more problems not shown (the first 500 are listed)") {
			t.Errorf("%d problems, %d listed", ps.Len(), len(ps.List()))
		}
	})
}

func TestErrorFormat(t *testing.T) {
	e := &Error{File: "d.json", Kind: errSample, Problems: []Problem{
		{Path: "a.b", Line: 3, Column: 7, Message: "-5 must be more than 0"},
		{Path: "settle_s", Value: 1e306, Message: "must be at most 3600 s"},
		{Message: "the file ends early", Err: ErrSyntax},
	}}
	want := "d.json:3:7: a.b: -5 must be more than 0\nd.json: settle_s = 1e+306: must be at most 3600 s\nd.json: the file ends early"
	if e.Error() != want {
		t.Errorf("Error() =\n%s\nwant\n%s", e, want)
	}
	if !errors.Is(e, errSample) || !errors.Is(e, ErrSyntax) || errors.Is(e, ErrTooLarge) {
		t.Errorf("errors.Is does not see the sentinels")
	}
	e.File = ""
	if got := e.Error(); !strings.HasPrefix(got, "line 3, column 7: a.b: ") {
		t.Errorf("without a file: %q", got)
	}
}

func TestQuote(t *testing.T) {
	cases := []struct {
		v    any
		want string
	}{
		{1e306, "1e+306"},
		{5e-324, "5e-324"},
		{0.9999999999, "0.9999999999"},
		{1772.9388372405147, "1772.9388372405147"},
		{1e20, "1e+20"},
		{86400, "86400"},
		{1e6, "1e+06"},
		{0.0001, "0.0001"},
		{1e21, "1e+21"},
		{math.MaxFloat64, "1.7976931348623157e+308"},
		{math.NaN(), "NaN"},
		{math.Inf(-1), "-Inf"},
		{3, "3"},
		{"short", `"short"`},
		{strings.Repeat("ü", 50), `"` + strings.Repeat("ü", 20) + `…"`},
	}
	for _, c := range cases {
		t.Run(c.want, func(t *testing.T) {
			if got := Quote(c.v); got != c.want {
				t.Errorf("Quote(%v) = %s, want %s", c.v, got, c.want)
			}
		})
	}
}

func TestLocate(t *testing.T) {
	data := []byte("{\n  \"name\": \"x\",\n  \"items\": [\n    {\"kind\": \"a\"},\n    {\"kind\": \"b\", \"width\": -1}\n  ],\n  \"odd key\": {\"v\": 1}\n}\n")
	ps := []Problem{
		{Path: "items[1].width", Message: "negative"},
		{Path: "name", Message: "bad"},
		{Path: "items[0].width", Message: "missing"}, // absent: its object
		{Path: "items[7]", Message: "no such entry"}, // absent: the list
		{Path: `["odd key"].v`, Message: "quoted"},
		{Path: "", Message: "whole file"},
		{Path: "name", Line: 9, Column: 9, Message: "kept"},
	}
	Locate(data, ps)
	want := [][2]int{{5, 28}, {2, 11}, {4, 5}, {3, 12}, {7, 20}, {1, 1}, {9, 9}}
	for i, w := range want {
		if ps[i].Line != w[0] || ps[i].Column != w[1] {
			t.Errorf("%s at %d:%d, want %d:%d", ps[i].Path, ps[i].Line, ps[i].Column, w[0], w[1])
		}
	}
}

func TestTopString(t *testing.T) {
	cases := []struct {
		in, want string
		ok       bool
	}{
		{`{"format": "dimerpath-plan", "version": 1}`, "dimerpath-plan", true},
		{`{"total_s": NaN, "x": [1, Infinity], "format": "dimerpath-plan", "rest": `, "dimerpath-plan", true},
		{`{"a": {"format": "inner"}, "format": "outer"}`, "outer", true},
		{`{"format": 7}`, "", false},
		{`{"a": ]`, "", false},
		{`[{"format": "x"}]`, "", false},
		{`{"form\u0061t": "escaped"}`, "escaped", true},
	}
	for _, c := range cases {
		t.Run(c.in, func(t *testing.T) {
			got, ok := TopString([]byte(c.in), "format")
			if got != c.want || ok != c.ok {
				t.Errorf("TopString(%s) = %q, %v; want %q, %v", c.in, got, ok, c.want, c.ok)
			}
		})
	}
}

func TestMarshalStyles(t *testing.T) {
	v := sample{Name: "a<b>&c", Count: 2, At: [2]float64{1, 2}, Points: [][2]float64{{0, 0}, {1.5, 2}}, Tags: []string{},
		Items: []inner{{Kind: "k", Width: 1, Next: &inner{Kind: "n"}}}}
	// Indented is encoding/json's MarshalIndent without HTML escaping.
	var ref bytes.Buffer
	enc := json.NewEncoder(&ref)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		t.Fatal(err)
	}
	got, err := Marshal(v, Indented)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, ref.Bytes()) {
		t.Errorf("Indented:\n%s\nencoding/json:\n%s", got, ref.Bytes())
	}
	readable, _ := Marshal(v, Readable)
	for _, line := range []string{`  "at_nm": [1, 2],`, `  "points_nm": [[0, 0], [1.5, 2]],`, `  "tags": [],`, `      "next": {"kind": "n", "width": 0}`} {
		if !bytes.Contains(readable, []byte(line+"\n")) {
			t.Errorf("Readable lacks the line %q:\n%s", line, readable)
		}
	}
	var back sample
	var ps Problems
	if !Decode(readable, &back, &ps, Options{}) || ps.Len() != 0 || !reflect.DeepEqual(back, v) {
		t.Errorf("Readable does not read back: %v %+v", ps.List(), back)
	}
}

func TestMarshalRefusesNonFinite(t *testing.T) {
	v := sample{Items: []inner{{}, {Next: &inner{Width: math.Inf(1)}}}}
	_, err := Marshal(v, Indented)
	if err == nil || err.Error() != "items[1].next.width = +Inf: JSON cannot hold a number that is not finite" {
		t.Errorf("Marshal = %v", err)
	}
	var buf bytes.Buffer
	w := NewWriter(&buf, Compact)
	w.Field("name", "x")
	w.List("items", 3, func(i int) any { return v.Items[min(i, 1)] })
	if err := w.Close(); err == nil || !strings.HasPrefix(err.Error(), "items[1].next.width = +Inf") {
		t.Errorf("Writer = %v", err)
	}
}

func TestWriterLayout(t *testing.T) {
	var buf bytes.Buffer
	w := NewWriter(&buf, Compact)
	w.Field("format", "x")
	w.Field("at", [2]float64{1, 2})
	w.List("items", 2, func(i int) any { return inner{Kind: "k", Width: float64(i)} })
	w.List("none", 0, nil)
	w.Field("inner", inner{Kind: "z"})
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	want := `{
  "format": "x",
  "at": [1,2],
  "items": [
    {"kind":"k","width":0},
    {"kind":"k","width":1}
  ],
  "none": [],
  "inner": {"kind":"z","width":0}
}
`
	if buf.String() != want {
		t.Errorf("Writer wrote\n%s\nwant\n%s", buf.String(), want)
	}
}

func TestBytes(t *testing.T) {
	for _, c := range []struct {
		n    int64
		want string
	}{{812, "812 bytes"}, {1536, "1.5 KiB"}, {1 << 20, "1 MiB"}, {64 << 20, "64 MiB"}, {1<<30 - 18, "1 GiB"}, {3 << 29, "1.5 GiB"}} {
		t.Run(c.want, func(t *testing.T) {
			if got := Bytes(c.n); got != c.want {
				t.Errorf("Bytes(%d) = %q, want %q", c.n, got, c.want)
			}
		})
	}
}

func TestReadFileLimit(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "big.json")
	// A sparse file: its size is known without writing its bytes.
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(1 << 30); err != nil {
		t.Skip("no sparse files here:", err)
	}
	f.Close()
	_, err = ReadFile(path, 64<<20, errSample)
	if !errors.Is(err, ErrTooLarge) || !errors.Is(err, errSample) || !strings.Contains(err.Error(), "big.json: the file holds 1 GiB, more than the 64 MiB limit") {
		t.Errorf("ReadFile(1 GiB) = %v", err)
	}
	small := filepath.Join(dir, "small.json")
	os.WriteFile(small, []byte("{}"), 0o644)
	if data, err := ReadFile(small, 2, errSample); err != nil || string(data) != "{}" {
		t.Errorf("ReadFile(small) = %q, %v", data, err)
	}
	if _, err := ReadFile(small, 1, errSample); !errors.Is(err, ErrTooLarge) {
		t.Errorf("ReadFile over the limit by one byte = %v", err)
	}
	if _, err := ReadAll(strings.NewReader("12345"), "pipe", 4, errSample); !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), "pipe: larger than 4 bytes") {
		t.Errorf("ReadAll over the limit = %v", err)
	}
	if _, err := ReadFile(dir, 100, errSample); err == nil || !strings.Contains(err.Error(), "is a directory") {
		t.Errorf("ReadFile(dir) = %v", err)
	}
}

// endless yields 'x' bytes without end and without allocating: a pipe
// that never closes.
type endless struct{}

func (endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = 'x'
	}
	return len(p), nil
}

// Issue 16 (review): an input of unknown size (a pipe) was read into a
// buffer grown by append, which allocated about five times what it held:
// 2 GB of RSS to refuse a 1 GiB pipe at the plan's 512 MiB limit. Read in
// chunks, a refused input is allocated about once and an accepted one
// at most three times (the chunks, the last one's unused part, and the
// joined copy).
func TestReadAllOfUnknownSizeAllocatesItOnce(t *testing.T) {
	const limit = 16 << 20
	cases := []struct {
		name     string
		in       io.Reader
		size     int64 // what ReadAll returns, or -1 for a refusal
		maxAlloc int64
	}{
		{"refused at the limit", endless{}, -1, limit * 5 / 4},
		{"accepted below the limit", io.LimitReader(endless{}, limit/2), limit / 2, limit * 3 / 2},
		{"exactly the limit", io.LimitReader(endless{}, limit), limit, limit * 3},
		{"one byte", strings.NewReader("x"), 1, 1 << 20},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			data, err := ReadAll(c.in, "pipe", limit, errSample)
			runtime.ReadMemStats(&after)
			switch {
			case c.size < 0 && !errors.Is(err, ErrTooLarge):
				t.Fatalf("ReadAll = %d bytes, %v; want ErrTooLarge", len(data), err)
			case c.size >= 0 && (err != nil || int64(len(data)) != c.size):
				t.Fatalf("ReadAll = %d bytes, %v; want %d bytes", len(data), err, c.size)
			}
			if got := int64(after.TotalAlloc - before.TotalAlloc); got > c.maxAlloc {
				t.Errorf("ReadAll allocated %s, more than %s", Bytes(got), Bytes(c.maxAlloc))
			}
		})
	}
}
