// Depth-first postorder of a forest given as child lists (head/next), used for the
// elimination tree.

/**
 * Writes the vertices 0..count−1 in postorder into out (roots are those with parent −1,
 * children taken in the order of their lists) and returns how many were written.
 * head is consumed; stack needs count entries.
 */
export function forestPostorder(count: number, parent: Int32Array, head: Int32Array, next: Int32Array, out: Int32Array, stack: Int32Array): number {
  let k = 0;
  for (let r = 0; r < count; r++) {
    if (parent[r] !== -1) continue;
    let top = 0;
    stack[0] = r;
    while (top >= 0) {
      const v = stack[top];
      const c = head[v];
      if (c === -1) {
        top--;
        out[k++] = v;
      } else {
        head[v] = next[c];
        stack[++top] = c;
      }
    }
  }
  return k;
}
