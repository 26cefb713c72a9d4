package methodfile

import "github.com/rampwise/rampwise/model"

// Formula estimate: a compound that has only a formula is taken as the
// n-alkane of the same molar mass (effective carbon number
// n = (M − 2.016) / 14.027, the CnH2n+2 series) and given the homologous
// rule of a nonpolar phase, ΔH = −(9 + 4.9 n) kJ/mol and
// ΔS = −(44 + 6.0 n) J/(mol·K) at 100 °C (the same rule of thumb the fit
// starts from). It ignores polarity, so it is rough: FormulaCarbonSD
// carbon numbers either way (from memory: typical scatter of such
// estimates), about ± 7 kJ/mol in ΔH along the homologous line, on top of
// the usual prior.
const FormulaCarbonSD = 1.5

// FormulaCarbons is the effective carbon number of a formula's molar mass.
func FormulaCarbons(molarMass float64) float64 { return (molarMass - 2.016) / 14.027 }

// FormulaEstimate is (ΔH kJ/mol, ΔS J/(mol·K)) at 100 °C for a molar mass.
func FormulaEstimate(molarMass float64) (dHkJ, dS float64) {
	n := FormulaCarbons(molarMass)
	if n < 1 {
		n = 1
	}
	return -(9 + 4.9*n), -(44 + 6.0*n)
}

func fromFormula(c *Compound) {
	f, err := model.ParseFormula(c.Formula, c.AromaticRings)
	if err != nil {
		return // the formula error is reported where it is parsed
	}
	c.DHkJ, c.DS = FormulaEstimate(f.MolarMass)
	c.RefTempC = 100
	c.FromFormula = true
}
