// Package optimizer plans the vertical profile of a flight along a fixed
// route: the initial cruise level, the step points and the Mach, so that
// fuel plus cost-index-weighted time is least while every leg keeps the
// buffet protection floor and stays under the thrust-limited and certified
// ceilings on levels the airspace allows.
//
// A Problem holds the route (segments from package route), the aircraft
// (package perf), the weather (package winds, or none for ISA and still
// air) and the policies. Solve searches a graph whose nodes are (segment
// boundary, flight level, mass bucket) states and whose edges are cruise,
// step, initial-climb and final-descent legs priced when they are reached;
// every edge whose buffet margin at its heaviest point falls below the
// floor, whose level lies above the thrust-limited or certified ceiling, or
// whose Mach band at the floor is empty is pruned. The chosen profile is then
// priced once more, exactly, by Assess, which is also how a proposed profile
// is checked.
//
// The method is label-setting dynamic programming over discretised mass in
// the spirit of Yuan and Taillard, "Dynamic Programming for Vertical Flight
// Planning" (IRIDIA TR/IRIDIA/2016-006), searched with A* (Hart, Nilsson
// and Raphael, IEEE Trans. SSC 4(2), 1968) under a consistent lower bound,
// which returns what Dijkstra's algorithm (E. W. Dijkstra, "A note on two
// problems in connexion with graphs", Numerische Mathematik 1, 1959)
// returns. See Solve for the deviations.
//
// SolveContext, AssessContext and AlternativesContext stop when their
// context is done and return a *CancelledError wrapping ctx.Err(); Solve,
// Assess and Alternatives are these with context.Background().
//
// Caution: this is a planning aid, not certified for operational use; the
// approved flight manual and operator data, the operator's procedures, ATC
// and the pilot-in-command govern.
package optimizer

// Caution is carried by every plan output.
const Caution = "Planning aid only, not certified for operational use. The approved flight manual and operator data, the operator's procedures, ATC and the pilot-in-command govern."
