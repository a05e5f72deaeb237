package physics

import (
	"math"
	"testing"

	"mixwell/fem"
)

func TestOutletLinearisation(t *testing.T) {
	// The outflow linearisation about a state with varying composition.
	// Checks (formulation note, section 10 item 4): the boundary
	// potentials F_i(mu) = mu_i(x(mu), P + S p_b) of the ideal gas have the
	// Jacobian delta_ik - x_k (closed form, our derivation; the code takes
	// it by central differences), and F_i(mu^) = ln(x_i (P + S p_b)/P_ref)
	// in units of RT; the mass fractions sum to one and their derivatives
	// their derivatives dw_i/dmu_k sum to zero over i.
	prob, closure, sc := scaledSlab(t, 1)
	P := 99.4e3 / sc.ThermodynamicPressure()
	outflow := []SpeciesCondition{{Kind: SpeciesOutflow}, {Kind: SpeciesOutflow}, {Kind: SpeciesOutflow}}
	bc := prob.Boundary[3]
	bc.Species = outflow
	bc.Pressure = func([2]float64) float64 { return 3 }
	prob.Boundary[3] = bc
	d, err := NewDiscretisation(prob)
	if err != nil {
		t.Fatal(err)
	}
	if !d.HasOutflow() {
		t.Fatal("no outflow edges found")
	}
	pm, err := newPicard(d, closure, P, PotentialProjection, 1e-8)
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, pm.stateLen())
	nV := d.V.Len()
	for i := 0; i < 3; i++ {
		base := []float64{0.2, 0.3, 0.5}[i]
		fem.InterpolateScalar(x[i*nV:(i+1)*nV], d.V, func(p [2]float64) float64 {
			return math.Log(base * (1 + 0.3*math.Sin(3*p[0]+float64(i))))
		})
	}
	if err := pm.setOutlet(x, x[pm.outletOffset():pm.previousOffset()]); err != nil {
		t.Fatal(err)
	}
	n, nq := 3, d.fe.NQ
	c := make([]float64, n)
	for pq := 0; pq < len(d.outflow)*nq; pq++ {
		mu := d.out.mu[pq*n : (pq+1)*n]
		if err := closure.ConcentrationsTo(c, nil, nil, mu, P); err != nil {
			t.Fatal(err)
		}
		var cT, wsum float64
		for _, v := range c {
			cT += v
		}
		for i := 0; i < n; i++ {
			wsum += d.out.w[pq*n+i]
			for k := 0; k < n; k++ {
				want := -c[k] / cT
				if i == k {
					want++
				}
				if got := d.out.dF[(pq*n+i)*n+k]; math.Abs(got-want) > 1e-8 {
					t.Errorf("point %d: dF_%d%d = %.12g, closed form %.12g", pq, i, k, got, want)
				}
			}
			// F_i(mu^) = dF mu^ + cb.
			F := d.out.cb[pq*n+i]
			for k := 0; k < n; k++ {
				F += d.out.dF[(pq*n+i)*n+k] * mu[k]
			}
			want := math.Log(c[i] / cT * (P + prob.S*3) / P)
			if math.Abs(F-want) > 1e-9 {
				t.Errorf("point %d: F_%d = %.12g, closed form %.12g", pq, i, F, want)
			}
		}
		if math.Abs(wsum-1) > 1e-14 {
			t.Errorf("point %d: mass fractions sum to %.16g", pq, wsum)
		}
		for k := 0; k < n; k++ {
			var s float64
			for i := 0; i < n; i++ {
				s += d.out.a[(pq*n+i)*n+k]
			}
			if math.Abs(s) > 1e-12 {
				t.Errorf("point %d: sum_i dw_i/dmu_%d = %.3g, want 0", pq, k, s)
			}
		}
	}
}
