// Package gui is dimerpath's desktop window.
package gui
