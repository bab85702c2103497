/**
 * Maximum-weight matching in a general graph: Edmonds' blossom method with primal-dual
 * weights, O(n³).
 *
 * This is a line-by-line port of Joris van Rantwijk's mwmatching.py (public domain, first
 * release 2008-06-08, revised 2013-04-07), itself after Z. Galil, "Efficient Algorithms for
 * Finding Maximum Matching in Graphs", ACM Computing Surveys, 1986, with ideas from H.J. Gabow's
 * 1973 thesis. Names, the order of every loop and the comments follow the original so that the
 * two can be read side by side; read Galil's paper first for the vocabulary (S- and T-blossoms,
 * sub-blossoms, base vertex, delta1–delta4).
 *
 * Departures from the Python, none of which changes what is computed:
 * - Arrays are typed arrays and the adjacency lists are one flat list (CSR), filled in edge order
 *   exactly like `neighbend[i].append(…)`. Beside each entry sit the remote vertex and twice the
 *   weight, and beside bestedge[b] the vertices and weight of that edge, so the hot loops read
 *   small or sequential memory (about 4× faster on a dense 1,000-vertex graph). The scan of one
 *   vertex's neighbours is its own function (`scanNeighbours`) so the engine optimises it alone.
 * - `blossomLeaves` (a recursive generator) collects the leaves into an array first; the callers
 *   only ever read `blossomchilds` while iterating, so the result is the same.
 * - `addBlossom` keeps one scratch array for `bestedgeto` instead of allocating 2n entries per new
 *   blossom; it records which entries it touched and lists them in ascending blossom order, which
 *   is the order the original's full scan produces.
 * - Python's negative list indices (`blossomchilds[b][j]` with j < 0) are wrapped explicitly.
 * - The input is checked (integer vertex ids ≥ 0, no self-loop, finite weights) and, with
 *   `verify: true`, the dual certificate is checked at the end like the original's
 *   `verifyOptimum()` (CHECK_OPTIMUM). Both checks throw an Error. The original's other internal
 *   asserts are kept where they cost nothing.
 * - Added: `alsoCheck`, the slack of further edges against the final duals (see solveMatching),
 *   on which lib/matching builds its proof that a plan found on part of the graph is optimal.
 *
 * Weights should be integers (exactly representable doubles below 2^50 or so): then every dual
 * variable, slack and delta stays an integer and all comparisons are exact, as the original notes.
 * Floating-point weights work but may be off by rounding; `lib/matching` scales its costs to
 * integers before calling this.
 */

/** An undirected edge `[i, j, weight]` between vertices i ≠ j (consecutive integers from 0). */
export type WeightedEdge = readonly [number, number, number];

export interface MatchingRunOptions {
  /** Check the optimality certificate (the dual variables) before returning; throws if it fails. Costs O(m·depth). */
  verify?: boolean;
  /**
   * Edges of a larger graph that were left out of this one (same vertices). After the run, the
   * certificate is checked (as with `verify`) and each of these edges is tested against the final
   * dual solution: `violated` lists those with negative slack. If there are none, the dual solution
   * is feasible for the larger graph too, so the matching is also optimal there (see solveMatching).
   */
  alsoCheck?: { eu: Int32Array; ev: Int32Array; ew: Float64Array };
}

export interface MatchingResult {
  /** mate[v] is the vertex matched to v, or -1. */
  mate: number[];
  /** Indices into `alsoCheck` of the edges whose slack is negative (empty without alsoCheck). */
  violated: number[];
  /** Twice the slack of each `alsoCheck` edge against the final duals (empty without alsoCheck). */
  slacks: Float64Array;
}

/**
 * Compute a maximum-weighted matching in the general undirected weighted graph given by `edges`.
 * If `maxCardinality` is true, only maximum-cardinality matchings are considered as solutions
 * (and the heaviest of those is returned). There must be at most one edge between two vertices.
 *
 * Returns `mate`, such that `mate[i] === j` if vertex i is matched to vertex j and `mate[i] === -1`
 * if i is single; its length is 1 + the largest vertex id.
 */
export function maxWeightMatching(edges: readonly WeightedEdge[], maxCardinality = false, options: MatchingRunOptions = {}): number[] {
  const m = edges.length;
  const eu = new Int32Array(m);
  const ev = new Int32Array(m);
  const ew = new Float64Array(m);
  let nvertex = 0;
  for (let k = 0; k < m; k++) {
    const [i, j, w] = edges[k]!;
    if (!Number.isInteger(i) || !Number.isInteger(j) || i < 0 || j < 0 || i > 0x3fffffff || j > 0x3fffffff) {
      throw new Error(`edge ${k}: vertices must be non-negative integers (got ${i}, ${j})`);
    }
    if (i === j) throw new Error(`edge ${k}: a vertex cannot be matched to itself (${i})`);
    if (!Number.isFinite(w)) throw new Error(`edge ${k}: the weight must be a finite number (got ${w})`);
    eu[k] = i;
    ev[k] = j;
    ew[k] = w;
    if (i >= nvertex) nvertex = i + 1;
    if (j >= nvertex) nvertex = j + 1;
  }
  return solveMatching(nvertex, eu, ev, ew, maxCardinality, options).mate;
}

