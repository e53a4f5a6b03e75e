package app

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func runMain(t *testing.T, args ...string) (stdout, stderr string, code int) {
	t.Helper()
	var out, errb bytes.Buffer
	code = Main(args, strings.NewReader(""), &out, &errb)
	return out.String(), errb.String(), code
}

func writeFile(t *testing.T, name, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestOrderJSON(t *testing.T) {
	// Four points on a line, given out of order; from the start (0,0) the
	// best open path visits them left to right: 1+1+1+1 = 4.
	path := writeFile(t, "pts.csv", "# test\nx,y\n3,0\n1,0\n4,0\n2,0\n")
	out, errs, code := runMain(t, "order", path, "--json", "--start", "0,0")
	if code != ExitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	var got struct {
		Order     []int   `json:"order"`
		Reversed  []bool  `json:"reversed"`
		Length    float64 `json:"length"`
		ElapsedMS float64 `json:"elapsed_ms"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("stdout is not one JSON object: %v\n%s", err, out)
	}
	if want := []int{1, 3, 0, 2}; len(got.Order) != 4 || got.Order[0] != want[0] || got.Order[1] != want[1] || got.Order[2] != want[2] || got.Order[3] != want[3] {
		t.Errorf("order %v, want %v", got.Order, want)
	}
	if math.Abs(got.Length-4) > 1e-12 || got.Reversed != nil {
		t.Errorf("length %v reversed %v, want 4 and none", got.Length, got.Reversed)
	}
}

func TestOrderStrokesFlagsAfterAndBefore(t *testing.T) {
	// Two strokes on a line, the first given backwards. From the start
	// (0,0) the only best path writes it reversed, from (0,0) to (1,0),
	// then moves 1 to the second and writes it forwards: travel 1.
	path := writeFile(t, "s.csv", "1,0,0,0\n2,0,3,0\n")
	for _, args := range [][]string{
		{"order", path, "--strokes", "--start", "0,0", "--json"},
		{"order", "--strokes", "--json", "--start", "0,0", path},
	} {
		out, errs, code := runMain(t, args...)
		if code != ExitOK {
			t.Fatalf("%v: exit %d, stderr %s", args, code, errs)
		}
		var got struct {
			Order    []int   `json:"order"`
			Reversed []bool  `json:"reversed"`
			Length   float64 `json:"length"`
		}
		if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Fatal(err)
		}
		if math.Abs(got.Length-1) > 1e-12 || len(got.Order) != 2 || got.Order[0] != 0 || got.Order[1] != 1 ||
			len(got.Reversed) != 2 || !got.Reversed[0] || got.Reversed[1] {
			t.Errorf("%v: order %v reversed %v length %v, want [0 1] [true false] 1", args, got.Order, got.Reversed, got.Length)
		}
	}
}

func TestOrderText(t *testing.T) {
	// Input order 0 -> 10 -> 1 -> 9 travels 27; best is 10. Time at 2
	// units/s with 0.5 s settle per move: 10/2 + 3*0.5 = 6.5 s.
	path := writeFile(t, "pts.csv", "0,0\n10,0\n1,0\n9,0\n")
	out, errs, code := runMain(t, "order", path, "--speed", "2", "--settle", "0.5")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"travel length  10.000", "input order    27.000 (63.0% saved)", "travel time    6.5 s (3 moves) vs 15 s", "solved in"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestOrderBadInput(t *testing.T) {
	for _, c := range []struct {
		name, text string
		args       []string
		want       string
	}{
		{"bad field", "x,y\n1,2\n3,zz\n", nil, "pts.csv:3: field y = \"zz\""},
		{"strokes in a point file", "1,2,3,4\n", nil, "--strokes"},
		{"bad start", "1,2\n", []string{"--start", "1"}, "--start"},
		{"empty", "# none\n", nil, "no items"},
	} {
		t.Run(c.name, func(t *testing.T) {
			path := writeFile(t, "pts.csv", c.text)
			out, errs, code := runMain(t, append([]string{"order", path}, c.args...)...)
			if code != ExitFailure || out != "" || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stdout %q, stderr %q; want exit 2, no stdout, %q", code, out, errs, c.want)
			}
		})
	}
}

func TestOrderTSPLIB(t *testing.T) {
	out, errs, code := runMain(t, "order", filepath.Join("..", "testdata", "tsplib", "eil51.tsp"), "--closed", "--kicks", "2000")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "TSPLIB length") {
		t.Errorf("no TSPLIB length in\n%s", out)
	}
}
