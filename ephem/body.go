package ephem

import (
	"fmt"
	"strings"
)

// Body names a body of the solar system that package ephem computes.
//
// Mercury to Neptune are numbered 1 to 8 in order from the Sun; [Sun] is 9 and
// [Moon] 10. The zero value is no body: its String is "Body(0)" and every
// computation rejects it.
type Body int

// The bodies. The planets, the Earth included, come from VSOP87 (see
// [HeliocentricEclipticJ2000]); the Sun is the origin of the heliocentric
// frame; the Moon has no VSOP87 series and is computed elsewhere in the package.
const (
	Mercury Body = 1 + iota
	Venus
	Earth
	Mars
	Jupiter
	Saturn
	Uranus
	Neptune
	Sun
	Moon
)

var bodyNames = [...]string{
	Mercury: "Mercury", Venus: "Venus", Earth: "Earth", Mars: "Mars",
	Jupiter: "Jupiter", Saturn: "Saturn", Uranus: "Uranus", Neptune: "Neptune",
	Sun: "Sun", Moon: "Moon",
}

// String returns the body's English name, such as "Mars", or "Body(n)" for a
// value that names no body.
func (b Body) String() string {
	if b > 0 && int(b) < len(bodyNames) {
		return bodyNames[b]
	}
	return fmt.Sprintf("Body(%d)", int(b))
}

// IsPlanet reports whether b is one of the eight planets, the Earth included.
func (b Body) IsPlanet() bool { return b >= Mercury && b <= Neptune }

// ParseBody returns the body named by name, an English name in any case
// ("mars", "Mars", "MARS"), with surrounding blanks ignored. An unknown name
// gives an error that lists the known ones.
func ParseBody(name string) (Body, error) {
	s := strings.TrimSpace(name)
	for i, n := range bodyNames {
		if n != "" && strings.EqualFold(n, s) {
			return Body(i), nil
		}
	}
	return 0, fmt.Errorf("ephem: unknown body %q (want one of %s)", name, strings.Join(bodyNames[1:], ", "))
}
