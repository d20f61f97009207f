// Package calibrate adjusts a case's permeability map to its production
// history with streamline sensitivities: the generalized travel-time
// inversion of He, Datta-Gupta and Yoon (2002) and Vasco, Yoon and
// Datta-Gupta (1999). Each producer's water-cut curve is aligned with the
// observed one by a time shift; the shift's sensitivity to each cell's
// log-permeability comes from the time of flight the streamlines reaching
// the producer spend in that cell; a regularised least-squares update
// (data misfit, damping towards the prior, smoothness by a discrete
// Laplacian) is solved with LSQR (Paige and Saunders 1982), and the
// iterations keep a line search so the misfit never rises.
package calibrate
