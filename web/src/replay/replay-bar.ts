import { LitElement, css, unsafeCSS, html, nothing } from 'lit';
import { formatNumber, formatSimulatedSeconds } from '../data/engineering.js';
import { ON_SOLID, REPLAY_NOTE_GROUND, REPLAY_TICK, UNWANTED, stripButtonStyles, stripStyles } from '../theme.js';
import type { ReplayLog } from './replay-log.js';

/** Samples advanced per second while playing. */
const PLAY_RATE = 30;

/**
 * The replay strip: which log, where in it (a scrubber over its samples, with event ticks),
 * play/pause, and the way back to the live run.
 */
export class ReplayBar extends LitElement {
  static override properties = { replay: { attribute: false }, index: { type: Number }, playing: { state: true } };
  static override styles = [
    stripStyles,
    stripButtonStyles,
    css`
      :host {
        background: ${unsafeCSS(UNWANTED)};
      }
      .bar {
        gap: 14px;
        font-size: 15px;
      }
      .title {
        font-weight: 800;
        letter-spacing: 0.08em;
      }
      .track {
        position: relative;
        flex: 1;
        min-width: 200px;
      }
      input[type='range'] {
        width: 100%;
        accent-color: ${unsafeCSS(ON_SOLID)};
      }
      .ticks {
        position: absolute;
        left: 0;
        right: 0;
        top: -4px;
        height: 6px;
        pointer-events: none;
      }
      .tick {
        position: absolute;
        width: 2px;
        height: 8px;
        background: ${unsafeCSS(REPLAY_TICK)};
      }
      button {
        color: ${unsafeCSS(UNWANTED)};
        padding: 4px 12px;
        font-weight: 700;
      }
      .pos {
        font-variant-numeric: tabular-nums;
        white-space: nowrap;
      }
      .problems {
        background: ${unsafeCSS(REPLAY_NOTE_GROUND)};
        border-radius: 4px;
        padding: 1px 6px;
        font-size: 13px;
      }
    `,
  ];

  declare replay: ReplayLog | null;
  declare index: number;
  declare playing: boolean;
  private timer: ReturnType<typeof setInterval> | null = null;

  constructor() {
    super();
    this.replay = null;
    this.index = 0;
    this.playing = false;
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.stop();
  }

  private scrub(index: number): void {
    this.dispatchEvent(new CustomEvent<number>('sr-scrub', { detail: index, bubbles: true, composed: true }));
  }

  private toggle(): void {
    if (this.playing) return this.stop();
    const replay = this.replay;
    if (!replay) return;
    if (this.index >= replay.frames.length - 1) this.scrub(0);
    this.playing = true;
    this.timer = setInterval(() => {
      const next = this.index + 1;
      if (!this.replay || next >= this.replay.frames.length) return this.stop();
      this.scrub(next);
    }, 1000 / PLAY_RATE);
  }

  private stop(): void {
    if (this.timer !== null) clearInterval(this.timer);
    this.timer = null;
    this.playing = false;
  }

  override render() {
    const r = this.replay;
    if (!r) return nothing;
    const last = r.frames.length - 1;
    const frame = r.frames[Math.min(this.index, last)];
    const t0 = r.frames[0].tau;
    const span = r.frames[last].tau - t0 || 1;
    const problemList = r.problems.map((p) => `line ${p.line}: ${p.reason}`).join('\n');
    const problems = r.problems.length
      ? html`<span class="problems" title=${problemList}>${r.problems.length} log problem(s)</span>`
      : nothing;
    return html`<div class="bar" data-testid="replay-bar">
      <span class="title">REPLAY</span>
      <span title=${r.createdAt ?? ''}>${r.fileName}</span>
      <button data-action="replay-play" @click=${this.toggle}>${this.playing ? '❚❚ Pause' : '▶ Play'}</button>
      <div class="track">
        <div class="ticks">
          ${r.events.filter((e) => e.kind === 'perturbation').map((e) => html`<span class="tick" style="left:${(100 * (e.tau - t0)) / span}%"></span>`)}
        </div>
        <input
          type="range"
          min="0"
          max=${last}
          .value=${String(this.index)}
          aria-label="replay position"
          data-testid="scrubber"
          @input=${(e: Event) => {
            this.stop();
            this.scrub(Number((e.target as HTMLInputElement).value));
          }}
        />
      </div>
      <span class="pos"
        >sample ${this.index + 1} / ${last + 1} · τ = ${formatNumber(frame.tau, 5)} ·
        ${formatSimulatedSeconds(frame.seconds, r.scenario.units)}</span
      >
      ${problems}
      <button
        data-action="back-to-live"
        @click=${() => this.dispatchEvent(new CustomEvent('sr-leave-replay', { bubbles: true, composed: true }))}
      >
        ⟲ Back to live
      </button>
    </div>`;
  }
}

customElements.define('sr-replay-bar', ReplayBar);
