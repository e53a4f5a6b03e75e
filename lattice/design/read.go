package design

import (
	"errors"
	"reflect"

	"dimerpath/internal/jsonfile"
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
	// MaxStringBytes bounds every string of the file (names, notes).
	MaxStringBytes = 10000
	// MaxArrayCopies bounds the copies of one array and, summed, of all
	// arrays of a variant: 4·10^6, the largest donor array the planner
	// is measured on (BenchmarkPlanArray, issue 14).
	MaxArrayCopies = 4_000_000
	// MaxPaintedWords bounds the storage of all painted and erased site
	// sets of a file together, in 64-bit words (256 MiB).
	MaxPaintedWords = 1 << 25
)

// Load reads and validates the design file at path; see Parse. A file
// larger than MaxFileBytes is refused before it is read.
func Load(path string) (*Design, error) {
	data, err := jsonfile.ReadFile(path, MaxFileBytes, ErrInvalid)
	if err != nil {
		return nil, err
	}
	return Parse(path, data)
}

// Parse decodes and validates a design file; name is used in messages
// only. It reports every problem it finds as a *jsonfile.Error wrapping
// ErrInvalid, each with its JSON path, line and column: first the file's
// structure (syntax, types, unknown fields, non-finite numbers such as
// NaN, which JSON cannot hold but hand-edited files do), then the
// design's meaning (see Validate), leaving out problems inside values
// already refused. It never panics, whatever the input.
func Parse(name string, data []byte) (*Design, error) {
	var ps problems
	if len(data) > MaxFileBytes {
		ps.Add(jsonfile.Problem{Message: "the file holds " + jsonfile.Bytes(int64(len(data))) + ", more than the " +
			jsonfile.Bytes(MaxFileBytes) + " limit for a design", Err: jsonfile.ErrTooLarge})
		return nil, ps.err(name)
	}
	var d Design
	sites := siteBudget{}
	opt := jsonfile.Options{What: "the design", MaxString: MaxStringBytes, MaxList: MaxListLen,
		Types: map[reflect.Type]func([]byte, reflect.Value) error{siteSetType: sites.decode}}
	if !jsonfile.Decode(data, &d, &ps.Problems, opt) {
		return nil, ps.err(name)
	}
	refused := ps.List()
	for _, p := range refused {
		if p.Path == "" {
			return nil, ps.err(name) // not a design at all
		}
	}
	// Check the meaning too, so that one run reports every problem, but
	// say nothing more about values already refused.
	var meaning problems
	d.validate(&meaning)
	first := len(refused)
	for _, p := range meaning.List() {
		if !under(p.Path, refused) {
			ps.Add(p)
		}
	}
	if list := ps.List(); len(list) > first {
		jsonfile.Locate(data, list[first:])
	}
	if err := ps.err(name); err != nil {
		return nil, err
	}
	return &d, nil
}

// under reports whether path lies at or inside a refused value.
func under(path string, refused []jsonfile.Problem) bool {
	for _, r := range refused {
		if jsonfile.Under(path, r.Path) {
			return true
		}
	}
	return false
}

// Validate checks the meaning of a design built in memory (as the GUI
// does) and returns a *jsonfile.Error listing every problem, or nil.
func (d *Design) Validate() error {
	var ps problems
	d.validate(&ps)
	return ps.err("")
}

var siteSetType = reflect.TypeFor[lattice.SiteSet]()

// siteBudget decodes the painted and erased site sets of one file within
// MaxPaintedWords of storage in all.
type siteBudget struct {
	words  int
	failed bool
}

func (b *siteBudget) decode(raw []byte, dst reflect.Value) error {
	if len(raw) == 0 || raw[0] != '{' {
		return &jsonfile.ValueError{Message: `want a site set {"sites": N, "rows": [...]}, not ` + describeJSON(raw)}
	}
	if b.failed {
		return &jsonfile.ValueError{Message: "not read: the file's site storage limit is already exceeded"}
	}
	var s lattice.SiteSet
	if err := s.UnmarshalJSON(raw); err != nil {
		var se *lattice.SiteSetError
		if errors.As(err, &se) {
			return &jsonfile.ValueError{Path: se.Path, Message: se.Msg}
		}
		return err
	}
	b.words += s.StorageWords()
	if b.words > MaxPaintedWords {
		b.failed = true
		return &jsonfile.ValueError{Message: "the painted and erased sites of the file need more than " +
			jsonfile.Bytes(MaxPaintedWords*8) + " of storage, the limit"}
	}
	dst.Set(reflect.ValueOf(s))
	return nil
}

// describeJSON names the kind of a JSON value from its text.
func describeJSON(raw []byte) string {
	if len(raw) == 0 {
		return "nothing"
	}
	switch raw[0] {
	case '[':
		return "a list"
	case '"':
		return "a string"
	case 'n':
		return "null"
	case 't', 'f':
		return "true or false"
	}
	return "a number"
}
