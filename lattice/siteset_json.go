package lattice

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strconv"
)

// Limits on a site set. They bound the memory a file can make dimerpath
// allocate: a set read from a file that breaks one is refused with a
// *SiteSetError rather than allocated.
const (
	// MaxTerraces is one more than the highest terrace index of a site.
	MaxTerraces = 64
	// MaxRows is one more than the highest row index: 65536 rows are
	// 50 µm of dimer rows, beyond any STM scan field.
	MaxRows = 1 << 16
	// MaxRowIndex is one more than the highest in-row index: 2^18 sites
	// are 50 µm along a row.
	MaxRowIndex = 1 << 18
	// MaxSiteSetSites is the most sites a decoded set may hold (2^28,
	// about 40 µm² of fully painted surface).
	MaxSiteSetSites = 1 << 28
	// MaxSiteSetWords is the most 64-bit storage words a decoded set may
	// need (32 MiB).
	MaxSiteSetWords = 1 << 22
)

// SiteSetError reports a malformed encoded site set. Path locates the bad
// value inside the set's JSON ("rows[3][4]"), empty for the whole set.
type SiteSetError struct {
	Path string
	Msg  string
}

func (e *SiteSetError) Error() string {
	if e.Path == "" {
		return "site set: " + e.Msg
	}
	return "site set: " + e.Path + ": " + e.Msg
}

// StorageWords returns the number of 64-bit words the set's rows hold,
// a measure of its memory use (8 bytes a word).
func (s *SiteSet) StorageWords() int {
	n := 0
	for _, tr := range s.terraces {
		for _, r := range tr.rows {
			n += len(r.words)
		}
	}
	return n
}

// MarshalJSON encodes the set run-length per row:
//
//	{"sites": 10, "rows": [[0, 12, 100, 6, 110, 4]]}
//
// Each row entry is [terrace, row, start, length, start, length, ...]:
// runs of consecutive in-row indices (Index = 2·Dimer+Side), sorted and
// separated. Rows are in row order; "sites" is the total, a check on the
// runs. A painted 1 µm x 1 µm rectangle (6.8·10^6 sites in 1302 rows)
// encodes in about 30 kB. Complexity O(words).
func (s *SiteSet) MarshalJSON() ([]byte, error) {
	var b []byte
	b = append(b, `{"sites":`...)
	b = strconv.AppendInt(b, int64(s.Count()), 10)
	b = append(b, `,"rows":[`...)
	first := true
	for t, tr := range s.terraces {
		for j, w := range tr.rows {
			r := tr.first + j
			if w.IsEmpty() {
				continue
			}
			if !first {
				b = append(b, ',')
			}
			first = false
			b = append(b, '[')
			b = strconv.AppendInt(b, int64(t), 10)
			b = append(b, ',')
			b = strconv.AppendInt(b, int64(r), 10)
			eachRun(w, func(start, end int) bool {
				b = append(b, ',')
				b = strconv.AppendInt(b, int64(start), 10)
				b = append(b, ',')
				b = strconv.AppendInt(b, int64(end-start), 10)
				return true
			})
			b = append(b, ']')
		}
	}
	b = append(b, "]}"...)
	return b, nil
}

