package stiffness

import "strings"

// Material holds the elastic constants of a connector's beam, N/mm^2.
type Material struct {
	Name string  // "steel", "aluminium", or a bolt shank's constants (ShankMaterial)
	E    float64 // Young's modulus
	G    float64 // shear modulus
	Nu   float64 // Poisson's ratio
}

// Steel returns the default material, structural steel: E = 210,000
// N/mm^2, nu = 0.3, G = E / (2 (1 + nu)), about 81,000 N/mm^2 (EN
// 1993-1-1, clause 3.2.6; from memory).
func Steel() Material { return Material{Name: "steel", E: 210000, Nu: 0.3, G: 210000 / (2 * 1.3)} }

// Aluminium returns the constants of aluminium alloys: E = 70,000
// N/mm^2, nu = 0.3, G = 27,000 N/mm^2 (EN 1999-1-1, clause 3.2.5; from
// memory).
func Aluminium() Material { return Material{Name: "aluminium", E: 70000, Nu: 0.3, G: 27000} }

// MaterialOf reads a parts table's material: "aluminium" or
// "aluminum", or an aluminium designation ("EN AW-6082", "AW-5754",
// "AlMg3", ...: a name starting with "en aw", "aw-" or "al", in any
// case) is aluminium; anything else, and no material, is steel (car
// bodies are mostly steel grades such as DC04 or HC340LA).
func MaterialOf(name string) Material {
	n := strings.ToLower(strings.TrimSpace(name))
	switch {
	case n == "aluminium" || n == "aluminum",
		strings.HasPrefix(n, "en aw"), strings.HasPrefix(n, "aw-"), strings.HasPrefix(n, "al"):
		return Aluminium()
	}
	return Steel()
}

// Softer returns the material with the lower modulus of a and b: the
// one a connector between them is taken to be of.
func Softer(a, b Material) Material {
	if b.E < a.E {
		return b
	}
	return a
}
