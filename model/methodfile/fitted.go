package methodfile

import "strconv"

// Decimals a fitted value is saved with (fit --out and the UI's fit): what
// the file keeps and the screens show, never 16 digits of a least-squares
// answer. The diameter at 0.1 µm and ΔH, ΔS, ΔCp at 0.001 are far below
// their standard errors; the UI edits these keys at the same precision.
const (
	FittedDiameterDecimals    = 4 // column.diameter_mm
	FittedPlateHeightDecimals = 3 // column.plate_height_factor
	FittedParticleDecimals    = 1 // column.particle_um
	FittedCompoundDecimals    = 3 // dH_kJ_mol, dS_J_mol_K, dCp_J_mol_K
)

// RoundFitted rounds the values a fit sets in m to the decimals above.
func RoundFitted(m *Method) {
	m.Column.DiameterMM = roundDecimals(m.Column.DiameterMM, FittedDiameterDecimals)
	m.Column.PlateHeight = roundDecimals(m.Column.PlateHeight, FittedPlateHeightDecimals)
	if m.Column.ParticleUM != 0 {
		m.Column.ParticleUM = roundDecimals(m.Column.ParticleUM, FittedParticleDecimals)
	}
	for i := range m.Compounds {
		c := &m.Compounds[i]
		if c.FromIndex {
			continue // derived from the ladder on reading, not saved
		}
		c.DHkJ = roundDecimals(c.DHkJ, FittedCompoundDecimals)
		c.DS = roundDecimals(c.DS, FittedCompoundDecimals)
		c.DCp = roundDecimals(c.DCp, FittedCompoundDecimals)
	}
}

// roundDecimals is x at d decimals, as the file writes it.
func roundDecimals(x float64, d int) float64 {
	v, err := strconv.ParseFloat(strconv.FormatFloat(x, 'f', d, 64), 64)
	if err != nil {
		return x
	}
	return v
}
