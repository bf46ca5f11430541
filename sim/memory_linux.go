package sim

import "syscall"

// totalMemory returns the machine's RAM in bytes, or 0 if unknown.
func totalMemory() uint64 {
	var info syscall.Sysinfo_t
	if err := syscall.Sysinfo(&info); err == nil {
		return uint64(info.Totalram) * uint64(info.Unit)
	}
	return 0
}
