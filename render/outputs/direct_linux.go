package outputs

import (
	"os"

	"golang.org/x/sys/unix"
)

// setDirect turns O_DIRECT on or off for f: with it on, writes go from
// our buffers to the device without a copy into the page cache (Linux
// open(2), "O_DIRECT"; fcntl(2), F_SETFL). Writes must then be whole,
// aligned blocks (directAlign). It fails where the file system does not
// take it (tmpfs on older kernels, for one); callers then keep writing
// through the cache.
func setDirect(f *os.File, on bool) error {
	rc, err := f.SyscallConn()
	if err != nil {
		return err
	}
	var ferr error
	err = rc.Control(func(fd uintptr) {
		flags, err := unix.FcntlInt(fd, unix.F_GETFL, 0)
		if err != nil {
			ferr = err
			return
		}
		if on {
			flags |= unix.O_DIRECT
		} else {
			flags &^= unix.O_DIRECT
		}
		_, ferr = unix.FcntlInt(fd, unix.F_SETFL, flags)
	})
	if err != nil {
		return err
	}
	return ferr
}
