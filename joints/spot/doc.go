// Package spot builds spot-weld connectors: for each weld point it
// chooses the stack of sheets the weld joins (stack.go), checks gaps,
// sizes and edge distances (check.go), attaches an end to every sheet
// (attach.go) and links consecutive ends (link.go). Build runs it for
// many welds in parallel; results come in the shared types of package
// joints.
package spot
