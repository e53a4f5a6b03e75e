package design

import (
	"os"
	"testing"

	"github.com/golang/geo/r2"
)

func pt(x, y float64) r2.Point { return r2.Point{X: x, Y: y} }

func mustRead(t testing.TB, path string) []byte {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return data
}
