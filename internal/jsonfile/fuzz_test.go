package jsonfile

import (
	"bytes"
	"encoding/json"
	"reflect"
	"testing"
)

// FuzzDecode checks Decode against encoding/json: it never panics, every
// message stays short, and whatever it accepts encoding/json (with
// unknown fields refused) accepts too and decodes to the same value, which
// Marshal writes and Decode reads back to the same file.
func FuzzDecode(f *testing.F) {
	for _, s := range []string{
		`{"name": "x", "count": 3, "size_nm": 1.5, "on": true, "at_nm": [1, 2], "points_nm": [[0, 0]], "tags": ["a"], "inner": {"kind": "k", "next": {"width": 2}}, "items": [{}]}`,
		`{"size_nm": NaN, "count": 1e3, "NaMe": 1, "name": "a", "name": "b"}`,
		`{"items": [{"kind": "\ud83d\ude00\u00e9\n"}], "tags": null}`,
		`[1, 2`, ``, `{"at_nm": [1, 2, 3]}`, `{"x": [[[[{"y": -Infinity}]]]]}`,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		var got sample
		var ps Problems
		ok := Decode(data, &got, &ps, Options{MaxString: 1000, MaxList: 1000})
		for _, p := range ps.List() {
			if len(p.String()) > 400 {
				t.Fatalf("message of %d bytes: %.400s", len(p.String()), p.String())
			}
		}
		Locate(data, ps.List())
		if !ok || ps.Len() > 0 {
			return
		}
		var want sample
		dec := json.NewDecoder(bytes.NewReader(data))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&want); err != nil {
			t.Fatalf("Decode accepted what encoding/json refuses (%v):\n%q", err, data)
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("Decode = %+v\nencoding/json = %+v", got, want)
		}
		out, err := Marshal(got, Readable)
		if err != nil {
			t.Fatal(err)
		}
		var back sample
		var ps2 Problems
		if !Decode(out, &back, &ps2, Options{MaxString: 1000, MaxList: 1000}) || ps2.Len() > 0 {
			t.Fatalf("written value does not read back: %v\n%s", ps2.List(), out)
		}
		// Compared as files: omitempty turns an empty list into none.
		if again, _ := Marshal(back, Readable); !bytes.Equal(again, out) {
			t.Fatalf("write -> read -> write changed the file:\n%s\n---\n%s", out, again)
		}
	})
}
