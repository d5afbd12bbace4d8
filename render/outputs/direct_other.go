//go:build !linux

package outputs

import (
	"errors"
	"os"
)

// setDirect: writes without the page cache are used on Linux only.
func setDirect(f *os.File, on bool) error {
	return errors.ErrUnsupported
}
