/**
 * Disjoint sets over the integers 0…size−1 with path compression (Tarjan 1975; as in Press2007
 * and every algorithms text): `union` joins two sets and says whether they were apart, `find`
 * names a set by its root. Used for the connected components of shot–station graphs.
 *
 * @example
 * const sets = unionFind(4); sets.union(0, 1); sets.find(0) === sets.find(1); // true
 */
export interface UnionFind {
  readonly find: (node: number) => number;
  readonly union: (a: number, b: number) => boolean;
}

export function unionFind(size: number): UnionFind {
  const parent = new Int32Array(size);
  for (let node = 0; node < size; node += 1) parent[node] = node;
  const find = (node: number): number => {
    let root = node;
    while (parent[root] !== root) root = parent[root]!;
    let current = node;
    while (parent[current] !== root) {
      const next = parent[current]!;
      parent[current] = root;
      current = next;
    }
    return root;
  };
  return {
    find,
    union(a, b) {
      const rootA = find(a);
      const rootB = find(b);
      if (rootA === rootB) return false;
      parent[rootA] = rootB;
      return true;
    },
  };
}
