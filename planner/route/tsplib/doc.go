// Package tsplib reads symmetric two-dimensional instances and tours in
// the TSPLIB format and scores tours the way TSPLIB does, so that the
// route engine can be measured against published optima.
//
// Format and scoring: G. Reinelt, "TSPLIB - A Traveling Salesman Problem
// Library", ORSA Journal on Computing 3(4):376-384, 1991, and the
// TSPLIB95 documentation. Only NODE_COORD_SECTION instances with
// EDGE_WEIGHT_TYPE EUC_2D (edge length: the Euclidean distance rounded to
// the nearest integer), CEIL_2D or ATT are read.
package tsplib
