package design

import "github.com/golang/geo/r2"

func pt(x, y float64) r2.Point { return r2.Point{X: x, Y: y} }
