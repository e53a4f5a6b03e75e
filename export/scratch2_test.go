package export

import (
	"context"
	"dimerpath/export/internal/planfixture"
	"testing"
	"time"
)

func TestScratch2(t *testing.T) {
	p := planfixture.Large(2000, 5)
	if err := WriteFile(context.Background(), "/tmp/exp/large.pdf", p, Options{Date: time.Now()}); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(context.Background(), "/tmp/exp/large.svg", p, Options{Date: time.Now()}); err != nil {
		t.Fatal(err)
	}
}
