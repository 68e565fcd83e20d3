/**
 * Counting what a rendered vega view drew, from its scenegraph: the webview reports these numbers to
 * the host after each render (the in-host tests assert on them), and the unit tests count the same
 * way on a view rendered in Node.
 */

interface SceneNode {
  marktype?: string;
  role?: string;
  items?: SceneNode[];
}

/**
 * Drawn data marks (role `mark`) by mark type; axes, legends and titles are not counted. A line is
 * one mark however many points it joins (vega keeps one item per point of a line), every other mark
 * type counts its items.
 */
export function countMarks(root: unknown): Record<string, number> {
  const counts: Record<string, number> = {};
  const visit = (n: SceneNode | undefined, depth: number): void => {
    if (!n || depth > 64) return;
    const items = Array.isArray(n.items) ? n.items : [];
    if (n.marktype && n.marktype !== 'group' && n.role === 'mark') {
      const path = n.marktype === 'line' || n.marktype === 'area' || n.marktype === 'trail';
      counts[n.marktype] = (counts[n.marktype] ?? 0) + (path ? (items.length > 0 ? 1 : 0) : items.length);
      return;
    }
    for (const it of items) visit(it, depth + 1);
  };
  visit(root as SceneNode, 0);
  return counts;
}

export function totalMarks(counts: Record<string, number>): number {
  return Object.values(counts).reduce((a, b) => a + b, 0);
}
