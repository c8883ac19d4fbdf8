// Package native reads Joinery's native mesh format, a line-oriented text
// format made for fast reading, readable diffs and editing by hand. Files
// use the extension .jmesh; docs/native-format.md is the specification.
//
//	joinery-mesh 1
//	part 10 thickness=1.2 surface=mid material=DC04 name=floor panel front
//	node 101 0 0 0
//	node 102 10.5 0 0
//	node 103 10.5 10.5 0
//	shell 1001 10 101 102 103 t=1.5
//
// The writer is Write.
package native
