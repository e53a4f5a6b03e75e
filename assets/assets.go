// Package assets holds the files built into the dimerpath binary: the
// demo design (an invented device, see README "The demo design").
package assets

import _ "embed"

// DemoDesign is the JSON of the built-in demo design, assets/demo.json.
//
//go:embed demo.json
var DemoDesign []byte

// DemoName is the file name the demo is reported under in messages.
const DemoName = "demo.json"

// DemoSurvey is the demo design's survey topograph, assets/demo-survey.png
// (invented: made by lattice/survey/synth.DemoParams with its seed; see
// README "The demo design"); the demo names it in its survey section.
//
//go:embed demo-survey.png
var DemoSurvey []byte

// DemoSurveyName is the file name the demo's survey names.
const DemoSurveyName = "demo-survey.png"
