// Package export writes plans for people and machines: the operator's
// printed plan (PDF), an SVG of the pattern and route, the full plan as
// JSON, one CSV row per tip action, and variant comparison reports. Every
// file is written to a temporary file and renamed into place.
package export
