// Package layout draws directed graphs in layers, the Sugiyama way, as the page needs for
// directly-follows graphs and Petri nets: Graphviz compiled to WebAssembly was measured far too
// slow in the browser (about 5 s for a 41-node graph, a stack overflow at 80 nodes).
//
// The steps follow Gansner, Koutsofios, North and Vo, "A technique for drawing directed graphs"
// (IEEE TSE 1993):
//
//  1. Cycles are broken by reversing the back edges of a depth-first search from the nodes in
//     input order, each node's edges in input order (section 2.1), so the flow from the first
//     node (the start of cases) is kept.
//  2. Ranks come from the network simplex method (section 2.3): a feasible tree of tight edges,
//     cut values, and exchanges of a negative-cut tree edge for the tightest non-tree edge across
//     the cut until no cut value is negative; cut values come from one postorder pass and tree
//     sides from postorder numbers (section 2.4). Ranks start at 0; a node whose edges in and out
//     weigh the same moves to the least crowded rank it may take. Edge weights make heavy edges
//     short.
//  3. Edges spanning several ranks get a chain of dummy nodes.
//  4. The order within ranks is improved by weighted-median sweeps with transposition of
//     neighbours (section 3) from two starts, then sifting (Matuszewski, Schönfeld and Molitor
//     1999), then an iterated local search: the best order, shaken in one place with a seeded
//     source, is polished again, and kept if it crosses less. Crossings are counted with the
//     accumulator tree of Barth, Jünger and Mutzel (2004). A previous layout's order (nodes and
//     bends) seeds the search instead, so a graph that changes a little keeps its places.
//  5. Coordinates within ranks: Brandes and Köpf, "Fast and simple horizontal coordinate
//     assignment" (Graph Drawing 2001), give a good feasible placement in linear time (four
//     vertical alignments, compaction, their balanced median; dummy chains kept straight); from
//     there network simplex on the auxiliary graph of section 4.2 minimises the weighted,
//     straightness-favouring total of horizontal edge lengths with the separations kept. Very
//     large graphs keep Brandes and Köpf's placement.
//  6. Edges are routed through their dummy nodes and smoothed into cubic Bézier curves.
//
// Layout is done top to bottom and turned for left to right. Cost: each network simplex exchange
// is O(V+E); ordering O(starts·sweeps·(V+E)·log V). BenchmarkAgainstDot compares the drawings
// with Graphviz dot's.
package layout
