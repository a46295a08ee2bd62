package astro

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Mat3 is a 3×3 matrix of float64, row-major, used for the rotations between
// frames. It is a value type: the products return new matrices and allocate
// nothing.
type Mat3 [3][3]float64

// Identity3 returns the 3×3 identity matrix.
func Identity3() Mat3 { return Mat3{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}} }

// Mul returns the product m·n.
func (m Mat3) Mul(n Mat3) Mat3 {
	var p Mat3
	for i := range 3 {
		for j := range 3 {
			p[i][j] = m[i][0]*n[0][j] + m[i][1]*n[1][j] + m[i][2]*n[2][j]
		}
	}
	return p
}

// MulVec returns the product m·v.
func (m Mat3) MulVec(v r3.Vec) r3.Vec {
	return r3.Vec{
		X: m[0][0]*v.X + m[0][1]*v.Y + m[0][2]*v.Z,
		Y: m[1][0]*v.X + m[1][1]*v.Y + m[1][2]*v.Z,
		Z: m[2][0]*v.X + m[2][1]*v.Y + m[2][2]*v.Z,
	}
}

// T returns the transpose of m, which for a rotation is its inverse.
func (m Mat3) T() Mat3 {
	var t Mat3
	for i := range 3 {
		for j := range 3 {
			t[i][j] = m[j][i]
		}
	}
	return t
}

// RotX returns the matrix that rotates the coordinate frame by the angle a
// about its x axis (a passive rotation: a vector's coordinates in the new frame
// are RotX(a)·v). The sign convention is that of the IERS Conventions (2010) and
// the Explanatory Supplement (2013) §6.4: R1(a) = [[1,0,0],[0,cos a,sin a],[0,−sin a,cos a]].
func RotX(a Angle) Mat3 {
	s, c := math.Sincos(float64(a))
	return Mat3{{1, 0, 0}, {0, c, s}, {0, -s, c}}
}

// RotY returns the passive rotation of the frame by a about its y axis,
// R2(a) = [[cos a,0,−sin a],[0,1,0],[sin a,0,cos a]] (IERS Conventions 2010).
func RotY(a Angle) Mat3 {
	s, c := math.Sincos(float64(a))
	return Mat3{{c, 0, -s}, {0, 1, 0}, {s, 0, c}}
}

// RotZ returns the passive rotation of the frame by a about its z axis,
// R3(a) = [[cos a,sin a,0],[−sin a,cos a,0],[0,0,1]] (IERS Conventions 2010).
func RotZ(a Angle) Mat3 {
	s, c := math.Sincos(float64(a))
	return Mat3{{c, s, 0}, {-s, c, 0}, {0, 0, 1}}
}

// UnitVector returns the unit vector towards the spherical coordinates
// (lon, lat): right ascension and declination, or ecliptic longitude and
// latitude, in the frame they are given in.
func UnitVector(lon, lat Angle) r3.Vec {
	sl, cl := math.Sincos(float64(lon))
	sb, cb := math.Sincos(float64(lat))
	return r3.Vec{X: cb * cl, Y: cb * sl, Z: sb}
}

// Spherical returns the longitude in [0, 2π), the latitude in [−π/2, π/2] and
// the length of v. The zero vector gives zeros.
func Spherical(v r3.Vec) (lon, lat Angle, r float64) {
	rxy := math.Hypot(v.X, v.Y)
	r = math.Hypot(rxy, v.Z)
	if r == 0 {
		return 0, 0, 0
	}
	lon = Angle(math.Atan2(v.Y, v.X)).Normalized()
	lat = Angle(math.Atan2(v.Z, rxy))
	return lon, lat, r
}
