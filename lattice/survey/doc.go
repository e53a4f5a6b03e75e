// Package survey reads STM survey topographs of Si(100)-2x1:H and analyses
// them with the lattice as the ruler: it calibrates the image (true scale
// in x and y, rotation, skew, each with its uncertainty, and the lattice's
// phase), divides it into terraces by the direction of the dimer rows,
// places the step edges between them and says which side is up, and finds
// the defects that stand out once the lattice is taken out.
//
// # Reading
//
// Read and Decode take grey-scale PNG and TIFF images (8 or 16 bits a
// pixel) and plain-text height matrices (see DecodeMatrix for the
// headers). A Topograph's pixel (i, j) counts from the lower-left corner,
// x right and y up, like the design's field. Every error is a *ReadError
// naming the file (and the line of a matrix) and wrapping one of ErrEmpty,
// ErrTruncated, ErrTooLarge, ErrTooManyBytes, ErrNotFinite, ErrRagged or
// ErrFormat; the readers never hold more than MaxSide x MaxSide heights,
// and refuse an image file (or the pixels its header declares) beyond
// MaxImageBytes before reading it whole. WritePNG writes
// a topograph back with its scale in PNG text chunks.
//
// # Frames and units
//
// Analyse reports positions in nm in the true frame: origin at the image's
// lower-left corner, x along the image's x axis, by the measured scale;
// the pixel point (u, v) (pixel steps from that corner, a pixel's centre
// at (i+½, j+½)) lies at Calibration.Affine·(u, v). Angles are in degrees,
// counter-clockwise, line angles in (−90, 90].
//
// # The analysis
//
//  1. Levelling: a plane fitted robustly; later the scan lines' offsets
//     (line-by-line median, fitted together with the terraces' heights)
//     and the terraces' heights.
//  2. Calibration: the Hann-windowed 2-D Fourier transform (gonum's
//     dsp/fourier) shows the lattice's peaks. Every peak of Si(100)-2x1 lies
//     on the grid m·b1 + n·b2 of the two row frequencies (one for each row
//     direction, 1/RowSpacing long and at right angles on the surface), m
//     and n never both odd; the dimer pitch gives the peaks with an even
//     index. The grid is identified among the strongest peaks, its peaks are
//     placed by the transform itself and fitted by least squares; b1 and b2
//     then give the pixel-to-true map (scale, skew) and the rotation. With
//     one row direction only and the dimers unresolved, the scale is taken
//     isotropic (Calibration.Isotropic). Uncertainties come from the
//     scatter of the same fit on the four quadrants.
//  3. Terraces and steps: the local amplitudes of the two row frequencies
//     (demodulated from the spectrum) say which way the rows run around
//     every point; the sign of their normalised difference divides the
//     image into terraces and its zero line gives the step edges, which are
//     then moved to where the heights jump by a/4. The terraces' heights say
//     which side of each edge is up.
//  4. Defects: the lattice model (the band of each terrace kind's lattice
//     frequencies, by normalised convolution over its terraces) is taken
//     out; extremes of the smoothed residual beyond k robust SDs are fitted
//     with a Gaussian (position, apparent height, size) and classed by
//     appearance. The model is made a second time with the defects left
//     out, so that it does not take part of them for lattice.
//
// Every length that stands for the lattice comes from package lattice
// (CODATA 2018). The synthetic topographs of package synth, whose dimer
// positions come from the diamond structure, are the ground truth of the
// tests.
package survey
