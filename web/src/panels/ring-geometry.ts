import type { LinkState } from '../../../src/protocol/messages.js';

/**
 * Layout of the ring drawing in a 680 x 600 viewBox (wider than tall to leave room for the labels at the sides): node k sits clockwise from the top, links
 * are quadratic curves between node rims. A link whose reverse also exists bows to its own side
 * (a two-way ring shows two arcs per pair, one per direction); a lone link bows outward.
 */
export const VIEW_WIDTH = 680;
export const VIEW_HEIGHT = 600;
export const CENTRE = { x: VIEW_WIDTH / 2, y: VIEW_HEIGHT / 2 };
const RING_RADIUS = 212;

export interface Point {
  x: number;
  y: number;
}

export interface NodeLayout extends Point {
  /** Angle of the node on the ring (radians, SVG orientation). */
  angle: number;
}

export interface LinkLayout {
  link: LinkState;
  /** SVG path data of the curve, ending at the arrowhead's base. */
  path: string;
  /** Arrowhead triangle "x,y x,y x,y". */
  arrow: string;
  /** Point halfway along the curve (for the broken-link cross and weight labels). */
  middle: Point;
}

export function nodeRadius(nodes: number): number {
  return Math.max(14, Math.min(40, (0.3 * 2 * Math.PI * RING_RADIUS) / Math.max(1, nodes)));
}

export function nodeLayout(nodes: number): NodeLayout[] {
  return Array.from({ length: nodes }, (_, k) => {
    const angle = -Math.PI / 2 + (2 * Math.PI * k) / nodes;
    return { x: CENTRE.x + RING_RADIUS * Math.cos(angle), y: CENTRE.y + RING_RADIUS * Math.sin(angle), angle };
  });
}

/** Where the label of a node goes: further out along its spoke, anchored away from the disc. */
export function labelPosition(node: NodeLayout, radius: number): Point & { anchor: 'start' | 'middle' | 'end' } {
  const c = Math.cos(node.angle);
  const side = Math.abs(c) > 0.35;
  const d = RING_RADIUS + radius + (side ? 16 : 28);
  return { x: CENTRE.x + d * c, y: CENTRE.y + d * Math.sin(node.angle), anchor: side ? (c > 0 ? 'start' : 'end') : 'middle' };
}

export function linkLayout(
  links: readonly LinkState[],
  nodes: readonly NodeLayout[],
  radius: number,
  strokeWidth: (l: LinkState) => number,
): LinkLayout[] {
  const pairs = new Set(links.map((l) => `${l.from}>${l.to}`));
  return links
    .filter((l) => l.from !== l.to && nodes[l.from] && nodes[l.to])
    .map((link) => {
      const a = nodes[link.from];
      const b = nodes[link.to];
      const length = Math.hypot(b.x - a.x, b.y - a.y);
      const normal = { x: -(b.y - a.y) / length, y: (b.x - a.x) / length };
      const twoWay = pairs.has(`${link.to}>${link.from}`);
      // Bow to the link's own side when its reverse exists; otherwise outward, away from the centre.
      let bend = 0.16 * length;
      if (!twoWay) {
        const mid = { x: (a.x + b.x) / 2 - CENTRE.x, y: (a.y + b.y) / 2 - CENTRE.y };
        bend = (mid.x * normal.x + mid.y * normal.y >= 0 ? 1 : -1) * 0.08 * length;
      }
      const control = { x: (a.x + b.x) / 2 + normal.x * bend, y: (a.y + b.y) / 2 + normal.y * bend };
      const gap = radius + 5;
      const start = towards(a, control, gap);
      const tip = towards(b, control, gap);
      const width = strokeWidth(link);
      const arrowLength = 12 + 1.6 * width;
      const dir = unit({ x: tip.x - control.x, y: tip.y - control.y });
      const base = { x: tip.x - dir.x * arrowLength, y: tip.y - dir.y * arrowLength };
      const half = 0.5 * arrowLength;
      const arrow = [tip, { x: base.x - dir.y * half, y: base.y + dir.x * half }, { x: base.x + dir.y * half, y: base.y - dir.x * half }]
        .map((p) => `${p.x.toFixed(1)},${p.y.toFixed(1)}`)
        .join(' ');
      const end = { x: tip.x - dir.x * arrowLength * 0.7, y: tip.y - dir.y * arrowLength * 0.7 };
      const path = `M ${start.x.toFixed(1)} ${start.y.toFixed(1)} Q ${control.x.toFixed(1)} ${control.y.toFixed(1)} ${end.x.toFixed(1)} ${end.y.toFixed(1)}`;
      const middle = { x: 0.25 * start.x + 0.5 * control.x + 0.25 * end.x, y: 0.25 * start.y + 0.5 * control.y + 0.25 * end.y };
      return { link, path, arrow, middle };
    });
}

function unit(v: Point): Point {
  const n = Math.hypot(v.x, v.y) || 1;
  return { x: v.x / n, y: v.y / n };
}

function towards(from: Point, to: Point, distance: number): Point {
  const d = unit({ x: to.x - from.x, y: to.y - from.y });
  return { x: from.x + d.x * distance, y: from.y + d.y * distance };
}
