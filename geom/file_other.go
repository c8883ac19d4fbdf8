//go:build !unix

package geom

import "os"

// openFlags opens inputs for reading.
const openFlags = os.O_RDONLY
