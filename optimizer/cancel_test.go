package optimizer

import (
	"context"
	"errors"
	"reflect"
	"testing"
	"time"
)

// cancelProblem is the demo long-haul flight of the benchmarks (50 NM segments,
// FL290 to FL430 every 1,000 ft): a search of a few thousand nodes.
func cancelProblem(t testing.TB) *Problem {
	wx, ref := demoWeather(t)
	return &Problem{Track: track(t, longHaulRoute, "every-1000:290-430", 50), Aircraft: aircraft(t, "demo-widebody"),
		Weather: wx, Depart: ref.Add(2 * time.Hour), TakeoffMass: 245000, CI: 40}
}

// doneAfter is a context whose Err turns to context.Canceled after n
// calls: it cancels a computation at a known point, deterministically.
type doneAfter struct {
	context.Context
	n, calls int
}

func (c *doneAfter) Err() error {
	c.calls++
	if c.calls > c.n {
		return context.Canceled
	}
	return nil
}

func TestSolveContextCancelled(t *testing.T) {
	p := cancelProblem(t)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	plan, err := SolveContext(ctx, p)
	if !errors.Is(err, context.Canceled) || plan != nil {
		t.Fatalf("cancelled context: plan %v, err %v; want no plan and context.Canceled", plan != nil, err)
	}
	var ce *CancelledError
	if !errors.As(err, &ce) {
		t.Errorf("err %T, want a *CancelledError", err)
	}
	dctx, dcancel := context.WithDeadline(context.Background(), time.Now().Add(-time.Second))
	defer dcancel()
	if _, err := SolveContext(dctx, p); !errors.Is(err, context.DeadlineExceeded) {
		t.Fatalf("past deadline: err %v, want context.DeadlineExceeded", err)
	}
	if _, err := AssessContext(dctx, p, Profile{Initial: 350}); !errors.Is(err, context.DeadlineExceeded) {
		t.Fatalf("Assess past deadline: err %v, want context.DeadlineExceeded", err)
	}
}

// TestSolveContextStopsMidSearch cancels during the A* search and during
// the exact pricing, and checks the computation stops at its next look at
// the context instead of running on.
func TestSolveContextStopsMidSearch(t *testing.T) {
	p := cancelProblem(t)
	full := &doneAfter{Context: context.Background(), n: 1 << 30}
	plan, err := SolveContext(full, p)
	if err != nil {
		t.Fatal(err)
	}
	if plan.Nodes < 4*cancelEvery {
		t.Fatalf("the long-haul search settles %d nodes; the test needs several looks at the context", plan.Nodes)
	}
	// Done at the search's third look: SolveContext's own look, the
	// search's before its run, then one every cancelEvery settled nodes.
	mid := &doneAfter{Context: context.Background(), n: 3}
	if _, err := SolveContext(mid, p); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled mid-search: err %v, want context.Canceled", err)
	}
	if mid.calls != mid.n+1 {
		t.Errorf("the context was read %d times after it was done; want the search to stop at the first", mid.calls-mid.n)
	}
	if mid.calls >= full.calls {
		t.Errorf("cancelled run looked at the context %d times, the whole run %d", mid.calls, full.calls)
	}

	// Assess: done after its own look, inside the pricing loop.
	actx := &doneAfter{Context: context.Background(), n: 2}
	if _, err := AssessContext(actx, p, plan.Profile); !errors.Is(err, context.Canceled) || actx.calls != actx.n+1 {
		t.Fatalf("cancelled mid-pricing: err %v after %d looks, want context.Canceled at look %d", err, actx.calls, actx.n+1)
	}
}

// TestSolveContextSameResult checks that a context that is never done
// changes nothing: SolveContext and AssessContext equal Solve and Assess.
func TestSolveContextSameResult(t *testing.T) {
	p := cancelProblem(t)
	ctx, cancel := context.WithTimeout(context.Background(), time.Hour)
	defer cancel()
	want := solve(t, p)
	got, err := SolveContext(ctx, p)
	if err != nil {
		t.Fatal(err)
	}
	if !samePlan(got, want) {
		t.Errorf("SolveContext differs from Solve: cost %v vs %v, profile %s vs %s", got.Totals.Cost, want.Totals.Cost, got.Profile, want.Profile)
	}
	wa, err := Assess(p, want.Profile)
	if err != nil {
		t.Fatal(err)
	}
	ga, err := AssessContext(ctx, p, want.Profile)
	if err != nil {
		t.Fatal(err)
	}
	if !samePlan(ga, wa) {
		t.Errorf("AssessContext differs from Assess: cost %v vs %v", ga.Totals.Cost, wa.Totals.Cost)
	}
}

// samePlan compares the parts of two plans that a search or a pricing
// decides (fields that may hold NaN, such as a leg's margins, are left to
// the totals they sum into).
func samePlan(a, b *Plan) bool {
	return reflect.DeepEqual(a.Totals, b.Totals) && reflect.DeepEqual(a.Profile, b.Profile) &&
		a.SearchCost == b.SearchCost && a.Nodes == b.Nodes && a.Edges == b.Edges &&
		len(a.Legs) == len(b.Legs) && reflect.DeepEqual(a.Baseline, b.Baseline) &&
		reflect.DeepEqual(a.Warnings, b.Warnings) && reflect.DeepEqual(a.Violations, b.Violations)
}

func TestAlternativesContextCancelled(t *testing.T) {
	p := cancelProblem(t)
	plan := solve(t, p)
	// Done after Yen's search, at the first exact pricing.
	ctx := &doneAfter{Context: context.Background(), n: 1}
	alts, err := AlternativesContext(ctx, p, plan, 2)
	if !errors.Is(err, context.Canceled) || alts != nil {
		t.Fatalf("cancelled: %d alternatives, err %v; want none and context.Canceled", len(alts), err)
	}
}
