package tsplib

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"dimerpath/planner/route"
)

// MaxDimension is the largest DIMENSION Read accepts.
const MaxDimension = 1 << 24

// Sentinel errors wrapped by *ParseError.
var (
	ErrFormat      = errors.New("malformed")
	ErrUnsupported = errors.New("unsupported")
)

// ParseError reports a problem at a line of a TSPLIB file.
type ParseError struct {
	File string // as given to the reader
	Line int    // 1-based, 0 when the problem is the file as a whole
	What string // the keyword or section concerned
	Err  error
}

func (e *ParseError) Error() string {
	if e.Line == 0 {
		return fmt.Sprintf("%s: %s: %v", e.File, e.What, e.Err)
	}
	return fmt.Sprintf("%s:%d: %s: %v", e.File, e.Line, e.What, e.Err)
}

func (e *ParseError) Unwrap() error { return e.Err }

// Instance is a TSPLIB instance with node coordinates.
type Instance struct {
	Name       string
	Comment    string
	WeightType string // EUC_2D, CEIL_2D or ATT
	X, Y       []float64
}

// Len is the number of nodes.
func (in *Instance) Len() int { return len(in.X) }

// Dist is TSPLIB's integer length of the edge between nodes i and j
// (0-based): for EUC_2D nint(sqrt(dx^2+dy^2)), for CEIL_2D its ceiling,
// for ATT the pseudo-Euclidean distance of the TSPLIB95 documentation.
func (in *Instance) Dist(i, j int) int {
	dx, dy := in.X[i]-in.X[j], in.Y[i]-in.Y[j]
	switch in.WeightType {
	case "CEIL_2D":
		return int(math.Ceil(math.Sqrt(dx*dx + dy*dy)))
	case "ATT":
		r := math.Sqrt((dx*dx + dy*dy) / 10)
		t := int(r + 0.5)
		if float64(t) < r {
			return t + 1
		}
		return t
	}
	return int(math.Sqrt(dx*dx+dy*dy) + 0.5)
}

// TourLength is the length of the closed tour visiting the nodes in
// order (0-based), by Dist. It panics on an index out of range.
func (in *Instance) TourLength(order []int) int {
	sum := 0
	for k := range order {
		sum += in.Dist(order[k], order[(k+1)%len(order)])
	}
	return sum
}

// Items returns the nodes as route point items.
func (in *Instance) Items() []route.Item {
	items := make([]route.Item, in.Len())
	for i := range items {
		p := route.Point{X: in.X[i], Y: in.Y[i]}
		items[i] = route.Item{A: p, B: p}
	}
	return items
}

// header reads "KEY : VALUE" or "KEY: VALUE" lines; it returns the key
// in upper case.
func header(line string) (key, value string) {
	if i := strings.IndexByte(line, ':'); i >= 0 {
		return strings.ToUpper(strings.TrimSpace(line[:i])), strings.TrimSpace(line[i+1:])
	}
	f := strings.Fields(line)
	if len(f) == 0 {
		return "", ""
	}
	return strings.ToUpper(f[0]), strings.TrimSpace(strings.TrimPrefix(line, f[0]))
}

func newScanner(r io.Reader) *bufio.Scanner {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), route.MaxLineBytes)
	return sc
}

