import { LitElement, css, unsafeCSS, html, svg, nothing } from 'lit';
import type { LinkState, SessionInfo, WireFrame } from '../../../src/protocol/messages.js';
import type { FrameStore } from '../data/frame-store.js';
import { StoreController } from '../data/store-controller.js';
import { formatNumber, formatSigned } from '../data/engineering.js';
import { CAUTION, FAULT, INK, LINK_LINE, LOCKED, MUTED, NODE_RIM, SURFACE, UNWANTED, BRAND, nodeColour, panelStyles } from '../theme.js';
import {
  CENTRE,
  VIEW_HEIGHT,
  VIEW_WIDTH,
  labelPosition,
  linkLayout,
  nodeLayout,
  nodeRadius,
  type LinkLayout,
  type NodeLayout,
} from './ring-geometry.js';
import { commandEvent, noticeEvent } from './commands.js';
import { patternLabel } from './pattern-text.js';
import { lockIcon } from './icons.js';
import './detuning-editor.js';

/**
 * The ring: one disc per node (filled in proportion to the wanted mode's amplitude, with a hand
 * at its phase and a small open triangle at the guiding system's phase), a purple warning ring
 * where the unwanted mode dominates, and the links as arrows whose width is their weight.
 * Broken links are dashed red with a cross. Operators click a link to break or restore it and a
 * node to edit its detuning; for anyone else a click explains why nothing happens.
 */
export class RingView extends LitElement {
  static override properties = {
    store: { attribute: false },
    canEdit: { type: Boolean },
    readOnlyReason: { type: String },
    editing: { state: true },
  };
  static override styles = [
    panelStyles,
    css`
      .stage {
        position: relative;
      }
      svg.ring {
        display: block;
        width: 100%;
        height: auto;
        max-height: var(--ring-max-height, 500px);
        user-select: none;
      }
      .link-hit {
        stroke: transparent;
        fill: none;
        stroke-width: 22;
        pointer-events: stroke;
        cursor: pointer;
      }
      .readonly .link-hit,
      .readonly .node {
        cursor: not-allowed;
      }
      .link:focus {
        outline: none;
      }
      .link:hover .link-line,
      .link:focus-visible .link-line {
        stroke: ${unsafeCSS(BRAND)};
      }
      .link:hover .link-arrow {
        fill: ${unsafeCSS(BRAND)};
      }
      .node {
        cursor: pointer;
      }
      .node:hover .rim {
        stroke: ${unsafeCSS(BRAND)};
        stroke-width: 3;
      }
      sr-detuning-editor {
        position: absolute;
        z-index: 5;
        width: 300px;
      }
      .note {
        font-size: 14px;
        color: ${unsafeCSS(MUTED)};
        display: flex;
        gap: 14px;
        flex-wrap: wrap;
        align-items: center;
      }
      .note .lock {
        color: ${unsafeCSS(CAUTION)};
        font-weight: 600;
      }
      .key {
        display: inline-flex;
        gap: 5px;
        align-items: center;
      }
    `,
  ];

  declare store: FrameStore | null;
  declare canEdit: boolean;
  declare readOnlyReason: string;
  declare editing: number | null;

  constructor() {
    super();
    this.store = null;
    this.canEdit = false;
    this.readOnlyReason = '';
    this.editing = null;
    new StoreController(this, () => this.store);
  }

  private onLink(link: LinkState): void {
    if (!this.canEdit) {
      this.dispatchEvent(
        noticeEvent('info', `Link ${link.from} → ${link.to} not changed: ${this.readOnlyReason || 'this page is view-only'}.`),
      );
      return;
    }
    this.dispatchEvent(commandEvent(link.weight > 0 ? 'break-link' : 'restore-link', { from: link.from, to: link.to }));
  }

  private onNode(k: number): void {
    if (!this.canEdit) {
      this.dispatchEvent(noticeEvent('info', `Node ${k} not changed: ${this.readOnlyReason || 'this page is view-only'}.`));
      return;
    }
    this.editing = this.editing === k ? null : k;
  }

