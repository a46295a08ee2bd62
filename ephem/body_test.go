package ephem

import (
	"strings"
	"testing"
)

// TestParseBody checks the English names (common-practice spellings) in any
// case, the round trip through String, and the error for an unknown name.
func TestParseBody(t *testing.T) {
	tests := []struct {
		in   string
		want Body
	}{
		{"Mercury", Mercury}, {"venus", Venus}, {"EARTH", Earth}, {" Mars ", Mars},
		{"jUpItEr", Jupiter}, {"Saturn", Saturn}, {"uranus", Uranus}, {"Neptune", Neptune},
		{"sun", Sun}, {"Moon", Moon},
	}
	for _, tc := range tests {
		got, err := ParseBody(tc.in)
		if err != nil || got != tc.want {
			t.Errorf("ParseBody(%q) = %v, %v, want %v", tc.in, got, err, tc.want)
		}
		if back, err := ParseBody(got.String()); err != nil || back != got {
			t.Errorf("ParseBody(%q.String()) = %v, %v", got, back, err)
		}
	}
	for _, bad := range []string{"", "Pluto", "mars2", "Terra"} {
		if _, err := ParseBody(bad); err == nil || !strings.HasPrefix(err.Error(), "ephem: unknown body") || strings.Contains(err.Error(), "\n") {
			t.Errorf("ParseBody(%q): error %v, want one line \"ephem: unknown body …\"", bad, err)
		}
	}
	if s := Body(0).String(); s != "Body(0)" {
		t.Errorf("Body(0).String() = %q, want \"Body(0)\"", s)
	}
	for b := Mercury; b <= Neptune; b++ {
		if !b.IsPlanet() {
			t.Errorf("%v.IsPlanet() = false", b)
		}
	}
	if Sun.IsPlanet() || Moon.IsPlanet() || Body(0).IsPlanet() {
		t.Error("Sun, Moon or Body(0) reported as a planet")
	}
}
