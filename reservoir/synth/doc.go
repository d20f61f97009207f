// Package synth makes synthetic reservoir maps: log-normal permeability
// realizations of a stationary Gaussian random field with a chosen
// variogram (exponential, Gaussian or spherical; geometric anisotropy by a
// major and a minor range and an azimuth), porosity correlated to them, and
// simple channelised permeability fields. The maps feed screening ensembles,
// solver tests and demos.
//
// The Gaussian fields are drawn by circulant embedding (Dietrich and Newsam
// 1997): the covariance is laid on a padded periodic grid, its 2D discrete
// Fourier transform gives the eigenvalues of the embedding, and complex white
// noise scaled by their square roots is transformed back. Cells are numbered
// k = j*NX + i with j = 0 the southern row, as in package reservoir. Results
// depend only on the settings and the seed: bit for bit whatever the number
// of cores, and to rounding across CPU architectures (compilers may fuse
// multiply-adds on some of them).
package synth