  override render() {
    const session = this.store?.session ?? null;
    const frame = this.store?.latest ?? null;
    if (!session)
      return html`<h2>Ring</h2>
        <p class="muted">Waiting for the session…</p>`;
    const n = session.nodes;
    const nodes = nodeLayout(n);
    const radius = nodeRadius(n);
    const maxNominal = Math.max(1e-12, ...session.links.map((l) => l.nominal));
    const width = (l: LinkState) => 1.5 + 4 * Math.min(2, l.weight / maxNominal);
    const links = linkLayout(session.links, nodes, radius, width);
    const broken = session.links.filter((l) => l.weight === 0).length;
    return html`
      <h2>
        Ring · ${n} resonators · ${session.links.length} links${broken ? html` · <span style="color:${FAULT}">${broken} broken</span>` : ''}
      </h2>
      <div class="stage">
        <svg
          viewBox="0 0 ${VIEW_WIDTH} ${VIEW_HEIGHT}"
          class="ring ${this.canEdit ? '' : 'readonly'}"
          role="img"
          aria-label="ring of ${n} resonators"
        >
          ${links.map((l) => this.renderLink(l, width(l.link)))} ${nodes.map((p, k) => this.renderNode(p, k, radius, session, frame))}
          ${this.renderCentre(frame)}
        </svg>
        ${this.editing !== null && this.editing < n ? this.renderEditor(nodes[this.editing], session) : nothing}
      </div>
      <div class="note">
        <span class="key"
          ><svg width="18" height="18" viewBox="-9 -9 18 18">
            <circle r="8" fill=${nodeColour(0)} opacity="0.85"></circle>
            <line x2="8" stroke=${INK} stroke-width="2.5"></line></svg
          >fill = |a| of wanted mode, hand = its phase</span
        >
        <span class="key"
          ><svg width="14" height="14" viewBox="-7 -7 14 14">
            <path d="M 6 0 L -5 -5 L -5 5 Z" fill="none" stroke=${INK} stroke-width="1.5"></path></svg
          >guide phase</span
        >
        ${session.modes > 1 ? html`<span class="key" style="color:${UNWANTED}">◌ unwanted mode dominates</span>` : ''}
        ${
          this.canEdit
            ? html`<span>Click a link to break/restore it, a node to set its detuning.</span>`
            : html`<span class="lock" data-testid="ring-readonly">${lockIcon} ${this.readOnlyReason || 'View only'}</span>`
        }
      </div>
    `;
  }

  private renderLink(layout: LinkLayout, width: number) {
    const { link, path, arrow, middle } = layout;
    const isBroken = link.weight === 0;
    const colour = isBroken ? FAULT : LINK_LINE;
    const action = isBroken ? 'restore' : 'break';
    const s = 10;
    return svg`
      <g class="link ${isBroken ? 'broken' : ''}" data-from=${link.from} data-to=${link.to} data-weight=${link.weight}
         tabindex=${this.canEdit ? 0 : -1} @click=${() => this.onLink(link)}
         @keydown=${(e: KeyboardEvent) => (e.key === 'Enter' || e.key === ' ') && this.onLink(link)}>
        <title>link ${link.from} → ${link.to}, weight ${formatNumber(link.weight)} of ${formatNumber(link.nominal)}${this.canEdit ? ` — click to ${action}` : ''}</title>
        <path class="link-line" d=${path} fill="none" stroke=${colour} stroke-width=${isBroken ? 4 : width}
              stroke-dasharray=${isBroken ? '9 7' : 'none'} stroke-linecap="round"></path>
        <polygon class="link-arrow" points=${arrow} fill=${isBroken ? SURFACE : colour} stroke=${colour} stroke-width=${isBroken ? 2 : 0}></polygon>
        ${
          isBroken
            ? svg`<g transform="translate(${middle.x.toFixed(1)} ${middle.y.toFixed(1)})">
              <circle r="17" fill=${SURFACE} stroke=${FAULT} stroke-width="3"></circle>
              <path d="M ${-s} ${-s} L ${s} ${s} M ${-s} ${s} L ${s} ${-s}" stroke=${FAULT} stroke-width="5" stroke-linecap="round"></path>
            </g>`
            : link.weight !== link.nominal
              ? svg`<text x=${middle.x} y=${middle.y} font-size="14" text-anchor="middle" dominant-baseline="central" fill=${INK}
                   stroke=${SURFACE} stroke-width="4" paint-order="stroke">×${formatNumber(link.weight / (link.nominal || 1), 2)}</text>`
              : nothing
        }
        <path class="link-hit" d=${path}></path>
      </g>`;
  }

