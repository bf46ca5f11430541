package sim

// FuseMinQubits lets the external tests run block passes on small states.
var FuseMinQubits = &fuseMinQubits

// VisitFolds lets the external tests check that RunVisit's fold is taken.
var VisitFolds = visitFolds

// SetBlock sets the block size and low qubits of the fused passes (for the
// external tests) and returns a function that restores them.
func SetBlock(k, low int) (restore func()) {
	k0, low0 := blockQubits, blockLow
	blockQubits, blockLow = k, low
	return func() { blockQubits, blockLow = k0, low0 }
}

// BlockSize and CacheBytes let the external tests check the block shape.
var BlockSize, CacheBytes = blockSize, cacheBytes
