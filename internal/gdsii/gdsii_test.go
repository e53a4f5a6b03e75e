package gdsii

import (
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// The 8-byte real form, worked from its definition in the GDSII manual
// (sign, excess-64 exponent of 16, 56-bit fraction): 1 = 1/16·16^1, so
// exponent 0x41 and fraction 0x10...; 10 = 10/16·16^1; 100 = 100/256·16^2;
// 0.5 = 8/16·16^0; -2 = -(2/16)·16^1.
func TestReal8KnownValues(t *testing.T) {
	cases := []struct {
		v    float64
		want [8]byte
	}{
		{0, [8]byte{}},
		{1, [8]byte{0x41, 0x10}},
		{10, [8]byte{0x41, 0xA0}},
		{100, [8]byte{0x42, 0x64}},
		{0.5, [8]byte{0x40, 0x80}},
		{-2, [8]byte{0xC1, 0x20}},
		{1.0 / 16, [8]byte{0x40, 0x10}},
	}
	for _, c := range cases {
		got, err := PutReal8(c.v)
		if err != nil || got != c.want {
			t.Errorf("PutReal8(%g) = % X, %v; want % X", c.v, got, err, c.want)
		}
		if back := Real8(c.want); back != c.v {
			t.Errorf("Real8(% X) = %g, want %g", c.want, back, c.v)
		}
	}
}

func TestReal8RoundTripIsExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for range 100000 {
		v := math.Ldexp(rng.Float64()+0.5, rng.IntN(400)-200)
		if rng.IntN(2) == 0 {
			v = -v
		}
		b, err := PutReal8(v)
		if err != nil {
			t.Fatalf("PutReal8(%g): %v", v, err)
		}
		if back := Real8(b); back != v {
			t.Fatalf("Real8(PutReal8(%g)) = %g", v, back)
		}
	}
	for _, v := range []float64{1e-3, 1e-9, 1e-12, 1e-15, 0.1, 1.0 / 3} {
		b, _ := PutReal8(v)
		if Real8(b) != v {
			t.Errorf("%g does not round-trip", v)
		}
	}
}

func TestPutReal8Refuses(t *testing.T) {
	for _, v := range []float64{math.NaN(), math.Inf(1), math.Inf(-1), 1e76, -1e76, 1e-80} {
		if _, err := PutReal8(v); !errors.Is(err, ErrReal) {
			t.Errorf("PutReal8(%g) error = %v, want ErrReal", v, err)
		}
	}
	// The largest representable magnitude is just below 16^63.
	if _, err := PutReal8(math.Nextafter(math.Pow(16, 63), 0)); err != nil {
		t.Errorf("PutReal8(just below 16^63): %v", err)
	}
}

// sample is a small library with every element kind and transform.
func sample() *Library {
	return &Library{
		Name: "SAMPLE.DB", UserUnit: 1e-3, MetresPerUnit: 1e-12,
		Structures: []*Structure{
			{Name: "CELL", Boundaries: []Boundary{{Layer: 5, Datatype: 1, XY: []Point{{0, 0}, {100, 0}, {100, 50}, {0, 50}}}},
				Texts: []Text{{Layer: 5, TextType: 2, At: Point{10, 10}, String: "mark A"}}},
			{Name: "TOP",
				Boundaries: []Boundary{{Layer: 1, XY: []Point{{-5, -5}, {5, -5}, {0, 7}}}},
				Paths:      []Path{{Layer: 2, Datatype: 3, PathType: 2, Width: 40, XY: []Point{{0, 0}, {1000, 0}, {1000, 500}}}},
				Refs: []Ref{
					{Name: "CELL", Origin: Point{1000, 2000}, Trans: Transform{Reflect: true, Mag: 2, AngleDeg: 90}},
					{Name: "CELL", Origin: Point{0, 0}, Cols: 3, Rows: 2, ColEnd: Point{600, 0}, RowEnd: Point{0, 400}, Trans: Transform{AngleDeg: 30}},
				}},
		},
	}
}