  private renderNode(p: NodeLayout, k: number, r: number, session: SessionInfo, frame: WireFrame | null) {
    const reference = freeRunningAmplitude(session);
    const amplitude = frame?.full.amplitude[k] ?? [];
    const a0 = amplitude[0] ?? 0;
    const a1 = amplitude[1] ?? 0;
    const fill = r * Math.min(1.12, Math.sqrt(Math.max(0, a0) / reference));
    const second = r * Math.min(1.12, Math.sqrt(Math.max(0, a1) / reference));
    const unwanted = session.modes > 1 && a1 > a0;
    const phase = frame?.full.phase[k]?.[0];
    const guidePhase = frame?.guide.phase[k]?.[0];
    const label = labelPosition(p, r);
    const ppm = session.detuningPpm[k];
    const hand = phase === undefined ? null : { x: (r + 3) * Math.cos(-phase), y: (r + 3) * Math.sin(-phase) };
    const tri = guidePhase === undefined ? null : guideMarker(guidePhase, r);
    const amplitudes = `|a₀| = ${formatNumber(a0)}${session.modes > 1 ? `, |a₁| = ${formatNumber(a1)}` : ''}`;
    const title = `node ${k}: ${amplitudes}, detuning ${formatSigned(ppm)} ppm${this.canEdit ? ' — click to edit' : ''}`;
    const carryingMode = frame?.full.amplitude[k]?.indexOf(Math.max(...(frame?.full.amplitude[k] ?? [0]))) ?? 1;
    return svg`
      <g class="node" data-node=${k} transform="translate(${p.x.toFixed(1)} ${p.y.toFixed(1)})" @click=${() => this.onNode(k)}>
        <title>${title}</title>
        ${unwanted ? svg`<circle r=${r + 9} fill="none" stroke=${UNWANTED} stroke-width="5" stroke-dasharray="6 4"></circle>` : nothing}
        <circle class="rim" r=${r} fill=${SURFACE} stroke=${NODE_RIM} stroke-width="1.5"></circle>
        <circle r=${fill.toFixed(2)} fill=${nodeColour(k)} opacity="0.88"></circle>
        ${
          session.modes > 1 && a1 > 0.01 * reference
            ? svg`<circle r=${second.toFixed(2)} fill="none" stroke=${UNWANTED} stroke-width="3"></circle>`
            : nothing
        }
        ${tri ? svg`<polygon points=${tri} fill=${SURFACE} stroke=${INK} stroke-width="2"></polygon>` : nothing}
        ${hand ? svg`<line x1="0" y1="0" x2=${hand.x.toFixed(2)} y2=${hand.y.toFixed(2)} stroke=${INK} stroke-width="4.5" stroke-linecap="round"></line>` : nothing}
        <circle r="4.5" fill=${INK}></circle>
        ${
          unwanted
            ? svg`<text x=${(-Math.cos(p.angle) * (r + 24)).toFixed(1)} y=${(-Math.sin(p.angle) * (r + 24)).toFixed(1)} text-anchor="middle"
                  dominant-baseline="central" font-size="15" font-weight="800" fill=${UNWANTED} stroke=${SURFACE} stroke-width="4" paint-order="stroke">MODE ${carryingMode}</text>`
            : nothing
        }
      </g>
      <g class="node-label" transform="translate(${label.x.toFixed(1)} ${label.y.toFixed(1)})">
        <text text-anchor=${label.anchor} y="-4" font-size="22" font-weight="700" fill=${nodeColour(k)}>${k}</text>
        <text text-anchor=${label.anchor} y="15" font-size="14" fill=${MUTED}>${ppm === undefined ? '' : `${formatSigned(ppm, 2)} ppm`}</text>
      </g>`;
  }

