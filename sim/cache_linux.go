package sim

import (
	"os"
	"path/filepath"
	"strings"
)

// secondLevelCache returns the bytes of CPU 0's second-level data or
// unified cache as Linux describes it in sysfs, or 0 if it is unknown.
func secondLevelCache() int64 {
	dirs, _ := filepath.Glob("/sys/devices/system/cpu/cpu0/cache/index*")
	for _, d := range dirs {
		read := func(name string) string {
			b, err := os.ReadFile(filepath.Join(d, name))
			if err != nil {
				return ""
			}
			return strings.TrimSpace(string(b))
		}
		if t := read("type"); read("level") == "2" && (t == "Unified" || t == "Data") {
			return cacheBytes(read("size"))
		}
	}
	return 0
}