// Read reads an instance from r; file names the input in errors. Node
// numbers must be 1..DIMENSION, each once.
func Read(r io.Reader, file string) (*Instance, error) {
	sc := newScanner(r)
	in := &Instance{}
	dim := -1
	line := 0
	fail := func(what string, err error) error { return &ParseError{File: file, Line: line, What: what, Err: err} }
	inCoords := false
	seen := 0
	var have []bool
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" {
			continue
		}
		if inCoords {
			if text == "EOF" {
				inCoords = false
				break
			}
			f := strings.Fields(text)
			if len(f) != 3 {
				if _, err := strconv.Atoi(f[0]); err != nil {
					inCoords = false // the next section begins
					goto headerLine
				}
				return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: want \"node x y\", got %q", ErrFormat, text))
			}
			id, err := strconv.Atoi(f[0])
			if err != nil || id < 1 || id > dim {
				return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: node number %q not in 1..%d", ErrFormat, f[0], dim))
			}
			if have[id-1] {
				return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: node %d given twice", ErrFormat, id))
			}
			x, err1 := strconv.ParseFloat(f[1], 64)
			y, err2 := strconv.ParseFloat(f[2], 64)
			if err1 != nil || err2 != nil || math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) {
				return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: coordinates %q %q are not finite numbers", ErrFormat, short(f[1]), short(f[2])))
			}
			// The route engine refuses larger coordinates; say so here,
			// where the file and line are known.
			if math.Abs(x) > route.MaxCoordinate || math.Abs(y) > route.MaxCoordinate {
				return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: coordinates %s %s: a magnitude above %g, more than the route engine takes", ErrFormat, short(f[1]), short(f[2]), route.MaxCoordinate))
			}
			have[id-1] = true
			in.X[id-1], in.Y[id-1] = x, y
			seen++
			continue
		}
	headerLine:
		key, value := header(text)
		switch key {
		case "NAME":
			in.Name = value
		case "COMMENT":
			if in.Comment != "" {
				in.Comment += "\n"
			}
			in.Comment += value
		case "TYPE":
			if v := strings.ToUpper(value); v != "TSP" {
				return nil, fail("TYPE", fmt.Errorf("%w: %q (only TSP)", ErrUnsupported, value))
			}
		case "DIMENSION":
			n, err := strconv.Atoi(value)
			if err != nil || n < 1 || n > MaxDimension {
				return nil, fail("DIMENSION", fmt.Errorf("%w: %q not in 1..%d", ErrFormat, value, MaxDimension))
			}
			dim = n
		case "EDGE_WEIGHT_TYPE":
			switch v := strings.ToUpper(value); v {
			case "EUC_2D", "CEIL_2D", "ATT":
				in.WeightType = v
			default:
				return nil, fail("EDGE_WEIGHT_TYPE", fmt.Errorf("%w: %q (only EUC_2D, CEIL_2D, ATT)", ErrUnsupported, value))
			}
		case "NODE_COORD_TYPE", "DISPLAY_DATA_TYPE":
		case "NODE_COORD_SECTION":
			if dim < 0 {
				return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: DIMENSION must come first", ErrFormat))
			}
			if in.X != nil {
				return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: given twice", ErrFormat))
			}
			in.X, in.Y, have = make([]float64, dim), make([]float64, dim), make([]bool, dim)
			inCoords = true
		case "EOF":
		default:
			return nil, fail(key, fmt.Errorf("%w: keyword or section", ErrUnsupported))
		}
		if key == "EOF" {
			break
		}
	}
	if err := sc.Err(); err != nil {
		return nil, &ParseError{File: file, Line: line + 1, What: "read", Err: route.ScanError(err)}
	}
	line = 0
	if in.WeightType == "" {
		return nil, fail("EDGE_WEIGHT_TYPE", fmt.Errorf("%w: missing", ErrFormat))
	}
	if in.X == nil {
		return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: missing", ErrFormat))
	}
	if seen != dim {
		return nil, fail("NODE_COORD_SECTION", fmt.Errorf("%w: %d nodes given, DIMENSION is %d", ErrFormat, seen, dim))
	}
	return in, nil
}

// ReadTour reads a TOUR_SECTION file and returns the tour's nodes,
// 0-based. n is the instance's dimension: the tour must visit each of
// 1..n once.
func ReadTour(r io.Reader, file string, n int) ([]int, error) {
	sc := newScanner(r)
	line := 0
	fail := func(what string, err error) error { return &ParseError{File: file, Line: line, What: what, Err: err} }
	var tour []int
	var seen []bool
	inTour := false
	done := false
	for !done && sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" {
			continue
		}
		if !inTour {
			key, value := header(text)
			switch key {
			case "TOUR_SECTION":
				inTour = true
				seen = make([]bool, n)
			case "DIMENSION":
				if d, err := strconv.Atoi(value); err != nil || d != n {
					return nil, fail("DIMENSION", fmt.Errorf("%w: %q, want %d", ErrFormat, value, n))
				}
			case "EOF":
				done = true
			}
			continue
		}
		for _, f := range strings.Fields(text) {
			id, err := strconv.Atoi(f)
			if err != nil {
				return nil, fail("TOUR_SECTION", fmt.Errorf("%w: %q is not a node number", ErrFormat, f))
			}
			if id == -1 {
				done = true
				break
			}
			if id < 1 || id > n || seen[id-1] {
				return nil, fail("TOUR_SECTION", fmt.Errorf("%w: node %d out of range or repeated", ErrFormat, id))
			}
			seen[id-1] = true
			tour = append(tour, id-1)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, &ParseError{File: file, Line: line + 1, What: "read", Err: route.ScanError(err)}
	}
	line = 0
	if len(tour) != n {
		return nil, fail("TOUR_SECTION", fmt.Errorf("%w: %d nodes, want %d", ErrFormat, len(tour), n))
	}
	return tour, nil
}

// short cuts a field quoted in a message to 40 bytes.
func short(s string) string {
	if len(s) > 40 {
		return s[:40] + "…"
	}
	return s
}
