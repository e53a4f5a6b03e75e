package editor

import (
	"dimerpath/assets"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// defaultProfile returns the instrument profile planning starts from.
func defaultProfile() planner.Profile { return planner.DefaultProfile() }

// LoadDesign reads and validates a design file.
func LoadDesign(path string) (*design.Design, error) { return design.Load(path) }

// SaveDesign validates d and writes it atomically to path.
func SaveDesign(path string, d *design.Design) error { return design.Save(path, d) }

// DemoDesign returns the built-in demo design.
func DemoDesign() (*design.Design, error) {
	return design.Parse(assets.DemoName, assets.DemoDesign)
}

// ValidateProfile reports every field of p that is not physical, then
// the first tip condition beyond the profile's own instrument limits.
func ValidateProfile(p planner.Profile) error {
	if err := p.Validate(); err != nil {
		return err
	}
	return p.CheckLimits(nil)
}

// LoadProfile reads and validates an instrument-profile file.
func LoadProfile(path string) (planner.Profile, error) { return planner.LoadProfile(path) }

// SaveProfile writes a valid profile atomically to path.
func SaveProfile(path string, p planner.Profile) error { return planner.SaveProfile(path, p) }

// PresetProfile returns the built-in profile of that name.
func PresetProfile(name string) (planner.Profile, error) { return planner.Preset(name) }
