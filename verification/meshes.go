package verification

import (
	"fmt"
	"math/rand/v2"

	"mixwell/mesh"
)

// meshLevels returns the unit-square meshes of a study: a structured coarse
// mesh with coarse cells per side split by the given diagonal pattern (randomly perturbed if asked), refined
// uniformly levels-1 times, so that every level has the same shape quality
// and the observed rates are asymptotic.
func meshLevels(cfg Config, coarse int, pattern mesh.Diagonal) ([]*mesh.Mesh, string, error) {
	if cfg.Coarse > 0 {
		coarse = cfg.Coarse
	}
	m, err := mesh.Rectangle(0, 0, 1, 1, coarse, coarse, pattern)
	if err != nil {
		return nil, "", fmt.Errorf("verification: coarse mesh: %w", err)
	}
	kind := "structured"
	if cfg.Perturbed {
		rng := rand.New(rand.NewPCG(cfg.Seed, 0x6d69786c))
		m, err = mesh.Perturb(m, 0.2, rng)
		if err != nil {
			return nil, "", fmt.Errorf("verification: perturbing the coarse mesh: %w", err)
		}
		kind = "perturbed"
	}
	out := make([]*mesh.Mesh, cfg.Levels)
	out[0] = m
	for l := 1; l < cfg.Levels; l++ {
		out[l] = mesh.Refine(out[l-1])
	}
	if cfg.Clockwise {
		// Same meshes, local vertex order permuted at random: about half
		// the triangles become clockwise (formulation note, section 10
		// item 1).
		rng := rand.New(rand.NewPCG(cfg.Seed, 0x636c6f63))
		for l := range out {
			out[l] = out[l].PermuteLocalVertices(rng)
		}
		kind += "-permuted"
	}
	return out, kind, nil
}
