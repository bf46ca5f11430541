//go:build !linux

package sim

// adviseHugePages does nothing outside Linux.
func adviseHugePages[T amplitude](amp []T) {}