// UnmarshalJSON decodes the encoding of MarshalJSON into s, replacing its
// contents. It validates everything before allocating: whole
// non-negative numbers, rows in strictly increasing (terrace, row) order,
// runs of positive length sorted without overlap, indices within
// MaxTerraces, MaxRows and MaxRowIndex, the declared "sites" total (when
// given) equal to the runs' sum and at most MaxSiteSetSites, and storage
// within MaxSiteSetWords. Errors are *SiteSetError.
func (s *SiteSet) UnmarshalJSON(data []byte) error {
	var raw struct {
		Sites *json.Number       `json:"sites"`
		Rows  *[]json.RawMessage `json:"rows"`
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	dec.DisallowUnknownFields()
	if err := dec.Decode(&raw); err != nil {
		return &SiteSetError{Msg: "want {\"sites\": N, \"rows\": [[terrace, row, start, length, ...], ...]}: " + err.Error()}
	}
	if raw.Rows == nil {
		return &SiteSetError{Path: "rows", Msg: "missing"}
	}
	declared := int64(-1)
	if raw.Sites != nil {
		n, err := wholeNumber(string(*raw.Sites), 0, MaxSiteSetSites)
		if err != nil {
			return &SiteSetError{Path: "sites", Msg: err.Error()}
		}
		declared = n
	}
	type run struct{ start, end int }
	type row struct {
		t, r int
		runs []run
	}
	parsed := make([]row, 0, len(*raw.Rows))
	total, words := int64(0), 0
	for i, msg := range *raw.Rows {
		path := fmt.Sprintf("rows[%d]", i)
		var vals []any
		d := json.NewDecoder(bytes.NewReader(msg))
		d.UseNumber()
		if err := d.Decode(&vals); err != nil {
			return &SiteSetError{Path: path, Msg: "want [terrace, row, start, length, ...]: " + err.Error()}
		}
		nums := make([]json.Number, len(vals))
		for k, v := range vals {
			n, ok := v.(json.Number)
			if !ok {
				return &SiteSetError{Path: fmt.Sprintf("%s[%d]", path, k), Msg: fmt.Sprintf("want a number, not %s", describeJSON(v))}
			}
			nums[k] = n
		}
		if len(nums) < 4 || len(nums)%2 != 0 {
			return &SiteSetError{Path: path, Msg: fmt.Sprintf("has %d numbers; want terrace, row and one or more start, length pairs", len(nums))}
		}
		t, err := wholeNumber(string(nums[0]), 0, MaxTerraces-1)
		if err != nil {
			return &SiteSetError{Path: path + "[0]", Msg: "terrace " + err.Error()}
		}
		r, err := wholeNumber(string(nums[1]), 0, MaxRows-1)
		if err != nil {
			return &SiteSetError{Path: path + "[1]", Msg: "row " + err.Error()}
		}
		if n := len(parsed); n > 0 {
			p := parsed[n-1]
			if int(t) < p.t || (int(t) == p.t && int(r) <= p.r) {
				return &SiteSetError{Path: path, Msg: fmt.Sprintf("terrace %d row %d does not follow terrace %d row %d (rows must be sorted and appear once)", t, r, p.t, p.r)}
			}
		}
		cur := row{t: int(t), r: int(r), runs: make([]run, 0, (len(nums)-2)/2)}
		end := 0
		for k := 2; k < len(nums); k += 2 {
			start, err := wholeNumber(string(nums[k]), 0, MaxRowIndex-1)
			if err != nil {
				return &SiteSetError{Path: fmt.Sprintf("%s[%d]", path, k), Msg: "run start " + err.Error()}
			}
			length, err := wholeNumber(string(nums[k+1]), 1, MaxRowIndex)
			if err != nil {
				return &SiteSetError{Path: fmt.Sprintf("%s[%d]", path, k+1), Msg: "run length " + err.Error()}
			}
			if int(start) < end {
				return &SiteSetError{Path: fmt.Sprintf("%s[%d]", path, k), Msg: fmt.Sprintf("run starts at %d, inside the previous run (which ends at %d): runs must be sorted and must not overlap", start, end)}
			}
			if start+length > MaxRowIndex {
				return &SiteSetError{Path: fmt.Sprintf("%s[%d]", path, k+1), Msg: fmt.Sprintf("run %d+%d ends beyond the largest in-row index %d", start, length, MaxRowIndex-1)}
			}
			end = int(start + length)
			cur.runs = append(cur.runs, run{int(start), end})
			total += length
			if total > MaxSiteSetSites {
				return &SiteSetError{Msg: fmt.Sprintf("holds more than %d sites, the limit", MaxSiteSetSites)}
			}
		}
		words += (end+63)/64 - cur.runs[0].start/64
		if words > MaxSiteSetWords {
			return &SiteSetError{Path: path, Msg: fmt.Sprintf("the set needs more than %d words (%d MiB) of storage, the limit", MaxSiteSetWords, MaxSiteSetWords*8>>20)}
		}
		parsed = append(parsed, cur)
	}
	if declared >= 0 && declared != total {
		return &SiteSetError{Path: "sites", Msg: fmt.Sprintf("declares %d sites but the runs hold %d", declared, total)}
	}
	*s = SiteSet{}
	for _, p := range parsed {
		// The row's words at once, so its storage is what the limit
		// above counted.
		s.row(p.t, p.r, true).ensure(p.runs[0].start>>6, (p.runs[len(p.runs)-1].end-1)>>6+1)
		for _, ru := range p.runs {
			s.AddRun(p.t, p.r, ru.start, ru.end)
		}
	}
	return nil
}

// wholeNumber parses a JSON number that must be a whole number in
// [lo, hi], with a message that quotes it otherwise.
func wholeNumber(text string, lo, hi int64) (int64, error) {
	n, err := strconv.ParseInt(text, 10, 64)
	if err != nil {
		f, ferr := strconv.ParseFloat(text, 64)
		switch {
		case ferr == nil && f == float64(int64(f)) && f >= float64(lo) && f <= float64(hi):
			return int64(f), nil
		case ferr == nil && f != float64(int64(f)) && f > -1e18 && f < 1e18:
			return 0, fmt.Errorf("%s is not a whole number", text)
		}
		return 0, fmt.Errorf("%s is out of range [%d, %d]", text, lo, hi)
	}
	if n < lo || n > hi {
		return 0, fmt.Errorf("%s is out of range [%d, %d]", text, lo, hi)
	}
	return n, nil
}

// describeJSON names the JSON type of a decoded value for messages.
func describeJSON(v any) string {
	switch v := v.(type) {
	case nil:
		return "null"
	case bool:
		return fmt.Sprintf("%v", v)
	case string:
		return fmt.Sprintf("the string %q", v)
	case []any:
		return "an array"
	case map[string]any:
		return "an object"
	}
	return fmt.Sprintf("%v", v)
}
