// Package figure renders ringbox's plots — N(E), D(E), M(E), graphene band
// structures E(k), size sweeps and overlays of several scenarios — as SVG or
// PNG. It is the only package that imports gonum/plot; callers describe a
// plot with Figure and Series and never see gonum/plot types.
//
// Data are checked at the boundary (NaN, ±Inf and empty input are rejected
// with ErrNonFinite and ErrNoData), long series are decimated so that a
// figure stays small (see decimate.go), and every figure reports a Frame
// that maps output pixels back to data values for a crosshair readout.
package figure
