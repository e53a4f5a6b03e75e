// Package render draws dimerpath's lattice view into an RGBA frame
// buffer, without a window: a Renderer fills one reused image from a
// Scene (what to draw: the surface, region layers, route, fiducials,
// findings, selection and tool previews) and a View (where to look).
//
// A frame costs its pixels plus the painted sites in view / 64, never
// the design's size: zoomed out it counts painted sites per pixel with
// popcounts over each row's bitset, zoomed in it draws each visible
// site and dimer bond. It imports no Fyne (make lint checks); package
// gui shows the frames in a canvas.Raster.
//
// # Frame and units
//
// Field coordinates are nm with the origin at the lower-left corner of
// the scan field and y up, as in package lattice; a View maps them to
// device pixels with y down. Scales are nm per device pixel.
package render
