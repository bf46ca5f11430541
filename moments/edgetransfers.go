package moments

import (
	"mixdepth/circuits"
)

// EdgeTransfers holds the transfer of each coupler for a gate set whose
// entangler differs from coupler to coupler (circuits.GateSet bound to a
// graph with calibrated couplers): an engine's gate loop asks For(a, b)
// instead of using one Transfer. The zero value is not usable; build one
// with EdgeTransfersFor.
type EdgeTransfers struct {
	// Default is the transfer of the couplers without their own entangler.
	Default Transfer
	byEdge  map[[2]int]*Transfer
}

// EdgeTransfersFor returns the per-coupler transfers of e, or nil when every
// gate of e has the same transfer (then TransferFor is all an engine needs).
// Each calibrated entangler G gets EntanglerTransfer(G), in the orientation
// of the key, so For(a, b) and For(b, a) are each other's mirror. An
// ensemble without exact moments gives an error wrapping ErrNoExactMoments.
func EdgeTransfersFor(e circuits.Ensemble) (*EdgeTransfers, error) {
	gs, ok := e.(*circuits.GateSet)
	if !ok {
		return nil, nil
	}
	gates := gs.EdgeEntanglers()
	if gates == nil {
		return nil, nil
	}
	t, _, err := TransferFor(e)
	if err != nil {
		return nil, err
	}
	et := &EdgeTransfers{Default: t, byEdge: make(map[[2]int]*Transfer, len(gates))}
	for k, g := range gates {
		tr := EntanglerTransfer(&g)
		et.byEdge[k] = &tr
	}
	return et, nil
}

// For returns the transfer of a gate on the coupler (a, b), in that
// orientation.
func (et *EdgeTransfers) For(a, b int) *Transfer {
	if t, ok := et.byEdge[[2]int{a, b}]; ok {
		return t
	}
	return &et.Default
}

// CollisionEdgeTransfers makes a CollisionCurve take the transfer of each
// gate from et (the t argument is then unused): the layered engine per gate,
// the random-edge average per edge of its mean Σ_e M_e/|E|, and the
// complete-graph reduction only when every coupler has the same symmetric
// transfer (otherwise the random-edge average, up to
// CollisionRandomEdgeMaxQubits qubits).
func CollisionEdgeTransfers(et *EdgeTransfers) CollisionOption {
	return func(c *collisionConfig) { c.edges = et }
}
