// Package joints holds joint lists (spot welds and bolts as an analyst's
// joining plan gives them), job files, and everything that turns joints
// into connectors: finding the sheets of a stack, attaching connectors to
// them, and checking the result.
package joints