func encode(t testing.TB, l *Library) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := Write(&buf, l); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func clearOffsets(l *Library) {
	for _, s := range l.Structures {
		s.Offset = 0
		for i := range s.Refs {
			s.Refs[i].Offset = 0
		}
	}
	l.Skipped = nil
}

func TestWriteReadRoundTrip(t *testing.T) {
	want := sample()
	data := encode(t, want)
	got, err := Read(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	clearOffsets(got)
	if !reflect.DeepEqual(got, want) {
		t.Errorf("read back\n%+v\nwant\n%+v", got, want)
	}
	// Every record has an even length and the stream ends with ENDLIB.
	if len(data)%2 != 0 || !bytes.HasSuffix(data, []byte{0, 4, recEndLib, 0}) {
		t.Errorf("stream of %d bytes does not end with ENDLIB", len(data))
	}
	if again := encode(t, got); !bytes.Equal(again, data) {
		t.Error("writing what was read gives other bytes")
	}
}

func TestFlattenTransforms(t *testing.T) {
	f, err := sample().Flatten("TOP", FlattenOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// 1 own polygon + 1 from the SREF + 6 from the AREF.
	if len(f.Polygons) != 8 || len(f.Paths) != 1 || len(f.Texts) != 7 {
		t.Fatalf("flattened to %d polygons, %d paths, %d texts; want 8, 1, 7", len(f.Polygons), len(f.Paths), len(f.Texts))
	}
	near := func(a, b Vec) bool { return math.Abs(a.X-b.X) < 1e-9 && math.Abs(a.Y-b.Y) < 1e-9 }
	// SREF: (x, y) -> reflect (x, -y) -> x2 -> rotate 90° (-y', x') = (2y, 2x) -> + (1000, 2000).
	sref := f.Polygons[1]
	for i, p := range []Point{{0, 0}, {100, 0}, {100, 50}, {0, 50}} {
		want := Vec{1000 + 2*float64(p.Y), 2000 + 2*float64(p.X)}
		if !near(sref.XY[i], want) {
			t.Errorf("SREF point %d = %v, want %v", i, sref.XY[i], want)
		}
	}
	// AREF: instance (i, j) at (200 i, 200 j), contents rotated by 30°.
	c, s := math.Cos(math.Pi/6), math.Sin(math.Pi/6)
	for k, poly := range f.Polygons[2:] {
		i, j := k%3, k/3
		p := Point{100, 50}
		want := Vec{200*float64(i) + c*100 - s*50, 200*float64(j) + s*100 + c*50}
		if !near(poly.XY[2], want) {
			t.Errorf("AREF instance (%d,%d) corner = %v, want %v (from %v)", i, j, poly.XY[2], want, p)
		}
	}
	// Signed area: reflection flips the orientation, magnification 2
	// scales the area by 4.
	if a, want := signedArea(sref.XY), -4*100*50.0; math.Abs(a-want) > 1e-6 {
		t.Errorf("SREF polygon area %g, want %g", a, want)
	}
}

func signedArea(p []Vec) float64 {
	a := 0.0
	for i := range p {
		q := p[(i+1)%len(p)]
		a += p[i].X*q.Y - q.X*p[i].Y
	}
	return a / 2
}

func TestFlattenKeepsOnlyChosenLayers(t *testing.T) {
	f, err := sample().Flatten("", FlattenOptions{Keep: func(l, d int16) bool { return l == 5 && d == 1 }})
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Polygons) != 7 || len(f.Paths) != 0 || len(f.Texts) != 0 {
		t.Errorf("kept %d polygons, %d paths, %d texts; want 7, 0, 0", len(f.Polygons), len(f.Paths), len(f.Texts))
	}
}

// record builds one raw record.
func record(typ, dt byte, data ...byte) []byte {
	n := 4 + len(data)
	return append([]byte{byte(n >> 8), byte(n), typ, dt}, data...)
}

func i16(v ...int16) []byte {
	var b []byte
	for _, x := range v {
		b = binary.BigEndian.AppendUint16(b, uint16(x))
	}
	return b
}

func i32(v ...int32) []byte {
	var b []byte
	for _, x := range v {
		b = binary.BigEndian.AppendUint32(b, uint32(x))
	}
	return b
}

func real8(v float64) []byte {
	b, err := PutReal8(v)
	if err != nil {
		panic(err)
	}
	return b[:]
}

func str(s string) []byte {
	b := []byte(s)
	if len(b)%2 == 1 {
		b = append(b, 0)
	}
	return b
}

// stream joins a library header, the given structure records and ENDLIB.
func stream(body ...[]byte) []byte {
	out := bytes.Join([][]byte{
		record(recHeader, dtInt16, i16(600)...),
		record(recBgnLib, dtInt16, make([]byte, 24)...),
		record(recLibName, dtString, str("LIB")...),
		record(recUnits, dtReal8, append(real8(1e-3), real8(1e-12)...)...),
	}, nil)
	for _, b := range body {
		out = append(out, b...)
	}
	return append(out, record(recEndLib, dtNone)...)
}

func structure(name string, elems ...[]byte) []byte {
	out := append(record(recBgnStr, dtInt16, make([]byte, 24)...), record(recStrName, dtString, str(name)...)...)
	for _, e := range elems {
		out = append(out, e...)
	}
	return append(out, record(recEndStr, dtNone)...)
}

func sref(name string, x, y int32, extra ...[]byte) []byte {
	out := append(record(recSRef, dtNone), record(recSName, dtString, str(name)...)...)
	for _, e := range extra {
		out = append(out, e...)
	}
	out = append(out, record(recXY, dtInt32, i32(x, y)...)...)
	return append(out, record(recEndEl, dtNone)...)
}

func aref(name string, cols, rows int16) []byte {
	out := append(record(recARef, dtNone), record(recSName, dtString, str(name)...)...)
	out = append(out, record(recColRow, dtInt16, i16(cols, rows)...)...)
	out = append(out, record(recXY, dtInt32, i32(0, 0, int32(cols)*10, 0, 0, int32(rows)*10)...)...)
	return append(out, record(recEndEl, dtNone)...)
}

func box() []byte {
	out := record(recBoundary, dtNone)
	out = append(out, record(recLayer, dtInt16, i16(1)...)...)
	out = append(out, record(recDatatype, dtInt16, i16(0)...)...)
	out = append(out, record(recXY, dtInt32, i32(0, 0, 10, 0, 10, 10, 0, 10, 0, 0)...)...)
	return append(out, record(recEndEl, dtNone)...)
}

// badStreams are inputs the reader must refuse with an *Error naming a
// record and its offset; the fuzz target starts from them too.
func badStreams() map[string]struct {
	data []byte
	want string
} {
	good := stream(structure("A", box()))
	lengthPastEnd := append([]byte(nil), good...)
	// Make the first XY record claim 2000 bytes.
	xyAt := bytes.Index(lengthPastEnd, []byte{0, 44, recXY, dtInt32})
	binary.BigEndian.PutUint16(lengthPastEnd[xyAt:], 2000)
	magAt := func(v []byte) []byte {
		return stream(structure("A", box()), structure("B", sref("A", 0, 0, record(recSTrans, dtBits, 0, 0), record(recMag, dtReal8, v...))))
	}
	nanLike := []byte{0x7F, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF} // the largest real, 7.2e75: no NaN exists
	return map[string]struct {
		data []byte
		want string
	}{
		"empty":             {nil, "ends without ENDLIB"},
		"not gdsii":         {[]byte("%PDF-1.4\n"), "does not start with a HEADER"},
		"truncated header":  {good[:len(good)-2], "inside a record header"},
		"truncated record":  {good[:xyAt+20], "XY record at byte"},
		"length past end":   {lengthPastEnd, "runs past the end of the stream"},
		"length below 4":    {append(stream()[:0:0], append(record(recHeader, dtInt16, i16(600)...), 0, 2, 1, 2)...), "less than its 4-byte header"},
		"odd length":        {append(record(recHeader, dtInt16, i16(600)...), 0, 5, 1, 2, 0), "is odd"},
		"wrong data type":   {bytes.Replace(good, []byte{0, 6, recLayer, dtInt16}, []byte{0, 6, recLayer, dtInt32}, 1), "LAYER record at byte"},
		"magnification NaN": {magAt(nanLike), "MAG record at byte"},
		"magnification <0":  {magAt(real8(-2)), "magnification -2"},
		"units zero":        {bytes.Replace(stream(), real8(1e-3), make([]byte, 8), 1), "UNITS record at byte"},
		"no ENDEL":          {stream(structure("A", box()[:len(box())-4])), "ENDEL missing"},
		"twice defined":     {stream(structure("A", box()), structure("A")), "defined twice"},
		"aref no columns":   {stream(structure("A", box()), structure("B", aref("A", 0, 5))), "0 columns"},
		"no units":          {bytes.Replace(stream(structure("A")), record(recUnits, dtReal8, append(real8(1e-3), real8(1e-12)...)...), nil, 1), "before the UNITS record"},
	}
}

func TestReadRefusesBadStreams(t *testing.T) {
	for name, c := range badStreams() {
		t.Run(name, func(t *testing.T) {
			_, err := Read(bytes.NewReader(c.data))
			if err == nil {
				t.Fatal("Read accepted it")
			}
			var ge *Error
			if !errors.As(err, &ge) {
				t.Fatalf("error %v is not a *gdsii.Error", err)
			}
			if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "byte ") {
				t.Errorf("error %q, want it to say %q and give the byte offset", err, c.want)
			}
		})
	}
}

