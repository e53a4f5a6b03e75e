package survey

import (
	"context"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"strconv"
	"testing"
)

var dbgHook func(name string, g *grid)

func TestDbgResidual(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	top, _ := render(t, p)
	dbgHook = func(name string, g *grid) {
		sd := robustSD(g.v)
		img := image.NewGray(image.Rect(0, 0, g.w, g.h))
		for j := 0; j < g.h; j++ {
			for i := 0; i < g.w; i++ {
				v := 128 + 20*g.at(i, j)/sd
				img.SetGray(i, g.h-1-j, color.Gray{uint8(math.Max(0, math.Min(255, v)))})
			}
		}
		f, _ := os.Create("/tmp/sv/" + name + ".png")
		png.Encode(f, img)
		f.Close()
	}
	an, err := Analyse(context.Background(), top, Options{})
	dbgHook = nil
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range an.Defects {
		t.Logf("false %v %s h %.3f size %.2f sig %.1f", d.AtNM, d.Kind(), d.HeightNM, d.SizeNM, d.SignificanceSD)
	}
}
