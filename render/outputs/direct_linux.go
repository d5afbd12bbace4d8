package outputs

import (
	"errors"
	"os"

	"golang.org/x/sys/unix"
)

// directFileSystems are the file systems on which setDirect turns
// O_DIRECT on (statfs(2) f_type): local block file systems, where a
// direct write of a whole buffer is as fast as the device. Network and
// cluster file systems (NFS, Lustre), overlays, tmpfs and the rest keep
// the page cache, where a direct write could be a slow synchronous round
// trip or not work at all.
var directFileSystems = map[int64]bool{
	unix.EXT4_SUPER_MAGIC:  true, // also ext2 and ext3
	unix.XFS_SUPER_MAGIC:   true,
	unix.BTRFS_SUPER_MAGIC: true,
	unix.F2FS_SUPER_MAGIC:  true,
}

// errNotLocal: the file system is not one of directFileSystems.
var errNotLocal = errors.New("not a local block file system")

// setDirect turns O_DIRECT on or off for f: with it on, writes go from
// our buffers to the device without a copy into the page cache (Linux
// open(2), "O_DIRECT"; fcntl(2), F_SETFL). Writes must then be whole,
// aligned blocks (directAlign). Turning it on fails on file systems other
// than directFileSystems, and where the file system refuses it; callers
// then keep writing through the cache.
func setDirect(f *os.File, on bool) error {
	rc, err := f.SyscallConn()
	if err != nil {
		return err
	}
	var ferr error
	err = rc.Control(func(fd uintptr) {
		if on {
			var st unix.Statfs_t
			if ferr = unix.Fstatfs(int(fd), &st); ferr != nil {
				return
			}
			if !directFileSystems[int64(st.Type)] {
				ferr = errNotLocal
				return
			}
		}
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
