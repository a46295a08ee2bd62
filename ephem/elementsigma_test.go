package ephem

import (
	"strings"
	"testing"

	"arcfit/astro/obs"
)

// The σ columns of the elements CSV (arcfit's own extension of design.md's
// format): read when complete for the row's form, refused when partial or of
// the other form. The element sets are invented.
func TestReadElementsSigma(t *testing.T) {
	const hdr = "name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,q_au,tp_tt,sigma_a_au,sigma_e,sigma_i_deg,sigma_node_deg,sigma_peri_deg,sigma_m_deg,sigma_q_au,sigma_tp_days\n"
	text := hdr +
		"Invented-S1,2461406.5,2.61,0.17,9.3,121,33,40,,,0.001,0.0002,0.01,0.02,0.5,0.4,,\n" +
		"Invented-S2,,,0.9,12,80,150,,0.8,2461500.5,,0.001,0.05,0.05,0.1,,0.002,0.3\n" +
		"Invented-S3,2461406.5,2.61,0.17,9.3,121,33,40,,,,,,,,,,\n"
	sets, _, err := ReadElements(strings.NewReader(text), "s.csv")
	if err != nil {
		t.Fatal(err)
	}
	s1 := sets[0].Sigma
	if s1 == nil || s1.A != 0.001 || s1.E != 0.0002 || absf(s1.I.Degrees()-0.01) > 1e-15 || absf(s1.M.Degrees()-0.4) > 1e-14 || s1.Q != 0 {
		t.Errorf("Invented-S1 σ = %+v", s1)
	}
	s2 := sets[1].Sigma
	if s2 == nil || s2.Q != 0.002 || s2.TpDays != 0.3 || s2.A != 0 {
		t.Errorf("Invented-S2 σ = %+v", s2)
	}
	if sets[2].Sigma != nil {
		t.Errorf("Invented-S3 states no σ, got %+v", sets[2].Sigma)
	}

	bad := []struct {
		name, row string
		col       int
		field     string
		sentinel  error
	}{
		{"partial", "Invented-B,2461406.5,2.61,0.17,9.3,121,33,40,,,0.001,,0.01,0.02,0.5,0.4,,\n", 54, "sigma_e", obs.ErrSyntax},
		{"other form", "Invented-B,2461406.5,2.61,0.17,9.3,121,33,40,,,0.001,0.1,0.01,0.02,0.5,0.4,0.1,\n", 76, "sigma_q_au", obs.ErrSyntax},
		{"negative", "Invented-B,2461406.5,2.61,0.17,9.3,121,33,40,,,-0.001,0.1,0.01,0.02,0.5,0.4,,\n", 48, "sigma_a_au", obs.ErrRange},
	}
	for _, c := range bad {
		_, _, err := ReadElements(strings.NewReader(hdr+c.row), "b.csv")
		wantParseError(t, c.name, err, "b.csv", 2, c.col, c.field, c.sentinel, "")
	}
}

func absf(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
