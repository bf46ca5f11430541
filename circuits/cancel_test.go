package circuits

import (
	"context"
	"errors"
	"reflect"
	"testing"
)

// TestColouringCancelled: the colouring of a large graph stops when its
// context is cancelled and returns ctx.Err() (complete:300, 44 850 couplers,
// takes seconds to colour; the context is cancelled from another goroutine
// as the colouring starts, or before). The balancing and the layered classes
// stop the same way on an already-cancelled context, and with a live context
// the Context variants give the classes of the plain functions.
func TestColouringCancelled(t *testing.T) {
	big, err := ParseGraph("complete:300")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	go cancel()
	if classes, err := EdgeColouringContext(ctx, big); !errors.Is(err, context.Canceled) || classes != nil {
		t.Fatalf("EdgeColouringContext after cancel: %d classes, error %v; want nil, context.Canceled", len(classes), err)
	}
	if _, err := LayeredClassesContext(ctx, big); !errors.Is(err, context.Canceled) {
		t.Errorf("LayeredClassesContext on a cancelled context: %v", err)
	}
	small, err := ParseGraph("star:9")
	if err != nil {
		t.Fatal(err)
	}
	// Classes of 2, 1 and 0 edges on a path: unbalanced, so the balancing
	// has work to do.
	path, err := NewGraph("path", 4, []Edge{{0, 1}, {1, 2}, {2, 3}})
	if err != nil {
		t.Fatal(err)
	}
	unbalanced := [][]Edge{{{0, 1}, {2, 3}}, {{1, 2}}, {}}
	if _, err := BalanceClassesContext(ctx, path, unbalanced); !errors.Is(err, context.Canceled) {
		t.Errorf("BalanceClassesContext on a cancelled context: %v", err)
	}
	live := context.Background()
	for _, g := range []*Graph{small, path} {
		got, err := LayeredClassesContext(live, g)
		if err != nil || !reflect.DeepEqual(got, LayeredClasses(g)) {
			t.Errorf("%s: LayeredClassesContext = %v, %v; LayeredClasses = %v", g.Name, got, err, LayeredClasses(g))
		}
	}
}