/**
 * The same on edges already laid out as arrays: edge k joins `eu[k]` and `ev[k]` with weight `ew[k]`;
 * vertices are 0 … nvertex−1 (vertices without edges are allowed and stay single). The arrays are
 * only read.
 *
 * With `alsoCheck`, this is the certificate for a subgraph. The run ends with dual variables u
 * (vertices) and z (blossoms, odd vertex sets) such that, in the original's verifyOptimum terms,
 * u + offset ≥ 0, z ≥ 0, every edge has slack u_i + u_j − w + Σ_{B ∋ i,j} z_B ≥ 0, matched edges have
 * slack 0, single vertices have u + offset = 0 and blossoms with z > 0 are full (offset = 0 without
 * maxCardinality; with it, the constant that makes the smallest vertex dual 0, which amounts to adding
 * the same constant to every weight). These are the complementary-slackness conditions of Edmonds'
 * matching LP. Only the slack condition involves the other edges: if every edge of `alsoCheck` has
 * slack ≥ 0 as well, the same duals certify that the matching is of maximum weight (weights + offset)
 * among all matchings of the larger graph, hence of maximum weight among its matchings of the same
 * size. Whether that size is the larger graph's maximum cardinality is for the caller to establish.
 */
export function solveMatching(
  nvertex: number,
  eu: Int32Array,
  ev: Int32Array,
  ew: Float64Array,
  maxcardinality = false,
  options: MatchingRunOptions = {},
): MatchingResult {
  //
  // Vertices are numbered 0 .. (nvertex-1).
  // Non-trivial blossoms are numbered nvertex .. (2*nvertex-1)
  //
  // Edges are numbered 0 .. (nedge-1).
  // Edge endpoints are numbered 0 .. (2*nedge-1), such that endpoints
  // (2*k) and (2*k+1) both belong to edge k.
  //
  const nedge = eu.length;

  // Deal swiftly with empty graphs.
  if (nedge === 0) {
    // Every other edge has slack ≥ 0 against the all-zero dual solution of an empty matching.
    const violated: number[] = [];
    const slacks = new Float64Array(options.alsoCheck?.ew.length ?? 0);
    options.alsoCheck?.ew.forEach((w, k) => {
      slacks[k] = -2 * w;
      if (w > 0) violated.push(k);
    });
    return { mate: new Array<number>(nvertex).fill(-1), violated, slacks };
  }

  // Find the maximum edge weight.
  let maxweight = 0;
  for (let k = 0; k < nedge; k++) if (ew[k]! > maxweight) maxweight = ew[k]!;

  // If p is an edge endpoint,
  // endpoint[p] is the vertex to which endpoint p is attached.
  // Not modified by the algorithm.
  const endpoint = new Int32Array(2 * nedge);
  for (let k = 0; k < nedge; k++) {
    endpoint[2 * k] = eu[k]!;
    endpoint[2 * k + 1] = ev[k]!;
  }

  // If v is a vertex,
  // neighbend[v] is the list of remote endpoints of the edges attached to v:
  // here the slice nbList[nbStart[v] .. nbStart[v+1]).
  // Not modified by the algorithm.
  const nbStart = new Int32Array(nvertex + 1);
  for (let k = 0; k < nedge; k++) {
    nbStart[eu[k]! + 1]!++;
    nbStart[ev[k]! + 1]!++;
  }
  for (let v = 0; v < nvertex; v++) nbStart[v + 1]! += nbStart[v]!;
  // Beside each entry, the remote vertex and twice the edge's weight, so that scanning a vertex's
  // neighbours reads memory in order (for speed only: nbVertex[q] = endpoint[nbList[q]] and
  // nbWeight2[q] = 2 * weight of edge nbList[q] >> 1).
  const nbList = new Int32Array(2 * nedge);
  const nbVertex = new Int32Array(2 * nedge);
  const nbWeight2 = new Float64Array(2 * nedge);
  {
    const fill = nbStart.slice(0, nvertex);
    for (let k = 0; k < nedge; k++) {
      let q = fill[eu[k]!]!++;
      nbList[q] = 2 * k + 1;
      nbVertex[q] = ev[k]!;
      nbWeight2[q] = 2 * ew[k]!;
      q = fill[ev[k]!]!++;
      nbList[q] = 2 * k;
      nbVertex[q] = eu[k]!;
      nbWeight2[q] = 2 * ew[k]!;
    }
  }

  // If v is a vertex,
  // mate[v] is the remote endpoint of its matched edge, or -1 if it is single
  // (i.e. endpoint[mate[v]] is v's partner vertex).
  // Initially all vertices are single; updated during augmentation.
  const mate = new Int32Array(nvertex).fill(-1);

  // If b is a top-level blossom,
  // label[b] is 0 if b is unlabeled (free);
  //             1 if b is an S-vertex/blossom;
  //             2 if b is a T-vertex/blossom.
  // The label of a vertex is found by looking at the label of its
  // top-level containing blossom.
  // If v is a vertex inside a T-blossom,
  // label[v] is 2 iff v is reachable from an S-vertex outside the blossom.
  // Labels are assigned during a stage and reset after each augmentation.
  const label = new Int32Array(2 * nvertex);

  // If b is a labeled top-level blossom,
  // labelend[b] is the remote endpoint of the edge through which b obtained
  // its label, or -1 if b's base vertex is single.
  // If v is a vertex inside a T-blossom and label[v] == 2,
  // labelend[v] is the remote endpoint of the edge through which v is
  // reachable from outside the blossom.
  const labelend = new Int32Array(2 * nvertex).fill(-1);

  // If v is a vertex,
  // inblossom[v] is the top-level blossom to which v belongs.
  // If v is a top-level vertex, v is itself a blossom (a trivial blossom)
  // and inblossom[v] == v.
  // Initially all vertices are top-level trivial blossoms.
  const inblossom = new Int32Array(nvertex);
  for (let v = 0; v < nvertex; v++) inblossom[v] = v;

  // If b is a sub-blossom,
  // blossomparent[b] is its immediate parent (sub-)blossom.
  // If b is a top-level blossom, blossomparent[b] is -1.
  const blossomparent = new Int32Array(2 * nvertex).fill(-1);

  // If b is a non-trivial (sub-)blossom,
  // blossomchilds[b] is an ordered list of its sub-blossoms, starting with
  // the base and going round the blossom.
  const blossomchilds: (number[] | null)[] = new Array<number[] | null>(2 * nvertex).fill(null);

  // If b is a (sub-)blossom,
  // blossombase[b] is its base VERTEX (i.e. recursive sub-blossom).
  const blossombase = new Int32Array(2 * nvertex).fill(-1);
  for (let v = 0; v < nvertex; v++) blossombase[v] = v;

  // If b is a non-trivial (sub-)blossom,
  // blossomendps[b] is a list of endpoints on its connecting edges,
  // such that blossomendps[b][i] is the local endpoint of blossomchilds[b][i]
  // on the edge that connects it to blossomchilds[b][wrap(i+1)].
  const blossomendps: (number[] | null)[] = new Array<number[] | null>(2 * nvertex).fill(null);

  // If v is a free vertex (or an unreached vertex inside a T-blossom),
  // bestedge[v] is the edge to an S-vertex with least slack,
  // or -1 if there is no such edge.
  // If b is a (possibly trivial) top-level S-blossom,
  // bestedge[b] is the least-slack edge to a different S-blossom,
  // or -1 if there is no such edge.
  // This is used for efficient computation of delta2 and delta3.
  const bestedge = new Int32Array(2 * nvertex).fill(-1);
  // Beside it, the vertices and twice the weight of edge bestedge[b], so that its slack is computed
  // from small arrays (for speed only: bestSlack(b) === slack(bestedge[b]) whenever bestedge[b] != -1).
  const bestU = new Int32Array(2 * nvertex);
  const bestV = new Int32Array(2 * nvertex);
  const bestW2 = new Float64Array(2 * nvertex);

  // If b is a non-trivial top-level S-blossom,
  // blossombestedges[b] is a list of least-slack edges to neighbouring
  // S-blossoms, or None if no such list has been computed yet.
  // This is used for efficient computation of delta3.
  const blossombestedges: (number[] | null)[] = new Array<number[] | null>(2 * nvertex).fill(null);

  // List of currently unused blossom numbers.
  const unusedblossoms: number[] = [];
  for (let b = nvertex; b < 2 * nvertex; b++) unusedblossoms.push(b);

  // If v is a vertex,
  // dualvar[v] = 2 * u(v) where u(v) is the v's variable in the dual
  // optimization problem (multiplication by two ensures integer values
  // throughout the algorithm if all edge weights are integers).
  // If b is a non-trivial blossom,
  // dualvar[b] = z(b) where z(b) is b's variable in the dual optimization
  // problem.
  const dualvar = new Float64Array(2 * nvertex);
  for (let v = 0; v < nvertex; v++) dualvar[v] = maxweight;

  // If allowedge[k] is true, edge k has zero slack in the optimization
  // problem; if allowedge[k] is false, the edge's slack may or may not
  // be zero.
  const allowedge = new Uint8Array(nedge);

  // Queue of newly discovered S-vertices (used as a stack, like the original list).
  const queue: number[] = [];

  // Scratch for addBlossom: bestedgeto[] and the entries it touched.
  const bestedgeto = new Int32Array(2 * nvertex).fill(-1);
  const touched: number[] = [];

  const fail = (what: string): never => {
    throw new Error(`maxWeightMatching: internal check failed (${what})`);
  };

  // Return 2 * slack of edge k (does not work inside blossoms).
  const slack = (k: number): number => dualvar[endpoint[2 * k]!]! + dualvar[endpoint[2 * k + 1]!]! - 2 * ew[k]!;
  const bestSlack = (b: number): number => dualvar[bestU[b]!]! + dualvar[bestV[b]!]! - bestW2[b]!;
  const setBest = (b: number, k: number, i: number, j: number, w2: number): void => {
    bestedge[b] = k;
    bestU[b] = i;
    bestV[b] = j;
    bestW2[b] = w2;
  };

  // Generate the leaf vertices of a blossom.
  const pushLeaves = (b: number, out: number[]): void => {
    if (b < nvertex) {
      out.push(b);
      return;
    }
    for (const t of blossomchilds[b]!) {
      if (t < nvertex) out.push(t);
      else pushLeaves(t, out);
    }
  };
  const blossomLeaves = (b: number): number[] => {
    const out: number[] = [];
    pushLeaves(b, out);
    return out;
  };

  // Assign label t to the top-level blossom containing vertex w
  // and record the fact that w was reached through the edge with
  // remote endpoint p.
  const assignLabel = (w: number, t: number, p: number): void => {
    const b = inblossom[w]!;
    if (label[w] !== 0 || label[b] !== 0) fail("assignLabel on a labelled vertex");
    label[w] = label[b] = t;
    labelend[w] = labelend[b] = p;
    bestedge[w] = bestedge[b] = -1;
    if (t === 1) {
      // b became an S-vertex/blossom; add it(s vertices) to the queue.
      pushLeaves(b, queue);
    } else if (t === 2) {
      // b became a T-vertex/blossom; assign label S to its mate.
      // (If b is a non-trivial blossom, its base is the only vertex
      // with an external mate.)
      const base = blossombase[b]!;
      const mb = mate[base]!;
      if (mb < 0) fail("T-blossom base is single");
      assignLabel(endpoint[mb]!, 1, mb ^ 1);
    }
  };

  // Trace back from vertices v and w to discover either a new blossom
  // or an augmenting path. Return the base vertex of the new blossom or -1.
  const scanBlossom = (v: number, w: number): number => {
    // Trace back from v and w, placing breadcrumbs as we go.
    const path: number[] = [];
    let base = -1;
    while (v !== -1 || w !== -1) {
      // Look for a breadcrumb in v's blossom or put a new breadcrumb.
      let b = inblossom[v]!;
      if (label[b]! & 4) {
        base = blossombase[b]!;
        break;
      }
      path.push(b);
      label[b] = 5;
      // Trace one step back.
      if (labelend[b] === -1) {
        // The base of blossom b is single; stop tracing this path.
        v = -1;
      } else {
        v = endpoint[labelend[b]!]!;
        b = inblossom[v]!;
        // b is a T-blossom; trace one more step back.
        v = endpoint[labelend[b]!]!;
      }
      // Swap v and w so that we alternate between both paths.
      if (w !== -1) {
        const t = v;
        v = w;
        w = t;
      }
    }
    // Remove breadcrumbs.
    for (const b of path) label[b] = 1;
    // Return base vertex, if we found one.
    return base;
  };

  // Construct a new blossom with given base, containing edge k which
  // connects a pair of S vertices. Label the new blossom as S; set its dual
  // variable to zero; relabel its T-vertices to S and add them to the queue.
  const addBlossom = (base: number, k: number): void => {
    let v = eu[k]!;
    let w = ev[k]!;
    const bb = inblossom[base]!;
    let bv = inblossom[v]!;
    let bw = inblossom[w]!;
    // Create blossom.
    const b = unusedblossoms.pop() ?? fail("no unused blossom number");
    blossombase[b] = base;
    blossomparent[b] = -1;
    blossomparent[bb] = b;
    // Make list of sub-blossoms and their interconnecting edge endpoints.
    const path: number[] = [];
    const endps: number[] = [];
    blossomchilds[b] = path;
    blossomendps[b] = endps;
    // Trace back from v to base.
    while (bv !== bb) {
      // Add bv to the new blossom.
      blossomparent[bv] = b;
      path.push(bv);
      endps.push(labelend[bv]!);
      // Trace one step back.
      if (labelend[bv]! < 0) fail("addBlossom: broken v path");
      v = endpoint[labelend[bv]!]!;
      bv = inblossom[v]!;
    }
    // Reverse lists, add endpoint that connects the pair of S vertices.
    path.push(bb);
    path.reverse();
    endps.reverse();
    endps.push(2 * k);
    // Trace back from w to base.
    while (bw !== bb) {
      // Add bw to the new blossom.
      blossomparent[bw] = b;
      path.push(bw);
      endps.push(labelend[bw]! ^ 1);
      // Trace one step back.
      if (labelend[bw]! < 0) fail("addBlossom: broken w path");
      w = endpoint[labelend[bw]!]!;
      bw = inblossom[w]!;
    }
    // Set label to S.
    if (label[bb] !== 1) fail("addBlossom: base blossom is not S");
    label[b] = 1;
    labelend[b] = labelend[bb]!;
    // Set dual variable to zero.
    dualvar[b] = 0;
    // Relabel vertices.
    for (const x of blossomLeaves(b)) {
      if (label[inblossom[x]!] === 2) {
        // This T-vertex now turns into an S-vertex because it becomes
        // part of an S-blossom; add it to the queue.
        queue.push(x);
      }
      inblossom[x] = b;
    }
    // Compute blossombestedges[b].
    const consider = (kk: number): void => {
      let j = ev[kk]!;
      if (inblossom[j] === b) j = eu[kk]!;
      const bj = inblossom[j]!;
      if (bj !== b && label[bj] === 1 && (bestedgeto[bj] === -1 || slack(kk) < slack(bestedgeto[bj]!))) {
        if (bestedgeto[bj] === -1) touched.push(bj);
        bestedgeto[bj] = kk;
      }
    };
    for (const sub of path) {
      const list = blossombestedges[sub];
      if (list === null || list === undefined) {
        // This subblossom does not have a list of least-slack edges;
        // get the information from the vertices.
        for (const x of blossomLeaves(sub)) {
          for (let q = nbStart[x]!, end = nbStart[x + 1]!; q < end; q++) consider(nbList[q]! >> 1);
        }
      } else {
        // Walk this subblossom's least-slack edges.
        for (const kk of list) consider(kk);
      }
      // Forget about least-slack edges of the subblossom.
      blossombestedges[sub] = null;
      bestedge[sub] = -1;
    }
    touched.sort((x, y) => x - y);
    const best: number[] = [];
    for (const bj of touched) {
      best.push(bestedgeto[bj]!);
      bestedgeto[bj] = -1;
    }
    touched.length = 0;
    blossombestedges[b] = best;
    // Select bestedge[b].
    bestedge[b] = -1;
    for (const kk of best) {
      if (bestedge[b] === -1 || slack(kk) < bestSlack(b)) setBest(b, kk, eu[kk]!, ev[kk]!, 2 * ew[kk]!);
    }
  };

  // Expand the given top-level blossom.
  const expandBlossom = (b: number, endstage: boolean): void => {
    const childs = blossomchilds[b]!;
    const endps = blossomendps[b]!;
    const len = childs.length;
    const at = (arr: number[], i: number): number => arr[i < 0 ? i + len : i]!;
    // Convert sub-blossoms into top-level blossoms.
    for (const s of childs) {
      blossomparent[s] = -1;
      if (s < nvertex) {
        inblossom[s] = s;
      } else if (endstage && dualvar[s] === 0) {
        // Recursively expand this sub-blossom.
        expandBlossom(s, endstage);
      } else {
        for (const x of blossomLeaves(s)) inblossom[x] = s;
      }
    }
    // If we expand a T-blossom during a stage, its sub-blossoms must be
    // relabeled.
    if (!endstage && label[b] === 2) {
      // Start at the sub-blossom through which the expanding
      // blossom obtained its label, and relabel sub-blossoms until
      // we reach the base.
      // Figure out through which sub-blossom the expanding blossom
      // obtained its label initially.
      if (labelend[b]! < 0) fail("expandBlossom: T-blossom without label edge");
      const entrychild = inblossom[endpoint[labelend[b]! ^ 1]!]!;
      // Decide in which direction we will go round the blossom.
      let j = childs.indexOf(entrychild);
      let jstep: number;
      let endptrick: number;
      if (j & 1) {
        // Start index is odd; go forward and wrap.
        j -= len;
        jstep = 1;
        endptrick = 0;
      } else {
        // Start index is even; go backward.
        jstep = -1;
        endptrick = 1;
      }
      // Move along the blossom until we get to the base.
      let p = labelend[b]!;
      while (j !== 0) {
        // Relabel the T-sub-blossom.
        label[endpoint[p ^ 1]!] = 0;
        label[endpoint[at(endps, j - endptrick) ^ endptrick ^ 1]!] = 0;
        assignLabel(endpoint[p ^ 1]!, 2, p);
        // Step to the next S-sub-blossom and note its forward endpoint.
        allowedge[at(endps, j - endptrick) >> 1] = 1;
        j += jstep;
        p = at(endps, j - endptrick) ^ endptrick;
        // Step to the next T-sub-blossom.
        allowedge[p >> 1] = 1;
        j += jstep;
      }
      // Relabel the base T-sub-blossom WITHOUT stepping through to
      // its mate (so don't call assignLabel).
      let bv = at(childs, j);
      label[endpoint[p ^ 1]!] = label[bv] = 2;
      labelend[endpoint[p ^ 1]!] = labelend[bv] = p;
      bestedge[bv] = -1;
      // Continue along the blossom until we get back to entrychild.
      j += jstep;
      while (at(childs, j) !== entrychild) {
        // Examine the vertices of the sub-blossom to see whether
        // it is reachable from a neighbouring S-vertex outside the
        // expanding blossom.
        bv = at(childs, j);
        if (label[bv] === 1) {
          // This sub-blossom just got label S through one of its
          // neighbours; leave it.
          j += jstep;
          continue;
        }
        let reached = -1;
        for (const x of blossomLeaves(bv)) {
          if (label[x] !== 0) {
            reached = x;
            break;
          }
        }
        // If the sub-blossom contains a reachable vertex, assign
        // label T to the sub-blossom.
        if (reached !== -1) {
          if (label[reached] !== 2 || inblossom[reached] !== bv) fail("expandBlossom: bad reachable vertex");
          label[reached] = 0;
          label[endpoint[mate[blossombase[bv]!]!]!] = 0;
          assignLabel(reached, 2, labelend[reached]!);
        }
        j += jstep;
      }
    }
    // Recycle the blossom number.
    label[b] = labelend[b] = -1;
    blossomchilds[b] = blossomendps[b] = null;
    blossombase[b] = -1;
    blossombestedges[b] = null;
    bestedge[b] = -1;
    unusedblossoms.push(b);
  };

  // Swap matched/unmatched edges over an alternating path through blossom b
  // between vertex v and the base vertex. Keep blossom bookkeeping consistent.
  const augmentBlossom = (b: number, v: number): void => {
    // Bubble up through the blossom tree from vertex v to an immediate
    // sub-blossom of b.
    let t = v;
    while (blossomparent[t] !== b) t = blossomparent[t]!;
    // Recursively deal with the first sub-blossom.
    if (t >= nvertex) augmentBlossom(t, v);
    // Decide in which direction we will go round the blossom.
    const childs = blossomchilds[b]!;
    const endps = blossomendps[b]!;
    const len = childs.length;
    const at = (arr: number[], i: number): number => arr[i < 0 ? i + len : i]!;
    const i = childs.indexOf(t);
    let j = i;
    let jstep: number;
    let endptrick: number;
    if (i & 1) {
      // Start index is odd; go forward and wrap.
      j -= len;
      jstep = 1;
      endptrick = 0;
    } else {
      // Start index is even; go backward.
      jstep = -1;
      endptrick = 1;
    }
    // Move along the blossom until we get to the base.
    while (j !== 0) {
      // Step to the next sub-blossom and augment it recursively.
      j += jstep;
      t = at(childs, j);
      const p = at(endps, j - endptrick) ^ endptrick;
      if (t >= nvertex) augmentBlossom(t, endpoint[p]!);
      // Step to the next sub-blossom and augment it recursively.
      j += jstep;
      t = at(childs, j);
      if (t >= nvertex) augmentBlossom(t, endpoint[p ^ 1]!);
      // Match the edge connecting those sub-blossoms.
      mate[endpoint[p]!] = p ^ 1;
      mate[endpoint[p ^ 1]!] = p;
    }
    // Rotate the list of sub-blossoms to put the new base at the front.
    blossomchilds[b] = childs.slice(i).concat(childs.slice(0, i));
    blossomendps[b] = endps.slice(i).concat(endps.slice(0, i));
    blossombase[b] = blossombase[blossomchilds[b]![0]!]!;
    if (blossombase[b] !== v) fail("augmentBlossom: wrong new base");
  };

  // Swap matched/unmatched edges over an alternating path between two
  // single vertices. The augmenting path runs through edge k, which
  // connects a pair of S vertices.
  const augmentMatching = (k: number): void => {
    const starts: [number, number][] = [
      [eu[k]!, 2 * k + 1],
      [ev[k]!, 2 * k],
    ];
    for (let [s, p] of starts) {
      // Match vertex s to remote endpoint p. Then trace back from s
      // until we find a single vertex, swapping matched and unmatched
      // edges as we go.
      for (;;) {
        const bs = inblossom[s]!;
        if (label[bs] !== 1) fail("augmentMatching: path through a non-S blossom");
        // Augment through the S-blossom from s to base.
        if (bs >= nvertex) augmentBlossom(bs, s);
        // Update mate[s]
        mate[s] = p;
        // Trace one step back.
        if (labelend[bs] === -1) {
          // Reached single vertex; stop.
          break;
        }
        const t = endpoint[labelend[bs]!]!;
        const bt = inblossom[t]!;
        if (label[bt] !== 2) fail("augmentMatching: expected a T-blossom");
        // Trace one step back.
        s = endpoint[labelend[bt]!]!;
        const j = endpoint[labelend[bt]! ^ 1]!;
        // Augment through the T-blossom from j to base.
        if (bt >= nvertex) augmentBlossom(bt, j);
        // Update mate[j]
        mate[j] = labelend[bt]!;
        // Keep the opposite endpoint;
        // it will be assigned to mate[s] in the next step.
        p = labelend[bt]! ^ 1;
      }
    }
  };

  // Scan the neighbours of S-vertex v (the body of the original's `for p in neighbend[v]`);
  // true when an augmenting path was found and the matching augmented.
  const scanNeighbours = (v: number): boolean => {
    // Scan its neighbours:
    for (let q = nbStart[v]!, end = nbStart[v + 1]!; q < end; q++) {
      const p = nbList[q]!;
      const k = p >> 1;
      const w = nbVertex[q]!; // = endpoint[p]
      // w is a neighbour to v
      if (inblossom[v] === inblossom[w]) {
        // this edge is internal to a blossom; ignore it
        continue;
      }
      let kslack = 0;
      if (!allowedge[k]) {
        kslack = dualvar[v]! + dualvar[w]! - nbWeight2[q]!; // = slack(k)
        if (kslack <= 0) {
          // edge k has zero slack => it is allowable
          allowedge[k] = 1;
        }
      }
      if (allowedge[k]) {
        const lw = label[inblossom[w]!];
        if (lw === 0) {
          // (C1) w is a free vertex;
          // label w with T and label its mate with S (R12).
          assignLabel(w, 2, p ^ 1);
        } else if (lw === 1) {
          // (C2) w is an S-vertex (not in the same blossom);
          // follow back-links to discover either an
          // augmenting path or a new blossom.
          const base = scanBlossom(v, w);
          if (base >= 0) {
            // Found a new blossom; add it to the blossom
            // bookkeeping and turn it into an S-blossom.
            addBlossom(base, k);
          } else {
            // Found an augmenting path; augment the
            // matching and end this stage.
            augmentMatching(k);
            return true;
          }
        } else if (label[w] === 0) {
          // w is inside a T-blossom, but w itself has not
          // yet been reached from outside the blossom;
          // mark it as reached (we need this to relabel
          // during T-blossom expansion).
          label[w] = 2;
          labelend[w] = p ^ 1;
        }
      } else if (label[inblossom[w]!] === 1) {
        // keep track of the least-slack non-allowable edge to
        // a different S-blossom.
        const b = inblossom[v]!;
        if (bestedge[b] === -1 || kslack < bestSlack(b)) setBest(b, k, v, w, nbWeight2[q]!);
      } else if (label[w] === 0) {
        // w is a free vertex (or an unreached vertex inside
        // a T-blossom) but we can not reach it yet;
        // keep track of the least-slack edge that reaches w.
        if (bestedge[w] === -1 || kslack < bestSlack(w)) setBest(w, k, v, w, nbWeight2[q]!);
      }
    }
    return false;
  };

  // Verify that the optimum solution has been reached (the original's verifyOptimum()).
  const verifyOptimum = (): void => {
    let minVertexDual = Infinity;
    for (let v = 0; v < nvertex; v++) minVertexDual = Math.min(minVertexDual, dualvar[v]!);
    // Vertices may have negative dual under maxcardinality;
    // find a constant non-negative number to add to all vertex duals.
    const vdualoffset = maxcardinality ? Math.max(0, -minVertexDual) : 0;
    // 0. all dual variables are non-negative
    if (minVertexDual + vdualoffset < 0) fail("verify: negative vertex dual");
    for (let b = nvertex; b < 2 * nvertex; b++) if (dualvar[b]! < 0) fail("verify: negative blossom dual");
    // 0. all edges have non-negative slack and
    // 1. all matched edges have zero slack;
    for (let k = 0; k < nedge; k++) {
      const i = eu[k]!;
      const j = ev[k]!;
      let s = dualvar[i]! + dualvar[j]! - 2 * ew[k]!;
      const iblossoms = [i];
      const jblossoms = [j];
      while (blossomparent[iblossoms[iblossoms.length - 1]!] !== -1) iblossoms.push(blossomparent[iblossoms[iblossoms.length - 1]!]!);
      while (blossomparent[jblossoms[jblossoms.length - 1]!] !== -1) jblossoms.push(blossomparent[jblossoms[jblossoms.length - 1]!]!);
      iblossoms.reverse();
      jblossoms.reverse();
      for (let q = 0; q < Math.min(iblossoms.length, jblossoms.length); q++) {
        if (iblossoms[q] !== jblossoms[q]) break;
        s += 2 * dualvar[iblossoms[q]!]!;
      }
      if (s < 0) fail(`verify: edge ${k} has negative slack`);
      if (mate[i]! >> 1 === k || mate[j]! >> 1 === k) {
        if (mate[i]! >> 1 !== k || mate[j]! >> 1 !== k) fail(`verify: edge ${k} matched at one end only`);
        if (s !== 0) fail(`verify: matched edge ${k} has slack`);
      }
    }
    // 2. all single vertices have zero dual value;
    for (let v = 0; v < nvertex; v++) {
      if (mate[v]! < 0 && dualvar[v]! + vdualoffset !== 0) fail(`verify: single vertex ${v} has a dual`);
    }
    // 3. all blossoms with positive dual value are full.
    for (let b = nvertex; b < 2 * nvertex; b++) {
      if (blossombase[b]! >= 0 && dualvar[b]! > 0) {
        const endps = blossomendps[b]!;
        if (endps.length % 2 !== 1) fail("verify: even blossom");
        for (let q = 1; q < endps.length; q += 2) {
          const p = endps[q]!;
          if (mate[endpoint[p]!] !== (p ^ 1) || mate[endpoint[p ^ 1]!] !== p) fail("verify: blossom not full");
        }
      }
    }
    // Ok.
  };

  // Main loop: continue until no further improvement is possible.
  for (let stage = 0; stage < nvertex; stage++) {
    // Each iteration of this loop is a "stage".
    // A stage finds an augmenting path and uses that to improve
    // the matching.

    // Remove labels from top-level blossoms/vertices.
    label.fill(0);

    // Forget all about least-slack edges.
    bestedge.fill(-1);
    for (let b = nvertex; b < 2 * nvertex; b++) blossombestedges[b] = null;

    // Loss of labeling means that we can not be sure that currently
    // allowable edges remain allowable througout this stage.
    allowedge.fill(0);

    // Make queue empty.
    queue.length = 0;

    // Label single blossoms/vertices with S and put them in the queue.
    for (let v = 0; v < nvertex; v++) {
      if (mate[v] === -1 && label[inblossom[v]!] === 0) assignLabel(v, 1, -1);
    }

    // Loop until we succeed in augmenting the matching.
    let augmented = false;
    for (;;) {
      // Each iteration of this loop is a "substage".
      // A substage tries to find an augmenting path;
      // if found, the path is used to improve the matching and
      // the stage ends. If there is no augmenting path, the
      // primal-dual method is used to pump some slack out of
      // the dual variables.

      // Continue labeling until all vertices which are reachable
      // through an alternating path have got a label.
      while (queue.length > 0 && !augmented) {
        // Take an S vertex from the queue.
        const v = queue.pop()!;
        if (label[inblossom[v]!] !== 1) fail("queue holds a non-S vertex");

        if (scanNeighbours(v)) augmented = true;
      }

      if (augmented) break;

      // There is no augmenting path under these constraints;
      // compute delta and reduce slack in the optimization problem.
      // (Note that our vertex dual variables, edge slacks and delta's
      // are pre-multiplied by two.)
      let deltatype = -1;
      let delta = 0;
      let deltaedge = -1;
      let deltablossom = -1;

      // Compute delta1: the minumum value of any vertex dual.
      if (!maxcardinality) {
        deltatype = 1;
        delta = Infinity;
        for (let v = 0; v < nvertex; v++) if (dualvar[v]! < delta) delta = dualvar[v]!;
      }

      // Compute delta2: the minimum slack on any edge between
      // an S-vertex and a free vertex.
      for (let v = 0; v < nvertex; v++) {
        if (label[inblossom[v]!] === 0 && bestedge[v] !== -1) {
          const d = bestSlack(v); // = slack(bestedge[v])
          if (deltatype === -1 || d < delta) {
            delta = d;
            deltatype = 2;
            deltaedge = bestedge[v]!;
          }
        }
      }

      // Compute delta3: half the minimum slack on any edge between
      // a pair of S-blossoms.
      for (let b = 0; b < 2 * nvertex; b++) {
        if (blossomparent[b] === -1 && label[b] === 1 && bestedge[b] !== -1) {
          const d = bestSlack(b) / 2; // = slack(bestedge[b]) / 2
          if (deltatype === -1 || d < delta) {
            delta = d;
            deltatype = 3;
            deltaedge = bestedge[b]!;
          }
        }
      }

      // Compute delta4: minimum z variable of any T-blossom.
      for (let b = nvertex; b < 2 * nvertex; b++) {
        if (blossombase[b]! >= 0 && blossomparent[b] === -1 && label[b] === 2 && (deltatype === -1 || dualvar[b]! < delta)) {
          delta = dualvar[b]!;
          deltatype = 4;
          deltablossom = b;
        }
      }

      if (deltatype === -1) {
        // No further improvement possible; max-cardinality optimum
        // reached. Do a final delta update to make the optimum
        // verifyable.
        if (!maxcardinality) fail("no delta without maxcardinality");
        deltatype = 1;
        let minDual = Infinity;
        for (let v = 0; v < nvertex; v++) if (dualvar[v]! < minDual) minDual = dualvar[v]!;
        delta = Math.max(0, minDual);
      }

      // Update dual variables according to delta.
      for (let v = 0; v < nvertex; v++) {
        const lv = label[inblossom[v]!];
        if (lv === 1) {
          // S-vertex: 2*u = 2*u - 2*delta
          dualvar[v]! -= delta;
        } else if (lv === 2) {
          // T-vertex: 2*u = 2*u + 2*delta
          dualvar[v]! += delta;
        }
      }
      for (let b = nvertex; b < 2 * nvertex; b++) {
        if (blossombase[b]! >= 0 && blossomparent[b] === -1) {
          if (label[b] === 1) {
            // top-level S-blossom: z = z + 2*delta
            dualvar[b]! += delta;
          } else if (label[b] === 2) {
            // top-level T-blossom: z = z - 2*delta
            dualvar[b]! -= delta;
          }
        }
      }

      // Take action at the point where minimum delta occurred.
      if (deltatype === 1) {
        // No further improvement possible; optimum reached.
        break;
      } else if (deltatype === 2) {
        // Use the least-slack edge to continue the search.
        allowedge[deltaedge] = 1;
        let i = eu[deltaedge]!;
        if (label[inblossom[i]!] === 0) i = ev[deltaedge]!;
        if (label[inblossom[i]!] !== 1) fail("delta2 edge without an S end");
        queue.push(i);
      } else if (deltatype === 3) {
        // Use the least-slack edge to continue the search.
        allowedge[deltaedge] = 1;
        const i = eu[deltaedge]!;
        if (label[inblossom[i]!] !== 1) fail("delta3 edge without an S end");
        queue.push(i);
      } else if (deltatype === 4) {
        // Expand the least-z blossom.
        expandBlossom(deltablossom, false);
      }
      // End of a this substage.
    }

    // Stop when no more augmenting path can be found.
    if (!augmented) break;

    // End of a stage; expand all S-blossoms which have dualvar = 0.
    for (let b = nvertex; b < 2 * nvertex; b++) {
      if (blossomparent[b] === -1 && blossombase[b]! >= 0 && label[b] === 1 && dualvar[b] === 0) expandBlossom(b, true);
    }
  }

  // Verify that we reached the optimum solution.
  if (options.verify || options.alsoCheck) verifyOptimum();

  // Slack of the edges left out, against the final duals (blossom z counted where both ends are inside).
  const violated: number[] = [];
  const slacks = new Float64Array(options.alsoCheck?.eu.length ?? 0);
  if (options.alsoCheck) {
    const { eu: xu, ev: xv, ew: xw } = options.alsoCheck;
    const chains = new Array<number[] | null>(nvertex).fill(null);
    // The non-trivial blossoms containing v, outermost first.
    const chainOf = (v: number): number[] => {
      let c = chains[v];
      if (!c) {
        c = [];
        for (let b = blossomparent[v]!; b !== -1; b = blossomparent[b]!) c.push(b);
        c.reverse();
        chains[v] = c;
      }
      return c;
    };
    for (let k = 0; k < xu.length; k++) {
      const i = xu[k]!;
      const j = xv[k]!;
      if (!(i >= 0 && j >= 0 && i < nvertex && j < nvertex && i !== j)) fail(`alsoCheck edge ${k} is not between two vertices of the graph`);
      let s = dualvar[i]! + dualvar[j]! - 2 * xw[k]!;
      if (blossomparent[i] !== -1 && blossomparent[j] !== -1) {
        const ci = chainOf(i);
        const cj = chainOf(j);
        for (let q = 0; q < ci.length && q < cj.length && ci[q] === cj[q]; q++) s += 2 * dualvar[ci[q]!]!;
      }
      slacks[k] = s;
      if (s < 0) violated.push(k);
    }
  }

  // Transform mate[] such that mate[v] is the vertex to which v is paired.
  const result = new Array<number>(nvertex);
  for (let v = 0; v < nvertex; v++) result[v] = mate[v]! >= 0 ? endpoint[mate[v]!]! : -1;
  for (let v = 0; v < nvertex; v++) {
    if (result[v] !== -1 && result[result[v]!] !== v) fail("mate is not symmetric");
  }
  return { mate: result, violated, slacks };
}
