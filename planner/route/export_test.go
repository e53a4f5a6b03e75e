package route

// SetExactMax changes the largest problem solved exactly, for tests of
// the heuristic on small problems, and returns a function restoring it.
func SetExactMax(n int) (restore func()) {
	old := exactMax
	exactMax = n
	return func() { exactMax = old }
}

// SetSpatialOrderMin changes the node count above which nodes are
// renumbered along a Hilbert curve, and returns a function restoring it.
func SetSpatialOrderMin(n int) (restore func()) {
	old := spatialOrderMin
	spatialOrderMin = n
	return func() { spatialOrderMin = old }
}
