package sim

import (
	"strconv"
	"strings"
)

// cacheBytes parses a sysfs cache size such as "2048K" or "1M"; 0 if it
// cannot.
func cacheBytes(s string) int64 {
	unit := int64(1)
	switch {
	case strings.HasSuffix(s, "K"):
		unit, s = 1<<10, strings.TrimSuffix(s, "K")
	case strings.HasSuffix(s, "M"):
		unit, s = 1<<20, strings.TrimSuffix(s, "M")
	}
	v, err := strconv.ParseInt(s, 10, 64)
	if err != nil || v < 0 {
		return 0
	}
	return v * unit
}
