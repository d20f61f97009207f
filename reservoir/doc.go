// Package reservoir holds the case: grid geometry, property maps, wells,
// fluids, relative permeability, faults, the schedule and the unit system.
// It reads and validates case files (YAML, Load) and map files (GIS ASCII
// rasters and plain matrices, ReadMap, ReadASCIIRaster, ReadMatrix), writes
// rasters for the other packages (WriteASCIIRaster), and reports every
// problem with the file and the line, row and column, cell or well that
// caused it (*InputError, *WellError, ErrorList).
//
// Cells are numbered k = j*NX + i with i counting east from the west edge
// and j counting north from the south edge, both from 0. Map files list
// rows from north to south; the readers flip them.
package reservoir
