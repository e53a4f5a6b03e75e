package render

// Internals that the external tests (package render_test, which import
// the editor to draw its scenes) use.
var (
	BigScene = bigScene
	SavePNG  = savePNG
	PackRGBA = packRGBA
	Fill     = fill[uint32]
)

// Pix returns the renderer's pixel buffer.
func (r *Renderer) Pix() []uint32 { return r.pix }
