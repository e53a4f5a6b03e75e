package route

import (
	"bufio"
	"os"
	"strconv"
	"strings"
	"testing"
)

// loadTestTSPLIB reads the node coordinates of testdata/tsplib/NAME.tsp
// as points. The package's own tests cannot use package tsplib, which
// imports this one; the files are the ones tsplib's tests read.
func loadTestTSPLIB(t *testing.T, name string) []Item {
	b, err := os.ReadFile("../../testdata/tsplib/" + name + ".tsp")
	if err != nil {
		t.Fatal(err)
	}
	var items []Item
	in := false
	sc := bufio.NewScanner(strings.NewReader(string(b)))
	for sc.Scan() {
		l := strings.TrimSpace(sc.Text())
		if l == "NODE_COORD_SECTION" {
			in = true
			continue
		}
		if !in || l == "EOF" || l == "" {
			continue
		}
		f := strings.Fields(l)
		x, _ := strconv.ParseFloat(f[1], 64)
		y, _ := strconv.ParseFloat(f[2], 64)
		items = append(items, Item{A: Point{x, y}, B: Point{x, y}})
	}
	return items
}

// loadTestTour reads testdata/tsplib/NAME.opt.tour as 0-based nodes.
func loadTestTour(t *testing.T, name string) []int {
	b, err := os.ReadFile("../../testdata/tsplib/" + name + ".opt.tour")
	if err != nil {
		t.Fatal(err)
	}
	var tour []int
	in := false
	for _, l := range strings.Split(string(b), "\n") {
		l = strings.TrimSpace(l)
		if l == "TOUR_SECTION" {
			in = true
			continue
		}
		if !in {
			continue
		}
		for _, f := range strings.Fields(l) {
			v, err := strconv.Atoi(f)
			if err != nil || v < 0 {
				return tour
			}
			tour = append(tour, v-1)
		}
	}
	return tour
}
