package sim

import (
	"bufio"
	"errors"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"
)

// ErrTooLarge is wrapped by errors for allocations the machine cannot hold.
var ErrTooLarge = errors.New("too large for this machine's memory")

// AvailableMemory returns the bytes of memory available for new allocations:
// MemAvailable from /proc/meminfo, or the total RAM where that is missing.
func AvailableMemory() uint64 {
	if f, err := os.Open("/proc/meminfo"); err == nil {
		defer f.Close()
		sc := bufio.NewScanner(f)
		for sc.Scan() {
			fields := strings.Fields(sc.Text())
			if len(fields) >= 2 && fields[0] == "MemAvailable:" {
				if kb, err := strconv.ParseUint(fields[1], 10, 64); err == nil {
					return kb * 1024
				}
			}
		}
	}
	return totalMemory()
}

// GiB formats a byte count in GiB for messages.
func GiB(bytes float64) string {
	return strconv.FormatFloat(bytes/(1<<30), 'f', 1, 64) + " GiB"
}

// CheckMemory returns an error wrapping ErrTooLarge when need bytes exceed
// the memory available now. what names the allocation for the message,
// which ends with the fix "use fewer qubits".
func CheckMemory(need float64, what string) error {
	return CheckMemoryFix(need, what, "use fewer qubits")
}

// CheckMemoryFix is CheckMemory with the fix that the message ends with, for
// a caller whose need grows with more than the qubit count (several
// instances or workers at once: "use fewer --workers").
func CheckMemoryFix(need float64, what, fix string) error {
	avail := AvailableMemory()
	if avail == 0 || need <= float64(avail) {
		return nil
	}
	return fmt.Errorf("sim: %s needs %s but this machine has %s available: %w; %s",
		what, GiB(need), GiB(float64(avail)), ErrTooLarge, fix)
}

// CheckVector returns an error wrapping ErrTooLarge when a vector of 2^n
// elements of bytesPerElement bytes each (what names it) does not fit in the
// memory available now. Unlike CheckMemory it names sizes beyond 2^60 bytes
// as powers of two, so that a request of thousands of qubits is refused with
// the size it would need. It panics if bytesPerElement is not a power of two.
func CheckVector(n int, bytesPerElement float64, what string) error {
	frac, exp := math.Frexp(bytesPerElement)
	if frac != 0.5 {
		panic(fmt.Sprintf("sim: CheckVector with %v bytes per element, not a power of two", bytesPerElement))
	}
	if log2 := n + exp - 1; log2 > 60 {
		return fmt.Errorf("sim: %s needs 2^%d bytes, far beyond any machine (this one has %s available): %w; use fewer qubits",
			what, log2, GiB(float64(AvailableMemory())), ErrTooLarge)
	}
	return CheckMemory(math.Ldexp(bytesPerElement, n), what)
}

// StateBytes returns the bytes of an n-qubit complex128 state vector.
func StateBytes(n int) float64 {
	return math.Ldexp(16, n)
}

// FittingQubits returns the largest n whose 2^n-element vector of
// bytesPerElement bytes fits in the memory available now (0 if none).
func FittingQubits(bytesPerElement float64) int {
	avail := float64(AvailableMemory())
	n := 0
	for math.Ldexp(bytesPerElement, n+1) <= avail && n < 62 {
		n++
	}
	return n
}
