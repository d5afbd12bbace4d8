package main

import (
	"bufio"
	"bytes"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"

	"kerrscope/render/outputs"
	"kerrscope/scene"
)

// memoryLimit returns the memory this process may use, in bytes, and
// where that figure comes from; ok is false when nothing is known. Tests
// replace it.
var memoryLimit = systemMemoryLimit

// systemMemoryLimit is the smallest of the memory the kernel reports
// available (MemAvailable in /proc/meminfo) and the limit of the control
// group the process runs in (cgroup v2 memory.max, "max" meaning none, or
// cgroup v1 memory.limit_in_bytes), as set by container and batch
// systems such as Slurm.
func systemMemoryLimit() (limit int64, source string, ok bool) {
	consider := func(v int64, src string) {
		if v > 0 && (!ok || v < limit) {
			limit, source, ok = v, src, true
		}
	}
	if data, err := os.ReadFile("/proc/meminfo"); err == nil {
		if kb, found := meminfoField(data, "MemAvailable"); found {
			consider(kb*1024, "MemAvailable in /proc/meminfo")
		}
	}
	for _, p := range cgroupLimitFiles() {
		if v, found := readCgroupLimit(p); found {
			consider(v, "the control-group limit "+p)
		}
	}
	return limit, source, ok
}

// meminfoField returns the value (in kB) of a field of /proc/meminfo.
func meminfoField(data []byte, name string) (int64, bool) {
	sc := bufio.NewScanner(bytes.NewReader(data))
	for sc.Scan() {
		k, v, found := strings.Cut(sc.Text(), ":")
		if !found || k != name {
			continue
		}
		kb, err := strconv.ParseInt(strings.TrimSuffix(strings.TrimSpace(v), " kB"), 10, 64)
		return kb, err == nil
	}
	return 0, false
}

// cgroupLimitFiles lists the memory limit files of this process's
// control group: cgroup v2 (unified) and v1 (memory controller), from
// /proc/self/cgroup, and the files at the root of /sys/fs/cgroup that a
// container sees as its own group.
func cgroupLimitFiles() []string {
	files := []string{"/sys/fs/cgroup/memory.max", "/sys/fs/cgroup/memory/memory.limit_in_bytes"}
	data, err := os.ReadFile("/proc/self/cgroup")
	if err != nil {
		return files
	}
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		parts := strings.SplitN(line, ":", 3)
		if len(parts) != 3 || parts[2] == "/" {
			continue
		}
		switch {
		case parts[0] == "0" && parts[1] == "":
			files = append(files, "/sys/fs/cgroup"+parts[2]+"/memory.max")
		case strings.Contains(","+parts[1]+",", ",memory,"):
			files = append(files, "/sys/fs/cgroup/memory"+parts[2]+"/memory.limit_in_bytes")
		}
	}
	return files
}

// readCgroupLimit reads a memory limit file: a number of bytes, or "max"
// (cgroup v2) for no limit. cgroup v1 writes no limit as a huge number
// (near 2⁶³), which is treated as none too.
func readCgroupLimit(path string) (int64, bool) {
	data, err := os.ReadFile(path)
	if err != nil {
		return 0, false
	}
	s := strings.TrimSpace(string(data))
	if s == "max" {
		return 0, false
	}
	v, err := strconv.ParseInt(s, 10, 64)
	if err != nil || v <= 0 || v >= 1<<62 {
		return 0, false
	}
	return v, true
}

// checkMemory refuses a run whose estimated peak memory
// (outputs.MemoryEstimate for the artifacts of set) exceeds what the
// process may use.
func checkMemory(r scene.Resolved, set outputs.Set) error {
	limit, source, ok := memoryLimit()
	if !ok {
		return nil
	}
	need := outputs.MemoryEstimate(r, set, runtime.GOMAXPROCS(0))
	if need <= limit {
		return nil
	}
	return usagef("screen.width × screen.height = %d × %d with disk.orders = %d needs about %s, more than the %s this process may use (%s); use fewer pixels or orders",
		r.Screen.Width, r.Screen.Height, r.Disk.Orders, bytesText(need), bytesText(limit), source)
}

// bytesText writes a size in MiB or GiB.
func bytesText(b int64) string {
	if b >= 1<<30 {
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	}
	return fmt.Sprintf("%.0f MiB", float64(b)/(1<<20))
}
