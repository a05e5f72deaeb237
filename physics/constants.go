package physics

// Physical constants of the 2019 SI, in which the Avogadro and Boltzmann
// constants are exact (CODATA 2018, Tiesinga et al., Rev. Mod. Phys. 93,
// 025010 (2021)).
const (
	// AvogadroConstant is N_A in 1/mol (exact).
	AvogadroConstant = 6.02214076e23
	// BoltzmannConstant is k in J/K (exact).
	BoltzmannConstant = 1.380649e-23
	// GasConstant is the molar gas constant R = N_A k in J/(mol K). The
	// product is exact, 8.31446261815324; CODATA 2018 prints it as
	// 8.314462618... The constant expression is rounded once to float64.
	GasConstant = AvogadroConstant * BoltzmannConstant
)

// DefaultMoleFractionFloor is the mole fraction to which FloorMoleFractionsTo
// raises absent species when no floor is given (formulation note, section 5).
const DefaultMoleFractionFloor = 1e-6

// MoleFractionSumTol is the largest |sum_i x_i - 1| that composition checks
// accept.
const MoleFractionSumTol = 1e-9
