//go:build !linux

package sim

// secondLevelCache is unknown off Linux: 0 gives the smallest block size,
// which every current core holds in its second-level cache.
func secondLevelCache() int64 { return 0 }
