// Package geomtest is test support for Joinery's packages: the expected
// mesh of the shared "small" fixture, a field-by-field mesh comparison, a
// quad-grid builder, and seed loading and result checks for fuzz targets.
//
// It is not part of Joinery's API: only _test.go files import it, and it
// may change without notice. Tests of package geom itself cannot use it
// (geomtest imports geom).
package geomtest
