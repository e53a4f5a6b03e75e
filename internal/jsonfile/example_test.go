package jsonfile_test

import (
	"errors"
	"fmt"
	"os"

	"dimerpath/internal/jsonfile"
)

// settings is a small file schema: the json tags are the file's field
// names, omitempty marks the optional ones.
type settings struct {
	Name    string       `json:"name"`
	SettleS float64      `json:"settle_s"`
	Passes  int          `json:"passes,omitempty"`
	Marks   [][2]float64 `json:"marks_nm,omitempty"`
}

var errSettings = errors.New("invalid settings")

// Decode reports every problem of a file in one run, each with its JSON
// path, line and column; the refused values stay zero.
func ExampleDecode() {
	data := []byte(`{
  "name": "rt",
  "settle_s": NaN,
  "Passes": 2,
  "passes": 2.5
}`)
	var s settings
	var ps jsonfile.Problems
	jsonfile.Decode(data, &s, &ps, jsonfile.Options{What: "the settings"})
	err := ps.Err("rt.json", errSettings)
	fmt.Println(err)
	fmt.Println(errors.Is(err, errSettings), s.Name, s.SettleS, s.Passes)
	// Output:
	// rt.json:3:15: settle_s: NaN is not a finite number
	// rt.json:4:3: Passes: unknown field: names are case-sensitive, did you mean "passes"?
	// rt.json:5:13: passes: 2.5 is not a whole number
	// true rt 0 0
}

// Problems found by checking the decoded value's meaning get their
// position from Locate.
func ExampleLocate() {
	data := []byte(`{
  "name": "rt",
  "settle_s": -1
}`)
	var s settings
	var ps jsonfile.Problems
	if !jsonfile.Decode(data, &s, &ps, jsonfile.Options{}) || ps.Len() > 0 {
		panic(ps.Err("rt.json", errSettings))
	}
	if s.SettleS < 0 {
		ps.AddValue("settle_s", s.SettleS, "must not be negative")
	}
	jsonfile.Locate(data, ps.List())
	fmt.Println(ps.Err("rt.json", errSettings))
	// Output:
	// rt.json:3:15: settle_s = -1: must not be negative
}

// TopString finds a file's format even when the rest is malformed, so
// that its problems are reported against the right schema.
func ExampleTopString() {
	format, ok := jsonfile.TopString([]byte(`{"total_s": NaN, "format": "dimerpath-plan", "strokes": [`), "format")
	fmt.Println(format, ok)
	// Output:
	// dimerpath-plan true
}

// Marshal lays a value out by a Style: Readable keeps short lists and
// records on one line, so that a file diffs well.
func ExampleMarshal() {
	out, err := jsonfile.Marshal(settings{Name: "room temperature", SettleS: 0.05, Marks: [][2]float64{{10, 20}, {30.5, 40}, {50, 60}, {70, 80}}}, jsonfile.Readable)
	if err != nil {
		panic(err)
	}
	fmt.Print(string(out))
	// Output:
	// {
	//   "name": "room temperature",
	//   "settle_s": 0.05,
	//   "marks_nm": [[10, 20], [30.5, 40], [50, 60], [70, 80]]
	// }
}

// Writer streams a large object field by field: List writes a long list
// one entry a line without holding the whole file.
func ExampleWriter() {
	w := jsonfile.NewWriter(os.Stdout, jsonfile.Compact)
	w.Field("format", "example")
	w.List("marks_nm", 3, func(i int) any { return [2]float64{float64(10 * i), 5} })
	if err := w.Close(); err != nil {
		panic(err)
	}
	// Output:
	// {
	//   "format": "example",
	//   "marks_nm": [
	//     [0,5],
	//     [10,5],
	//     [20,5]
	//   ]
	// }
}
