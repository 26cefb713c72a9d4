package methodfile

import (
	"math"
	"os"
	"strings"
	"testing"
)

// A compound with only a formula gets the homologous-rule estimate of the
// n-alkane of its molar mass; n-decane (C10H22, M 142.29) must come out as
// carbon number 10: ΔH = −(9 + 49) = −58 kJ/mol, ΔS = −(44 + 60) = −104.
// The rule is the demo's rule of thumb for a nonpolar phase (invented, not
// a published table); the carbon number is exact arithmetic on the formula.
func TestFormulaOnlyCompound(t *testing.T) {
	base, err := os.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	s := string(base) + "\n[[compound]]\nname = \"decane guess\"\nformula = \"C10H22\"\n"
	m, err := Parse("f.toml", []byte(s))
	if err != nil {
		t.Fatal(err)
	}
	c := m.Compounds[len(m.Compounds)-1]
	if !c.FromFormula || c.FromIndex {
		t.Fatalf("FromFormula %v FromIndex %v", c.FromFormula, c.FromIndex)
	}
	if math.Abs(FormulaCarbons(142.286)-10) > 1e-3 {
		t.Errorf("carbons %.4f, want 10", FormulaCarbons(142.286))
	}
	if math.Abs(c.DHkJ+58) > 0.01 || math.Abs(c.DS+104) > 0.02 {
		t.Errorf("estimate %.3f kJ/mol %.3f J/(mol·K), want −58, −104", c.DHkJ, c.DS)
	}
	if _, err := m.System(); err != nil {
		t.Fatalf("the estimate does not simulate: %v", err)
	}
	// a save keeps the compound as the user wrote it: no invented dH/dS
	out, err := Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	i := strings.Index(string(out), "decane guess")
	if i < 0 {
		t.Fatalf("compound lost:\n%s", out)
	}
	if strings.Contains(string(out[i:]), "dH_kJ_mol") {
		t.Errorf("saved an estimated dH:\n%s", out[i:])
	}
	// dS alone (no dH) stays an error, as before
	if _, err := Parse("g.toml", []byte(string(base)+"\n[[compound]]\nname = \"x\"\nformula = \"C10H22\"\ndS_J_mol_K = -100\n")); err == nil || !strings.Contains(err.Error(), "dH_kJ_mol") {
		t.Errorf("dS without dH: %v", err)
	}
}