func TestReadErrorOffsetIsTheRecords(t *testing.T) {
	data := stream(structure("A", box()))
	at := bytes.Index(data, []byte{0, 6, recLayer, dtInt16})
	data[at+3] = dtString
	_, err := Read(bytes.NewReader(data))
	var ge *Error
	if !errors.As(err, &ge) || ge.Offset != int64(at) || ge.Record != "LAYER" {
		t.Fatalf("error %v, want the LAYER record at byte %d", err, at)
	}
}

func TestReadLimits(t *testing.T) {
	data := stream(structure("A", box(), box(), box()))
	if _, err := ReadLimited(bytes.NewReader(data), ReadLimits{Points: 10}); !errors.Is(err, ErrLimit) {
		t.Errorf("15 points under a limit of 10: error %v, want ErrLimit", err)
	}
	if _, err := ReadLimited(bytes.NewReader(data), ReadLimits{Elements: 2}); !errors.Is(err, ErrLimit) {
		t.Errorf("3 elements under a limit of 2: error %v, want ErrLimit", err)
	}
	if _, err := ReadLimited(bytes.NewReader(data), ReadLimits{Bytes: 100}); !errors.Is(err, ErrLimit) {
		t.Errorf("%d bytes under a limit of 100: error %v, want ErrLimit", len(data), err)
	}
}

