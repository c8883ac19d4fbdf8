// Package flange finds the flanges of part pairs (overlap regions where
// two sheets lie in contact), their facing node pairs, and places spot
// welds on them at a pitch that never merges neighbouring welds into a
// seam.
package flange
