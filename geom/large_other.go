//go:build !linux

package geom

func adviseHuge(p, size uintptr) {}