func TestFlattenRefuses(t *testing.T) {
	cases := map[string]struct {
		data []byte
		want error
		msg  string
	}{
		"cycle": {stream(structure("A", box(), sref("B", 0, 0)), structure("B", sref("C", 0, 0)), structure("C", sref("A", 5, 5))),
			ErrCycle, "A -> B -> C -> A"},
		"self reference": {stream(structure("A", box(), sref("A", 0, 0))), ErrCycle, "A -> A"},
		"10^9 instances": {stream(structure("A", box()), structure("B", aref("A", 32767, 32767))), ErrLimit, "32767 x 32767"},
		"nested arrays":  {stream(structure("A", box()), structure("B", aref("A", 1000, 1000)), structure("C", aref("B", 1000, 1000))), ErrLimit, "AREF"},
		"undefined":      {stream(structure("A", sref("Z", 0, 0))), nil, `"Z", which the library does not define`},
	}
	for name, c := range cases {
		t.Run(name, func(t *testing.T) {
			lib, err := Read(bytes.NewReader(c.data))
			if err != nil {
				t.Fatalf("Read: %v", err)
			}
			_, err = lib.Flatten("", FlattenOptions{})
			if err == nil || (c.want != nil && !errors.Is(err, c.want)) || !strings.Contains(err.Error(), c.msg) {
				t.Fatalf("Flatten error %v, want %v saying %q", err, c.want, c.msg)
			}
			if ge, ok := errors.AsType[*Error](err); c.want != ErrLimit && (!ok || ge.Offset == 0) {
				t.Errorf("error %v names no record offset", err)
			}
		})
	}
}

