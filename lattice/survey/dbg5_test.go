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

func TestDbgView(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	t.Logf("step %+v", *p.Step)
	top, _ := render(t, p)
	g := toGrid(top)
	subtractPlane(g)
	img := image.NewGray(image.Rect(0, 0, g.w, g.h))
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range g.v {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	for j := 0; j < g.h; j++ {
		for i := 0; i < g.w; i++ {
			img.SetGray(i, g.h-1-j, color.Gray{uint8(255 * (g.at(i, j) - lo) / (hi - lo))})
		}
	}
	f, _ := os.Create("/tmp/sv/view.png")
	png.Encode(f, img)
	f.Close()
}

func TestDbgSeed(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	top, _ := render(t, p)
	an, err := Analyse(context.Background(), top, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for i, tr := range an.Terraces {
		t.Logf("terrace %d rows %.1f area %.1f h %.4f up %d poly %v", i, tr.RowsDeg, tr.AreaNM2, tr.HeightNM, tr.UpFrom, tr.Polygon)
	}
	for _, s := range an.Steps {
		t.Logf("step %v upper %d h %.4f line %v", s.Terraces, s.Upper, s.HeightNM, s.Polyline)
	}
}

func TestDbgForeign(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	if v, _ := strconv.Atoi(os.Getenv("WIDTH")); v > 0 {
		p.Width = v
	}
	top, ds := foreignRender(p, 16)
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
	t.Logf("noise %.4f zsource %s", an.NoiseNM, an.ZSource)
	for _, d := range ds {
		t.Logf("true %v kind %d h %.3f", d.AtNM, d.Kind, d.HeightNM)
	}
	for _, d := range an.Defects {
		t.Logf("found %v %s h %.3f size %.2f sig %.1f", d.AtNM, d.Kind(), d.HeightNM, d.SizeNM, d.SignificanceSD)
	}
}

func TestDbgForeignSeg(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	top, _ := foreignRender(p, 16)
	t.Logf("true step %+v", *p.Step)
	g := toGrid(top)
	subtractPlane(g)
	cal, b, _ := calibrate(g, [2]float64{})
	meanPx := math.Sqrt(cal.ScaleNMPerPx[0] * cal.ScaleNMPerPx[1])
	rowPx := 0.768 / meanPx
	pd := padZero(g, int(math.Ceil(4*2.5*rowPx)))
	S := forward2D(pd.v, pd.w, pd.h)
	S.dropLineOffsets()
	sg := segment(S, pd, b, 1.2*rowPx, 10/(meanPx*meanPx))
	for _, l := range sg.steps() {
		for k := 0; k < len(l); k += len(l)/8 + 1 {
			q := l[k]
			x, y := cal.Affine[0][0]*q.x+cal.Affine[0][1]*q.y, cal.Affine[1][1]*q.y
			t.Logf("seg step point (%.2f, %.2f) true dist %.3f", x, y, p.Step.SignedDistanceNM(x, y))
		}
	}
}

func TestDbgForeignStep(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	top, _ := foreignRender(p, 16)
	an, _ := Analyse(context.Background(), top, Options{})
	for _, s := range an.Steps {
		for k, q := range s.Polyline {
			t.Logf("%d (%.2f, %.2f) true dist %.3f", k, q.X, q.Y, p.Step.SignedDistanceNM(q.X, q.Y))
		}
	}
	t.Logf("cal %v", an.ScaleNMPerPx)
}

func TestDbgForeignRefine(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	top, _ := foreignRender(p, 16)
	var a [2][2]float64
	s, c := math.Sincos(p.SkewDeg * math.Pi / 180)
	a = [2][2]float64{{p.ScaleNM[0], p.ScaleNM[1] * s}, {0, p.ScaleNM[1] * c}}
	pass := 0
	dbgStep = func(line []pt, moves []float64, hl, hr float64) {
		pass++
		for k := 0; k < len(line); k += 6 {
			q := line[k]
			x, y := a[0][0]*q.x+a[0][1]*q.y, a[1][1]*q.y
			t.Logf("pass %d v%d (%.2f,%.2f) true %.3f move %.3f nm hl %.0f hr %.0f", pass, k, x, y, p.Step.SignedDistanceNM(x, y), moves[k]*p.ScaleNM[0], hl, hr)
		}
	}
	Analyse(context.Background(), top, Options{})
	dbgStep = nil
}

func TestDbgForeignLine(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	if v, _ := strconv.Atoi(os.Getenv("WIDTH")); v > 0 {
		p.Width = v
	}
	top, _ := foreignRender(p, 16)
	var rg *grid
	dbgHook = func(name string, g *grid) {
		if name == "r" {
			rg = &grid{w: g.w, h: g.h, v: append([]float64(nil), g.v...)}
		}
	}
	an, _ := Analyse(context.Background(), top, Options{})
	dbgHook = nil
	sd := robustSD(rg.v)
	img := image.NewRGBA(image.Rect(0, 0, rg.w, rg.h))
	for j := 0; j < rg.h; j++ {
		for i := 0; i < rg.w; i++ {
			v := uint8(math.Max(0, math.Min(255, 128+20*rg.at(i, j)/sd)))
			img.Set(i, rg.h-1-j, color.RGBA{v, v, v, 255})
		}
	}
	a := an.Affine
	for _, s := range an.Steps {
		for _, q := range s.Polyline {
			v := q.Y / a[1][1]
			u := (q.X - a[0][1]*v) / a[0][0]
			img.Set(int(u), rg.h-1-int(v), color.RGBA{255, 0, 0, 255})
		}
	}
	f, _ := os.Create("/tmp/sv/line.png")
	png.Encode(f, img)
	f.Close()
}
