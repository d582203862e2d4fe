package mechanics

import "math"

// flightSample is the c.m. state of a numerically integrated flight.
type flightSample struct{ t, x, z, vz float64 }

// integrateFlight integrates the point-mass flight dx/dt = vx, dz/dt = vz,
// dvz/dt = −g with the classical fourth-order Runge–Kutta method (Press et
// al., Numerical Recipes, 3rd ed., §17.1) in steps of dt, until stop says
// so or 3 s have passed. It knows no closed form: the tests compare the
// package's formulas with what it finds, an independent computation.
func integrateFlight(h0, vz, vx, g, dt float64, stop func(prev, cur flightSample) bool) []flightSample {
	type state struct{ x, z, v float64 }
	deriv := func(s state) state { return state{vx, s.v, -g} }
	add := func(a, b state, k float64) state { return state{a.x + k*b.x, a.z + k*b.z, a.v + k*b.v} }
	s := state{0, h0, vz}
	out := []flightSample{{0, 0, h0, vz}}
	for t := 0.0; t < 3; {
		k1 := deriv(s)
		k2 := deriv(add(s, k1, dt/2))
		k3 := deriv(add(s, k2, dt/2))
		k4 := deriv(add(s, k3, dt))
		s = state{
			s.x + dt/6*(k1.x+2*k2.x+2*k3.x+k4.x),
			s.z + dt/6*(k1.z+2*k2.z+2*k3.z+k4.z),
			s.v + dt/6*(k1.v+2*k2.v+2*k3.v+k4.v),
		}
		t += dt
		cur := flightSample{t, s.x, s.z, s.v}
		out = append(out, cur)
		if stop != nil && stop(out[len(out)-2], cur) {
			break
		}
	}
	return out
}

// numericPeak is the highest z of an integrated flight, refined by the
// parabola through the three samples around it, and its time and x.
func numericPeak(h0, vz, vx, g float64) (tS, xM, zM float64) {
	const dt = 1e-4
	tr := integrateFlight(h0, vz, vx, g, dt, func(p, c flightSample) bool { return c.vz < 0 && p.vz < 0 })
	i := 0
	for j, s := range tr {
		if s.z > tr[i].z {
			i = j
		}
	}
	if i == 0 || i == len(tr)-1 {
		return tr[i].t, tr[i].x, tr[i].z
	}
	a, b, c := tr[i-1].z, tr[i].z, tr[i+1].z
	off := 0.5 * (a - c) / (a - 2*b + c) // vertex of the parabola, in steps
	z := b - 0.25*(a-c)*off
	return tr[i].t + off*dt, tr[i].x + off*dt*vx, z
}

// numericHeightAtX is z where the integrated flight reaches x = dM,
// interpolated linearly between the steps around it.
func numericHeightAtX(h0, vz, vx, g, dM float64) float64 {
	tr := integrateFlight(h0, vz, vx, g, 1e-5, func(_, c flightSample) bool { return c.x >= dM })
	p, c := tr[len(tr)-2], tr[len(tr)-1]
	f := (dM - p.x) / (c.x - p.x)
	return p.z + f*(c.z-p.z)
}

// numericLanding is the time the integrated flight comes back down to z =
// landM, interpolated between steps.
func numericLanding(h0, vz, g, landM float64) float64 {
	tr := integrateFlight(h0, vz, 0, g, 1e-5, func(p, c flightSample) bool { return c.vz < 0 && c.z <= landM })
	p, c := tr[len(tr)-2], tr[len(tr)-1]
	return p.t + (p.z-landM)/(p.z-c.z)*(c.t-p.t)
}

// arcDropSampled is the drop of the c.m. of a uniform circular arc below
// its apex, by averaging the heights of n points evenly spaced along it
// (the midpoint rule for the centroid integral): an independent check of
// the closed-form centroid.
func arcDropSampled(lengthM, thetaRad float64, n int) float64 {
	r := lengthM / thetaRad
	var sum float64
	for i := range n {
		phi := (float64(i)+0.5)/float64(n)*thetaRad - thetaRad/2
		sum += r * (1 - math.Cos(phi)) // below the apex
	}
	return sum / float64(n)
}
