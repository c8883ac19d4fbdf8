//go:build !linux

package main

// adviseHugePages does nothing on systems other than Linux.
func adviseHugePages(int) {}
