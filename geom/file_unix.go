//go:build unix

package geom

import (
	"os"
	"syscall"
)

// openFlags opens inputs without blocking on a named pipe.
const openFlags = os.O_RDONLY | syscall.O_NONBLOCK
