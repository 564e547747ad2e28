// Package layout draws directed graphs in layers, the Sugiyama way, as the page needs for
// directly-follows graphs and Petri nets: Graphviz compiled to WebAssembly was measured far too
// slow in the browser (about 5 s for a 41-node graph, a stack overflow at 80 nodes).
//
// The steps follow Gansner, Koutsofios, North and Vo, "A technique for drawing directed graphs"
// (IEEE TSE 1993), except the third:
//
//  1. Cycles are broken by reversing the back edges of a depth-first search from the nodes in
//     input order (section 2.1), so the flow from the first node (the start of cases) is kept.
//  2. Ranks come from the network simplex method (Gansner et al. section 2.3): a feasible tree
//     of tight edges, cut values, and exchanges of a negative-cut tree edge for the tightest
//     non-tree edge across the cut until no cut value is negative; ranks are normalised to start
//     at 0. Edge weights make heavy edges short.
//  3. Edges spanning several ranks get a chain of dummy nodes.
//  4. The order within ranks is improved by weighted-median sweeps with transposition of
//     neighbours (section 3), keeping the best order seen. A previous layout's order seeds the
//     first sweep, so a graph that changes a little keeps the relative places of its nodes.
//  5. Coordinates within ranks come from Brandes and Köpf, "Fast and simple horizontal
//     coordinate assignment" (Graph Drawing 2001): four vertical alignments, horizontal
//     compaction, and their balanced median; dummy chains are kept straight (type 1 conflicts).
//  6. Edges are routed through their dummy nodes and smoothed into cubic Bézier curves.
//
// Layout is done top to bottom and turned for left to right. Cost: network simplex is
// polynomial in practice (O(V·E) per exchange here, fine for the few hundred nodes a picture
// holds); ordering O(sweeps·(V+E)·log V); coordinates O(V+E).
package layout