func TestValidateRefuses(t *testing.T) {
	cases := map[string]func(l *Library){
		"NaN units":       func(l *Library) { l.UserUnit = math.NaN() },
		"long name":       func(l *Library) { l.Structures[0].Name = strings.Repeat("x", 33) },
		"space in name":   func(l *Library) { l.Structures[0].Name = "a b" },
		"dangling ref":    func(l *Library) { l.Structures[1].Refs[0].Name = "NOPE" },
		"two points":      func(l *Library) { l.Structures[0].Boundaries[0].XY = l.Structures[0].Boundaries[0].XY[:2] },
		"too many points": func(l *Library) { l.Structures[0].Boundaries[0].XY = make([]Point, MaxXY) },
		"NaN angle":       func(l *Library) { l.Structures[1].Refs[0].Trans.AngleDeg = math.NaN() },
		"huge mag":        func(l *Library) { l.Structures[1].Refs[0].Trans.Mag = 1e70 },
		"negative layer":  func(l *Library) { l.Structures[0].Boundaries[0].Layer = -1 },
		"40000 columns":   func(l *Library) { l.Structures[1].Refs[1].Cols = 40000 },
	}
	for name, breakIt := range cases {
		t.Run(name, func(t *testing.T) {
			l := sample()
			breakIt(l)
			var buf bytes.Buffer
			if err := Write(&buf, l); err == nil {
				t.Fatal("Write accepted it")
			}
			if buf.Len() != 0 {
				t.Errorf("Write wrote %d bytes before refusing", buf.Len())
			}
		})
	}
}

// FuzzRead feeds the reader arbitrary bytes: it must return a library or
// an error, never panic or allocate beyond its limits; a library it
// accepts must flatten (or be refused) within the limits and, written
// again, read back the same.
func FuzzRead(f *testing.F) {
	f.Add(encode(f, sample()))
	for _, c := range badStreams() {
		f.Add(c.data)
	}
	f.Add(stream(structure("A", box()), structure("B", aref("A", 32767, 32767))))
	f.Add(stream(structure("A", box(), sref("B", 0, 0)), structure("B", sref("A", 0, 0))))
	lim := ReadLimits{Bytes: 1 << 20, Structures: 1000, Elements: 10000, Points: 100000}
	f.Fuzz(func(t *testing.T, data []byte) {
		lib, err := ReadLimited(bytes.NewReader(data), lim)
		if err != nil {
			if _, ok := errors.AsType[*Error](err); !ok {
				t.Fatalf("error %v is not a *gdsii.Error", err)
			}
			return
		}
		if _, err := lib.Flatten("", FlattenOptions{Limits: FlattenLimits{Elements: 100000, Points: 1000000, Depth: 16}}); err != nil {
			return
		}
		var buf bytes.Buffer
		if err := Write(&buf, lib); err != nil {
			return // a name or count the writer is stricter about
		}
		again, err := Read(bytes.NewReader(buf.Bytes()))
		if err != nil {
			t.Fatalf("reading what was written: %v", err)
		}
		clearOffsets(lib)
		clearOffsets(again)
		if !reflect.DeepEqual(lib, again) {
			t.Fatalf("written and read back differs")
		}
	})
}
