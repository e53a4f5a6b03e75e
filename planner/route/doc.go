// Package route orders what an STM tip writes so that its idle travel
// between writes costs as little time as possible: points (dwell sites)
// and strokes that may be written in either direction (or one way), with
// an optional start, open or closed paths, contiguous groups and
// precedence between groups. It knows nothing of silicon: positions are
// plain numbers in the caller's unit (nm in dimerpath), speeds in that
// unit per second, times in seconds.
//
// Solve is the engine; Nearest is the nearest-neighbour baseline;
// Problem.Evaluate scores any ordering. ReadCSV reads the item files of
// "dimerpath order", and the tsplib subpackage reads TSPLIB instances.
//
// # Method
//
// Each point is a node; each stroke is two nodes, its ends, joined by a
// fixed edge that no move removes, so reversing a stretch of the tour
// writes the strokes in it the other way at no cost. An open path gets a
// dummy node at distance zero from all others (tied to the start, when
// there is one, by a fixed edge), and the tour through it is cut there.
// The cost of a move is distance/MoveSpeed + SettleS; every ordering of
// a problem makes the same number of moves, so minimising distance
// minimises time.
//
//   - Up to 10 items (per group) are ordered exactly by dynamic
//     programming over subsets (Held & Karp 1962).
//   - Neighbour lists: the 10 nearest nodes of each node (8 above 200,000
//     nodes), from a kd-tree (Bentley 1975); O(n log n). With strokes (up
//     to 200,000 nodes) also the nearest node of each quadrant that is
//     more than twice as far as the 10th nearest, which on clustered
//     layouts joins each cluster's edge to the next clusters.
//   - Construction: greedy edge matching (Bentley 1992), fixed edges first,
//     fragments joined by the same rule on their ends.
//   - Candidates for the Lin-Kernighan search (problems up to 15,000
//     nodes per second of budget, 30,000 at the default or when bounded
//     by kicks, and without two or more one-way strokes): the 7 α-nearest
//     of each node (Helsgaun 2000), in α order, among its 10 nearest and
//     2 nearest per quadrant and the greedy tour's edges; α from minimum
//     1-trees on that sparse graph, with node penalties from 25 steps of
//     subgradient optimisation (Held & Karp 1970; a lighter set-up, 8 + 1
//     per quadrant and 10 steps, above 4,000 nodes per second of budget).
//   - Local search from a queue of nodes (don't-look bits, Bentley 1992):
//     2-opt (Croes 1958), Or-opt moves of segments of up to three nodes
//     either way round (Or 1976) and sequential 3-opt moves, the depth-3
//     step of Lin & Kernighan 1973; all searched over the neighbour lists
//     with the gain criterion. The tour is an array with a position index;
//     a reversal turns the shorter side (where the Lin-Kernighan search
//     runs alone on 15,000 nodes or more, a two-level doubly-linked list
//     that keeps the same positions: Fredman, Johnson, McGeoch &
//     Ostheimer 1995). Above 1,000 nodes the nodes are
//     renumbered along a Hilbert curve (cache locality); above 100,000 a
//     reversal is capped at 50,000 positions. Where those find nothing,
//     the Lin-Kernighan search on the α candidates (Lin & Kernighan 1973;
//     the chaining of 5-opt basic moves as in Helsgaun 2000): the first
//     improving sequential move of up to five edges (breadth 5, 3, 2, 1
//     at levels 1-4; 5, 5, 2, 1 with strokes), else the valid
//     5-opt move of greatest partial gain, continued from its last node,
//     up to eight basic moves deep; a chain that never gains is undone.
//     Where stroke ends are at least half the nodes, the Lin-Kernighan
//     search runs alone, without the shallower moves first, and where it
//     finds nothing, double bridges are searched for: a 2-exchange that
//     splits the tour and gains, joined again by a second one across its
//     two cycles (the non-sequential moves of Helsgaun 2009, "General
//     k-opt submoves for the Lin-Kernighan TSP heuristic").
//   - Improvement until the budget is spent: segment-local double-bridge
//     kicks (Martin, Otto & Felten 1991): four edges cut close together,
//     X B C D reconnected as X D C B (or, for half the kicks, X C B D)
//     with B, C, D of up to 300 nodes, re-optimised from the touched
//     nodes only and kept when the
//     tour is no longer, else undone from a journal of reversals: iterated
//     local search (Johnson & McGeoch 1997, "The traveling salesman
//     problem: a case study in local optimization").
//   - Strokes: after the construction, the directions of all strokes are
//     chosen at once by dynamic programming along the tour. Where the
//     Lin-Kernighan search is not set up (larger problems, one-way
//     strokes), a problem with strokes gets single sequential 4- and
//     5-opt moves on the neighbour lists instead (breadth 5, 3, 2, 1 at
//     the first levels) where the shallower moves find nothing.
//   - Groups are ordered greedily: of the groups whose predecessors are all
//     written, the one with an item nearest the tip goes next, solved as an
//     open path from where the last one ended (the last group of a closed
//     problem as a path back to the start).
//   - One-way strokes: a reversal is allowed only if it leaves every
//     one-way stroke the same way round; the tour starts from the shorter
//     of the greedy tour (with backward one-way strokes turned) and the
//     nearest-neighbour order.
//
// Options.Budget bounds the wall-clock time of a Solve call (default 2 s);
// the construction and the first local optimum always complete. With
// Options.MaxKicks instead the result depends only on the problem and the
// seed. Solve polls its context and reports progress through
// Options.Progress.
package route
