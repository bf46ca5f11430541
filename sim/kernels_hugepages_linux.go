package sim

import (
	"syscall"
	"unsafe"
)

// adviseHugePages asks Linux to back the state vector with transparent huge
// pages (madvise MADV_HUGEPAGE; Linux kernel documentation,
// admin-guide/mm/transhuge). Block passes gather short runs from all over
// the vector, and with 2 MiB pages each run no longer costs its own TLB
// miss. It is advice: errors (THP disabled, an old kernel) are ignored.
func adviseHugePages[T amplitude](amp []T) {
	if len(amp) == 0 {
		return
	}
	var zero T
	size := int(unsafe.Sizeof(zero)) * len(amp)
	if size < 4<<20 {
		return
	}
	b := unsafe.Slice((*byte)(unsafe.Pointer(unsafe.SliceData(amp))), size)
	// madvise needs a page-aligned start: round up to the next 4 KiB page.
	off := int(-uintptr(unsafe.Pointer(&b[0])) & 4095)
	_ = syscall.Madvise(b[off:], 14) // MADV_HUGEPAGE
}
