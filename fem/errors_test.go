package fem

import (
	"strings"
	"testing"

	"mixwell/mesh"
)

func TestBadInputErrors(t *testing.T) {
	m, err := mesh.Rectangle(0, 0, 1, 1, 2, 2, mesh.RightDiagonal)
	if err != nil {
		t.Fatal(err)
	}
	el, err := NewLagrange(2)
	if err != nil {
		t.Fatal(err)
	}
	s := NewScalarSpace(m, el)
	if _, err := s.BoundaryDofs(1, 9); err == nil || !strings.Contains(err.Error(), "tag 9") {
		t.Errorf("unknown tag: got error %v, want one naming tag 9", err)
	}
	for _, c := range []struct {
		name string
		make func() error
	}{
		{"Lagrange P0", func() error { _, err := NewLagrange(0); return err }},
		{"Lagrange P11", func() error { _, err := NewLagrange(11); return err }},
		{"DG P-1", func() error { _, err := NewDiscontinuous(-1); return err }},
		{"RT_-1", func() error { _, err := NewRaviartThomas(-1); return err }},
		{"BDM_0", func() error { _, err := NewBDM(0); return err }},
	} {
		if err := c.make(); err == nil {
			t.Errorf("%s: no error for an unsupported degree", c.name)
		} else {
			t.Logf("%s: %v", c.name, err)
		}
	}
}
