package survey

import (
	"os"
	"strconv"
	"testing"
)

func TestDbgCalib(t *testing.T) {
	seed, _ := strconv.Atoi(os.Getenv("SEED"))
	p := randomScene(uint64(seed), 512)
	top, _ := render(t, p)
	if os.Getenv("FOREIGN") != "" {
		top, _ = foreignRender(p, 16)
	}
	g := toGrid(top)
	subtractPlane(g)
	w, h := smoothBelow(g.w), smoothBelow(g.h)
	data := windowedData(g, (g.w-w)/2, (g.h-h)/2, w, h)
	s := forward2D(data, w, h)
	peaks := findPeaks(s, 6/float64(w), 30, 40)
	b, _ := findBasis(peaks, [2]float64{}, 1/float64(w))
	t1, t2 := trueBasis(p)
	for i, pk := range peaks[:12] {
		m, n, ok := b.index(pk.f)
		t.Logf("peak %d m %d n %d ok %v f %.3f,%.3f score %.0f power %.3g", i, m, n, ok, pk.f[0]*float64(w), pk.f[1]*float64(h), pk.score, pk.power)
	}
	t.Logf("true b1 %.3f,%.3f b2 %.3f,%.3f (bins)", t1[0]*float64(w), t1[1]*float64(h), t2[0]*float64(w), t2[1]*float64(h))
	t.Logf("fit  b1 %.3f,%.3f b2 %.3f,%.3f (bins) measured2 %v", b.b1[0]*float64(w), b.b1[1]*float64(h), b.b2[0]*float64(w), b.b2[1]*float64(h), b.measured2)
	for _, lp := range b.peaks {
		t.Logf("fitted (%d,%d) %.3f,%.3f", lp.m, lp.n, lp.f[0]*float64(w), lp.f[1]*float64(h))
	}
}
