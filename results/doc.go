// Package results writes what a solved case has to show (formulation note,
// section 9) into one output directory, in open formats only:
//
//   - fields.vtu: the selected fields (casefile Output.Fields) as VTK XML
//     point data on a sub-triangulation of the mesh (mesh.SubdivideBroken
//     at level Output.Subdivision, see below), binary appended data;
//   - summary.json: convergence, boundary fluxes, balances, scales and
//     groups, method, timings, peak memory, the iteration history and the
//     list of files written (keys documented on Summary);
//   - probe-NAME.csv: the selected fields along each probe line;
//   - PNG figures: x_NAME.png (a colour map of each mole fraction),
//     velocity.png (speed with arrows), probe-NAME.png (mole fractions
//     along each probe) and history.png (the nonlinear iteration).
//
// # Field names and units
//
// Fields keep SI units. In fields.vtu they are named velocity (m/s),
// pressure (Pa, the dynamic pressure p), and per species NAME: J_NAME (mass
// flux, kg/(m^2 s)), N_NAME (molar flux, mol/(m^2 s)), j_NAME (diffusive
// mass flux J - rho_i v, kg/(m^2 s)), mu_NAME (chemical potential, J/mol),
// c_NAME (concentration, mol/m^3), x_NAME (mole fraction), w_NAME (mass
// fraction), and density (kg/m^3). Vectors have two components (written
// with a zero third one, as VTK expects). The probe files use the same
// names with the vector components split into NAME_x and NAME_y, except
// that velocity is vx, vy and pressure is p; their header is
//
//	s,x,y,<field columns>
//
// where s is the distance from the probe's start (m) and x, y the position
// (m). Columns follow the order of casefile.AllFields, species in case
// order, whatever the order of the case's field list.
//
// # Choice of sub-triangulation
//
// Most fields are discontinuous across triangle edges: the potentials are
// piecewise polynomials without continuity, the fluxes have continuous
// normal components only, and everything computed from them (fractions,
// concentrations, density) inherits the jumps; so does the pressure of the
// Scott–Vogelius pair. fields.vtu therefore uses mesh.SubdivideBroken, in
// which every triangle has its own vertices, so that each vertex carries
// the value of its own triangle and jumps show as they are. Only when every
// selected field is continuous (velocity, and pressure with Taylor–Hood)
// is the merged mesh.Subdivide used, a smaller file. summary.json records
// the choice under "vtu".
//
// # Probe points outside the domain
//
// Probe points that no triangle contains (in a hole, or beyond a
// non-convex outline) are left out of the CSV file and the profile, and a
// warning names the probe and the number of points left out. Callers
// should reject probes that leave the bounding box of the mesh before
// solving (see CheckProbes): that is a mistake in the case, not geometry.
//
// # Writing
//
// Every file is written atomically: into a temporary file in the output
// directory that is renamed to its name only when complete, and removed on
// any failure, so no file ever holds partial output and no temporary file
// is left behind. summary.json is written last, so its presence marks a
// complete set. Files of an earlier run that this run does not produce
// (for example the CSV file of a probe since removed from the case) are
// left alone; summary.json lists the files that belong to it.
//
// Figures are drawn only from finite values; a figure that cannot be
// drawn (for example a history without a single positive residual) is a
// warning, not an error, so that the data files of a failed iteration are
// still written.
package results
