package moments

import (
	"fmt"

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

// CollisionEdgeTransfers makes a layered CollisionCurve take the transfer of
// each gate from et (the t argument is then unused); a random-edge curve
// refuses it with an error wrapping ErrNoExactMoments, since its exact
// average over edges assumes one transfer for every coupler.
func CollisionEdgeTransfers(et *EdgeTransfers) CollisionOption {
	return func(c *collisionConfig) { c.edges = et }
}

// errRandomEdgeTransfers is the error of a random-edge curve with
// per-coupler transfers.
var errRandomEdgeTransfers = fmt.Errorf("moments: per-coupler gates under the random-edge schedule have %w here: the exact average over edges takes one transfer for every coupler; use the layered schedule", ErrNoExactMoments)