  private renderCentre(frame: WireFrame | null) {
    const { x: c, y: cy } = CENTRE;
    if (!frame) return svg`<text x=${c} y=${cy} text-anchor="middle" font-size="20" fill=${MUTED}>no frames yet</text>`;
    const p = frame.full.pattern;
    const halted = frame.status === 'halted';
    const unwanted = p.locked && p.mode !== 0;
    const colour = halted ? FAULT : unwanted ? UNWANTED : p.status === 'settling' ? CAUTION : p.locked ? LOCKED : CAUTION;
    const headline = halted ? 'HALTED' : p.locked ? p.kind.toUpperCase() : 'UNLOCKED';
    const sub = halted
      ? 'blow-up: state kept'
      : unwanted
        ? `on unwanted mode ${p.mode}: design defect`
        : p.locked
          ? patternLabel(p, { short: true })
          : `seeking · shape ${p.shape}`;
    const r = p.q !== undefined ? p.orderParameters[p.q] : Math.max(0, ...p.orderParameters);
    return svg`
      <g data-testid="ring-centre">
        <rect x=${c - 135} y=${cy - 52} width="270" height="100" rx="14" fill=${SURFACE} opacity="0.85"></rect>
        <g stroke=${SURFACE} stroke-width="6" stroke-linejoin="round" paint-order="stroke">
          <text x=${c} y=${cy - 18} text-anchor="middle" font-size="30" font-weight="800" fill=${colour} letter-spacing="1">${headline}</text>
          <text x=${c} y=${cy + 12} text-anchor="middle" font-size="18" fill=${INK}>${sub}</text>
          <text x=${c} y=${cy + 38} text-anchor="middle" font-size="16" fill=${MUTED}>R = ${r.toFixed(3)}</text>
        </g>
      </g>`;
  }

  private renderEditor(p: NodeLayout, session: SessionInfo) {
    // Place the editor beside the node, inside the stage (coordinates in % of the drawing).
    const left = Math.min(55, Math.max(0, (p.x / VIEW_WIDTH) * 100 - 20));
    const top = Math.min(70, Math.max(0, (p.y / VIEW_HEIGHT) * 100 + (p.y < VIEW_HEIGHT / 2 ? 8 : -34)));
    return html`<sr-detuning-editor
      style="left:min(${left}%, calc(100% - 300px));top:${top}%"
      closable
      .node=${this.editing ?? 0}
      .delta=${session.detuning[this.editing ?? 0] ?? 0}
      .epsilon=${session.epsilon}
      @sr-close=${() => (this.editing = null)}
    ></sr-detuning-editor>`;
  }
}

/**
 * The wanted mode's free-running amplitude 2 sqrt(1 - d/g) (docs/model.md, 'Closed form for M = 1');
 * 2 when unknown.
 */
function freeRunningAmplitude(session: SessionInfo): number {
  const modes = (session.scenario as { modes?: { gain?: number; loss?: number }[] } | null)?.modes;
  const g = modes?.[0]?.gain;
  const d = modes?.[0]?.loss ?? 0;
  return typeof g === 'number' && g > d && d >= 0 ? 2 * Math.sqrt(1 - d / g) : 2;
}

/** A small open triangle on the rim at the guide's phase, pointing inward. */
function guideMarker(phase: number, r: number): string {
  const ux = Math.cos(-phase);
  const uy = Math.sin(-phase);
  const tip = { x: ux * (r - 9), y: uy * (r - 9) };
  const back = { x: ux * (r + 6), y: uy * (r + 6) };
  const side = 7;
  return [tip, { x: back.x - uy * side, y: back.y + ux * side }, { x: back.x + uy * side, y: back.y - ux * side }]
    .map((q) => `${q.x.toFixed(1)},${q.y.toFixed(1)}`)
    .join(' ');
}

customElements.define('sr-ring-view', RingView);
