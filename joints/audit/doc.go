// Package audit checks weld definitions, built by Joinery or read from
// an existing model: welds so close they act as a seam, duplicates,
// short pitch, loose parts and mechanisms.
package audit
