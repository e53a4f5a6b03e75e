// Package design holds dimerpath's design model (field, terraces,
// fiducials and layout variants made of named regions), its JSON file
// format, and the design-rule checks run before planning.
package design
