package fem

import (
	"math"
	"math/rand/v2"
	"testing"

	"mixwell/mesh"
)

func TestPatternSystemMatchesSystem(t *testing.T) {
	// A P2 Laplace system with Dirichlet data on two sides, assembled by
	// the one-shot System and twice by PatternSystem (with changed fixed
	// values the second time): matrices and right-hand sides agree to
	// rounding, and the pattern is kept from one assembly to the next.
	const tol = 1e-13
	m := randomMesh(t, 5)
	el, err := NewLagrange(2)
	if err != nil {
		t.Fatal(err)
	}
	s := NewScalarSpace(m, el)
	bd, err := s.BoundaryDofs(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	q := NewScalarQuad(el, 4)
	nl := s.LocalLen()
	local := make([]float64, nl*nl)
	vec := make([]float64, nl)
	assemble := func(add func(rows []int, loc, v []float64)) {
		for tr := 0; tr < m.NumTriangles(); tr++ {
			a := ElementMap(m, tr)
			q.Reinit(&a)
			clear(local)
			clear(vec)
			for k := 0; k < q.NQ; k++ {
				g := q.Grad[k*nl : (k+1)*nl]
				for i := 0; i < nl; i++ {
					vec[i] += q.W[k] * q.Val[k*nl+i] * math.Sin(q.X[k][0])
					for j := 0; j < nl; j++ {
						local[i*nl+j] += q.W[k] * (g[i][0]*g[j][0] + g[i][1]*g[j][1])
					}
				}
			}
			add(s.Dofs(tr), local, vec)
		}
	}
	ps := NewPatternSystem(s.Len())
	for _, d := range bd {
		ps.Fix(d, 0)
	}
	for tr := 0; tr < m.NumTriangles(); tr++ {
		ps.Couple(0, s.Dofs(tr), 0, s.Dofs(tr))
	}
	ps.Build()
	rng := rand.New(rand.NewPCG(1, 2))
	var prev []int
	for round := 0; round < 2; round++ {
		vals := make([]float64, len(bd))
		ref := NewSystem(s.Len(), 0)
		for i, d := range bd {
			vals[i] = rng.Float64()
			ref.Fix(d, vals[i])
			ps.Fix(d, vals[i])
		}
		assemble(func(rows []int, loc, v []float64) {
			ref.AddMatrix(0, rows, nil, 0, rows, nil, loc)
			ref.AddVector(0, rows, nil, v)
		})
		ps.Reset()
		assemble(func(rows []int, loc, v []float64) {
			ps.AddMatrix(0, rows, nil, 0, rows, nil, loc)
			ps.AddVector(0, rows, nil, v)
		})
		A, b := ref.Matrix()
		B, c := ps.Matrix()
		for i := 0; i < s.Len(); i++ {
			for j := 0; j < s.Len(); j++ {
				if d := math.Abs(A.At(i, j) - B.At(i, j)); d > tol {
					t.Fatalf("round %d: entry (%d,%d): got %g, want %g", round, i, j, B.At(i, j), A.At(i, j))
				}
			}
			if d := math.Abs(b[i] - c[i]); d > tol {
				t.Fatalf("round %d: rhs %d: got %g, want %g", round, i, c[i], b[i])
			}
		}
		if round == 1 && &prev[0] != &B.ColIndices()[0] {
			t.Errorf("pattern storage changed between assemblies")
		}
		prev = B.ColIndices()
	}
}

func TestBoundaryData(t *testing.T) {
	// Boundary interpolation of polynomial data is exact: the nodal values
	// of a P3 field, and the normal moments of a BDM2 field, agree with
	// the full-space interpolants on the tagged edges (mixed orientation
	// mesh, so clockwise triangles and reversed edges occur).
	const tol = 1e-12
	m := randomMesh(t, 9)
	lag, _ := NewLagrange(3)
	V := NewScalarSpace(m, lag)
	f := func(x [2]float64) float64 { return x[0]*x[0]*x[1] - 2*x[1] + 0.5 }
	full := make([]float64, V.Len())
	InterpolateScalar(full, V, f)
	dofs, vals, err := BoundaryValues(V, []int{1, 4}, f)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := V.BoundaryDofs(1, 4)
	if len(dofs) != len(want) {
		t.Fatalf("got %d boundary dofs, want %d", len(dofs), len(want))
	}
	for i, d := range dofs {
		if math.Abs(vals[i]-full[d]) > tol {
			t.Errorf("dof %d: got %g, want %g", d, vals[i], full[d])
		}
	}
	bdm, _ := NewBDM(2)
	F := NewDivSpace(m, bdm)
	u := func(x [2]float64) [2]float64 { return [2]float64{x[0]*x[1] + 1, x[1]*x[1] - x[0]} }
	fullF := make([]float64, F.Len())
	InterpolateDiv(fullF, F, u)
	fd, fv, err := BoundaryNormalMoments(F, []int{2, 3}, func(x, n [2]float64) float64 {
		v := u(x)
		return v[0]*n[0] + v[1]*n[1]
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(fd) == 0 {
		t.Fatal("no normal moments")
	}
	for i, d := range fd {
		if math.Abs(fv[i]-fullF[d]) > tol {
			t.Errorf("flux dof %d: got %g, want %g", d, fv[i], fullF[d])
		}
	}
	if _, _, err := BoundaryValues(V, []int{7}, f); err == nil {
		t.Error("unknown tag accepted")
	}
	// Outward normals of the unit-square sides.
	sq, _ := mesh.Rectangle(0, 0, 1, 1, 2, 2, mesh.RightDiagonal)
	want4 := map[int][2]float64{1: {0, -1}, 2: {1, 0}, 3: {0, 1}, 4: {-1, 0}}
	for e := range sq.Edges {
		if !sq.IsBoundary(e) {
			continue
		}
		n, l := OutwardNormal(sq, e)
		w := want4[sq.EdgeTags[e]]
		if math.Abs(n[0]-w[0]) > tol || math.Abs(n[1]-w[1]) > tol || math.Abs(l-0.5) > tol {
			t.Errorf("edge %d tag %d: normal %v length %g, want %v, 0.5", e, sq.EdgeTags[e], n, l, w)
		}
	}
}

func TestPatternSystemReplace(t *testing.T) {
	// A 3x3 system: row 1 is replaced by the constraint x1 - 2 x0 + 3 x2 =
	// 4 with x2 fixed to 5, so the replaced row reads x1 - 2 x0 = 4 - 15;
	// rows 0 keeps its element entries, and the element entries and load
	// of row 1 are dropped. Entries written by hand from these rules.
	ps := NewPatternSystem(3)
	ps.Fix(2, 5)
	ps.Replace(1)
	all := []int{0, 1, 2}
	ps.Couple(0, all, 0, all)
	ps.Build()
	ps.Reset()
	ps.AddMatrix(0, all, nil, 0, all, nil, []float64{
		4, 1, 1,
		1, 7, 1,
		1, 1, 9,
	})
	ps.AddVector(0, all, nil, []float64{1, 100, 1})
	ps.AddRHS(1, 50)
	ps.AddReplacement(0, []int{0, 1}, nil, 0, all, nil, []float64{
		99, 99, 99, // row 0 is not replaced: skipped
		-2, 1, 3,
	})
	ps.AddReplacementRHS(1, 4)
	a, b := ps.Matrix()
	want := [3][3]float64{{4, 1, 0}, {-2, 1, 0}, {0, 0, 1}}
	wantB := [3]float64{1 - 5, 4 - 15, 5}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			if got := a.At(i, j); got != want[i][j] {
				t.Errorf("A[%d][%d] = %g, want %g", i, j, got, want[i][j])
			}
		}
		if b[i] != wantB[i] {
			t.Errorf("b[%d] = %g, want %g", i, b[i], wantB[i])
		}
	}
}

func TestPatternSystemLink(t *testing.T) {
	// Row 0 is replaced by x0 = 1 and linked to row 1 with multiple 2 and
	// to row 2 with -1: rows 1 and 2 receive their own element entries
	// plus those multiples of row 0's; the replaced row 0 keeps only its
	// replacement. Entries written by hand from these rules.
	ps := NewPatternSystem(3)
	ps.Replace(0)
	k1 := ps.Link(0, 1)
	k2 := ps.Link(0, 2)
	ps.Couple(0, []int{0}, 0, []int{0, 1})
	ps.Couple(0, []int{1, 2}, 0, []int{1, 2})
	ps.Build()
	ps.SetLink(k1, 2)
	ps.SetLink(k2, -1)
	ps.Reset()
	ps.AddMatrix(0, []int{0}, nil, 0, []int{0, 1}, nil, []float64{3, 5})
	ps.AddVector(0, []int{0}, nil, []float64{7})
	ps.AddMatrix(0, []int{1, 2}, nil, 0, []int{1, 2}, nil, []float64{1, 0, 0, 1})
	ps.AddVector(0, []int{1, 2}, nil, []float64{1, 1})
	ps.AddReplacement(0, []int{0}, nil, 0, []int{0}, nil, []float64{1})
	ps.AddReplacementRHS(0, 1)
	a, b := ps.Matrix()
	want := [3][3]float64{{1, 0, 0}, {6, 11, 0}, {-3, -5, 1}}
	wantB := [3]float64{1, 15, -6}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			if got := a.At(i, j); got != want[i][j] {
				t.Errorf("A[%d][%d] = %g, want %g", i, j, got, want[i][j])
			}
		}
		if b[i] != wantB[i] {
			t.Errorf("b[%d] = %g, want %g", i, b[i], wantB[i])
		}
	}
}
