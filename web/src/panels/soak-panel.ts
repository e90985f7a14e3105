import { LitElement, css, html, nothing, unsafeCSS } from 'lit';
import type { SoakListing, SoaksResponse, VerdictRow } from '../../../src/protocol/soak-files.js';
import { getJson, postJson } from '../data/api-client.js';
import { PollingController } from '../data/polling-controller.js';
import { apiUrl, tokenFrom } from '../data/page-address.js';
import { formatNumber, formatSeconds } from '../data/engineering.js';
import { secondsHeading } from './seconds-heading.js';
import { PASS_CAUTION, PASS_CAUTION_SHORT } from '../../../src/campaign/cautions.js';
import {
  BRAND,
  CAUTION,
  CHIP,
  CHOSEN_ITEM,
  FAULT,
  GRID,
  INK,
  INSET_SURFACE,
  LOCKED,
  MUTED,
  ON_SOLID,
  PROGRESS_TRACK,
  SOFT_BORDER,
  SOFT_INK,
  SURFACE,
  panelStyles,
  tableStyles,
} from '../theme.js';
import './soak-start-form.js';

/** How often the list is read again while the tab is shown (status.json is rewritten about once a second). */
const POLL_MS = 2000;

/** The badge of a soak: running, its result once finished, or why it stopped. */
function verdictOf(s: SoakListing): { text: string; colour: string } {
  if (s.state === 'running') return { text: 'RUNNING', colour: BRAND };
  if (s.state === 'starting') return { text: 'STARTING', colour: BRAND };
  if (s.state === 'interrupted') return { text: 'INTERRUPTED', colour: CAUTION };
  if (s.state === 'halted') return { text: 'HALTED', colour: FAULT };
  if (s.pass === true) return { text: 'PASS', colour: LOCKED };
  if (s.pass === false) return { text: 'FAIL', colour: FAULT };
  return { text: s.state.toUpperCase(), colour: MUTED };
}

/**
 * The Soaks tab: every soak folder under the server's soaks folder, newest first, with its
 * progress (slow time, fraction, ETA), faults judged and failed, and for the chosen one the
 * verdict table, pass or fail and a link to its report. Polls GET /api/soaks while shown.
 * A page opened with the operator token (?token=) also gets the form that starts a soak and,
 * for soaks started from the dashboard, Stop while one runs and Resume once it is interrupted.
 */
export class SoakPanel extends LitElement {
  static override properties = {
    active: { type: Boolean },
    listing: { state: true },
    chosen: { state: true },
    error: { state: true },
    action: { state: true },
  };
  static override styles = [
    panelStyles,
    tableStyles,
    css`
      :host {
        display: grid;
        grid-template-columns: minmax(340px, 28fr) minmax(0, 72fr);
        gap: 12px;
        padding: 12px;
        min-height: 0;
        background: transparent;
        border: 0;
        border-radius: 0;
      }
      @media (max-width: 1250px) {
        :host {
          grid-template-columns: 1fr;
        }
      }
      .card {
        background: ${unsafeCSS(SURFACE)};
        border: 1px solid ${unsafeCSS(GRID)};
        border-radius: 10px;
        padding: 10px 14px 12px;
        min-width: 0;
        min-height: 0;
        overflow: auto;
      }
      .list {
        display: flex;
        flex-direction: column;
        gap: 8px;
      }
      button.soak {
        text-align: left;
        background: ${unsafeCSS(INSET_SURFACE)};
        border: 1px solid ${unsafeCSS(SOFT_BORDER)};
        border-radius: 8px;
        padding: 8px 10px;
        display: block;
        width: 100%;
      }
      button.soak.chosen {
        border: 2px solid ${unsafeCSS(BRAND)};
        background: ${unsafeCSS(CHOSEN_ITEM)};
      }
      .name {
        font-weight: 700;
        font-size: 17px;
        display: flex;
        justify-content: space-between;
        gap: 8px;
        align-items: center;
      }
      .badge {
        display: inline-block;
        font-size: 13px;
        font-weight: 800;
        letter-spacing: 0.08em;
        padding: 2px 8px;
        border-radius: 4px;
        color: ${unsafeCSS(ON_SOLID)};
      }
      .badge.big {
        font-size: 22px;
        padding: 4px 14px;
      }
      .bar {
        position: relative;
        height: 10px;
        border-radius: 5px;
        background: ${unsafeCSS(PROGRESS_TRACK)};
        overflow: hidden;
        margin: 6px 0 3px;
      }
      .bar.big {
        height: 28px;
        border-radius: 8px;
      }
      .bar span {
        position: absolute;
        inset: 0 auto 0 0;
        border-radius: inherit;
      }
      .bar b {
        position: absolute;
        inset: 0;
        display: flex;
        align-items: center;
        justify-content: center;
        font-size: 16px;
        color: ${unsafeCSS(INK)};
      }
      .line {
        font-size: 14px;
        color: ${unsafeCSS(SOFT_INK)};
        font-variant-numeric: tabular-nums;
      }
      .head {
        display: flex;
        align-items: center;
        gap: 16px;
        flex-wrap: wrap;
      }
      .head h3 {
        margin: 0;
        font-size: 24px;
      }
      .facts {
        display: flex;
        flex-wrap: wrap;
        gap: 4px 26px;
        font-size: 16px;
        margin: 6px 0 10px;
        font-variant-numeric: tabular-nums;
      }
      .facts b {
        font-size: 19px;
      }
      a.report {
        font-size: 16px;
        font-weight: 700;
        color: ${unsafeCSS(ON_SOLID)};
        background: ${unsafeCSS(BRAND)};
        border-radius: 6px;
        padding: 5px 12px;
        text-decoration: none;
      }
      table {
        font-size: 16px;
      }
      th {
        padding: 4px 8px 6px;
      }
      td {
        padding: 6px 8px;
      }
      .reasons {
        font-size: 13px;
        color: ${unsafeCSS(FAULT)};
        display: block;
      }
      .notes {
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
        display: block;
      }
      .open {
        color: ${unsafeCSS(MUTED)};
        font-weight: 700;
      }
      .small {
        font-size: 13px;
        color: ${unsafeCSS(MUTED)};
      }
      .yes {
        color: ${unsafeCSS(LOCKED)};
        font-weight: 700;
      }
      .no {
        color: ${unsafeCSS(FAULT)};
        font-weight: 700;
      }
      .empty {
        font-size: 16px;
        color: ${unsafeCSS(SOFT_INK)};
        line-height: 1.5;
      }
      button.act {
        font-size: 15px;
        font-weight: 700;
        padding: 5px 14px;
      }
      button.act.stop {
        border-color: ${unsafeCSS(FAULT)};
        color: ${unsafeCSS(FAULT)};
        background: ${unsafeCSS(SURFACE)};
      }
      .action {
        font-size: 14px;
        margin: 6px 0 0;
      }
      .caution {
        border-left: 4px solid ${unsafeCSS(CAUTION)};
        padding: 3px 10px;
        font-size: 14px;
        color: ${unsafeCSS(INK)};
        max-width: 62ch;
      }
      .caution.short {
        display: block;
        border: 0;
        padding: 2px 0 0;
        font-size: 12px;
        color: ${unsafeCSS(MUTED)};
      }
      code {
        background: ${unsafeCSS(CHIP)};
        padding: 1px 5px;
        border-radius: 4px;
        font-size: 14px;
      }
    `,
  ];

  declare active: boolean;
  declare listing: SoaksResponse | null;
  declare chosen: string;
  declare error: string;
  /** The last stop or resume: what the server said (or why it refused), for the soak it was about. */
  declare action: { soak: string; text: string; failed: boolean; busy: boolean } | null;

  /** The operator token from the page address; viewers have none and see no controls. */
  private readonly token = tokenFrom(location.search);
  /** Reads the list every POLL_MS while the tab is shown; a start, stop or resume asks for it at once. */
  private readonly poller = new PollingController(this, {
    read: (signal) => this.readList(signal),
    active: () => this.active,
    everyMs: POLL_MS,
  });
  /** A soak just started here, chosen before the list has it. */
  private awaited: string | null = null;

  constructor() {
    super();
    this.active = false;
    this.listing = null;
    this.chosen = '';
    this.error = '';
    this.action = null;
  }

  private async readList(signal: AbortSignal): Promise<void> {
    try {
      this.listing = await getJson<SoaksResponse>('/api/soaks', signal);
      this.error = '';
      const names = this.listing.soaks.map((s) => s.name);
      if (this.awaited !== null && names.includes(this.awaited)) this.awaited = null;
      if (!names.includes(this.chosen) && this.chosen !== this.awaited)
        this.chosen = (this.listing.soaks.find((s) => s.state === 'running') ?? this.listing.soaks[0])?.name ?? '';
    } catch (error) {
      if (signal.aborted) return;
      this.error = `Could not list the soaks: ${(error as Error).message}`;
    }
  }

  override render() {
    const l = this.listing;
    const chosen = l?.soaks.find((s) => s.name === this.chosen) ?? null;
    const startForm = this.token
      ? html`<sr-soak-start-form
          .token=${this.token}
          .soaks=${l?.soaks ?? []}
          @sr-soak-started=${(e: CustomEvent<string>) => this.started(e.detail)}
        ></sr-soak-start-form>`
      : nothing;
    return html`
      <div class="card">
        <h2>Soaks ${l ? html`· ${l.soaks.length}` : nothing}</h2>
        ${startForm} ${this.error ? html`<p class="no">${this.error}</p>` : nothing}
        ${
          l
            ? html`<div class="line small" data-testid="soaks-dir">the server's soaks folder (${l.dir}/ here; syncring serve prints where it is)</div>`
            : html`<p class="muted">Reading the soaks folder…</p>`
        }
        <div class="list" data-testid="soak-list">${l?.soaks.map((s) => this.renderItem(s))}</div>
        ${
          l && l.soaks.length === 0
            ? html`<p class="empty">
                No soaks yet. Start one ${this.token ? 'with the form above or ' : ''}with<br /><code
                  >npx syncring soak SCENARIO --campaign CAMPAIGN --until TAU --out SOAKS/NAME</code
                ><br />(SOAKS: the soaks folder <code>syncring serve</code> printed at start-up) and it shows up here while it runs.
              </p>`
            : nothing
        }
      </div>
      <div class="card">
        ${
          chosen
            ? this.renderDetail(chosen)
            : html`<h2>Soak</h2>
                <p class="muted">Choose a soak on the left.</p>`
        }
      </div>
    `;
  }

  private renderItem(s: SoakListing) {
    const v = verdictOf(s);
    const fraction = s.progress?.fraction ?? (s.state === 'finished' ? 1 : 0);
    return html`
      <button class="soak ${s.name === this.chosen ? 'chosen' : ''}" data-soak=${s.name} @click=${() => (this.chosen = s.name)}>
        <div class="name"><span>${s.name}</span><span class="badge" style="background:${v.colour}">${v.text}</span></div>
        <div class="bar"><span style="width:${(100 * fraction).toFixed(1)}%;background:${v.colour}"></span></div>
        <div class="line">
          ${formatNumber(100 * fraction, 3)} % ·
          ${s.faults ? `${s.faults.judged} judged, ${s.faults.failed} failed${s.faults.incomplete ? `, ${s.faults.incomplete} incomplete` : ''}` : `${s.verdictsTotal} verdicts`}
          ${s.state === 'running' && s.progress ? html` · ETA ${s.progress.eta}` : nothing}
        </div>
        ${s.pass === true ? html`<span class="caution short" title=${PASS_CAUTION}>PASS: ${PASS_CAUTION_SHORT}</span>` : nothing}
      </button>
    `;
  }

  private renderDetail(s: SoakListing) {
    const v = verdictOf(s);
    const p = s.progress;
    const fraction = p?.fraction ?? (s.state === 'finished' ? 1 : 0);
    const failed = s.verdicts.filter((r) => outcomeOf(r) === 'fail').length;
    const incomplete = s.faults?.incomplete ?? s.verdicts.filter((r) => outcomeOf(r) === 'incomplete').length;
    const howToContinue =
      s.launch && this.token
        ? 'Resume continues it from its last checkpoint.'
        : s.launch
          ? 'the operator can resume it here.'
          : html`continue it with <code>syncring soak … --out ${s.name} --resume</code>.`;
    return html`
      <div class="head">
        <h3 data-testid="soak-name">${s.name}</h3>
        <span class="badge big" data-testid="soak-verdict" style="background:${v.colour}">${v.text}</span>
        <a class="report" data-testid="soak-report" href=${apiUrl(s.report.url)} target="_blank" rel="noopener">Open report ↗</a>
        <span class="small">${s.report.file ? 'report.html' : 'report made from the log on request'}</span>
        ${this.renderControl(s)}
        ${s.pass === true ? html`<span class="caution" data-testid="soak-pass-caution">${PASS_CAUTION}</span>` : nothing}
      </div>
      ${
        this.action && this.action.soak === s.name && !this.action.busy
          ? html`<p class="action ${this.action.failed ? 'no' : 'small'}" data-testid="soak-action-result" role="status">
              ${this.action.text}
            </p>`
          : nothing
      }
      ${s.scenario || s.campaign ? html`<div class="line">${s.scenario ?? ''}${s.campaign ? html` · campaign: ${s.campaign}` : nothing}</div>` : nothing}
      <div class="bar big" data-testid="soak-progress">
        <span style="width:${(100 * fraction).toFixed(1)}%;background:${v.colour};opacity:0.8"></span
        ><b>${formatNumber(100 * fraction, 3)} %</b>
      </div>
      <div class="facts">
        ${
          p
            ? html`<span>slow time <b>${formatNumber(p.slowTime, 4)}</b> / ${formatNumber(p.slowUntil, 4)}</span>
                <span>ETA <b>${s.state === 'running' ? p.eta : '—'}</b></span>
                <span>wall <b>${formatSeconds(p.wallSeconds)}</b></span>`
            : nothing
        }
        <span
          >faults <b>${s.faults?.judged ?? s.verdictsTotal}</b> judged${s.faults ? ` of ${s.faults.started} started` : ''},
          <b class=${failed > 0 ? 'no' : 'yes'}>${s.faults?.failed ?? failed}</b> failed${
            incomplete
              ? html`,
                  <b
                    style="color:${MUTED}"
                    title="judging stopped before the outcome was decided; does not fail the soak unless --fail-incomplete"
                    >${incomplete}</b
                  >
                  incomplete`
              : nothing
          }</span
        >
        ${s.exitCode !== null ? html`<span>exit code <b>${s.exitCode}</b></span>` : nothing}
      </div>
      ${
        s.state === 'interrupted'
          ? html`<p class="line" style="color:${CAUTION};font-weight:700">The soak process is gone before the end: ${howToContinue}</p>`
          : nothing
      }
      ${s.problems.length ? html`<p class="line no">${s.problems.join('; ')}</p>` : nothing}
      ${s.verdicts.length ? this.renderVerdicts(s) : html`<p class="muted">No fault judged yet.</p>`}
    `;
  }

  /** Stop or Resume, for the operator, on soaks started from the dashboard (only those have their arguments and pid in start.json). */
  private renderControl(s: SoakListing) {
    if (!this.token || !s.launch) return nothing;
    const busy = this.action?.busy === true;
    if (s.state === 'running' || s.state === 'starting') {
      return html`<button class="act stop" data-action="stop-soak" ?disabled=${busy} @click=${() => void this.control(s.name, 'stop')}>
        ${busy ? 'Stopping…' : 'Stop'}
      </button>`;
    }
    if (s.state === 'interrupted') {
      return html`<button
        class="act primary"
        data-action="resume-soak"
        ?disabled=${busy}
        @click=${() => void this.control(s.name, 'resume')}
      >
        ${busy ? 'Resuming…' : 'Resume'}
      </button>`;
    }
    return nothing;
  }

  private async control(name: string, verb: 'stop' | 'resume'): Promise<void> {
    if (!this.token) return;
    this.action = { soak: name, text: '', failed: false, busy: true };
    try {
      const answer = await postJson(`/api/soaks/${encodeURIComponent(name)}/${verb}`, this.token);
      const text =
        verb === 'stop' ? `Stopped (${String(answer.signal)}); ${String(answer.note ?? '')}.` : `Resumed as pid ${String(answer.pid)}.`;
      this.action = { soak: name, text, failed: false, busy: false };
    } catch (error) {
      this.action = {
        soak: name,
        text: `${verb === 'stop' ? 'Stop' : 'Resume'} refused: ${(error as Error).message}`,
        failed: true,
        busy: false,
      };
    }
    this.poller.readNow();
  }

  /** A soak the form started: show it at once (it is listed as starting until its first status). */
  private started(name: string): void {
    this.chosen = name;
    this.awaited = name;
    this.action = null;
    this.poller.readNow();
  }

  private renderVerdicts(s: SoakListing) {
    const eps = s.epsilon ?? 0;
    const slow = (tau: number | null | undefined) =>
      tau === null || tau === undefined ? '—' : eps > 0 ? formatNumber(tau * eps, 4) : formatNumber(tau, 4);
    // A running soak's newest verdicts matter most; a finished one reads best in order.
    const newestFirst = s.state === 'running';
    const shown = newestFirst ? s.verdicts.slice().reverse() : s.verdicts;
    const older = s.verdictsTotal - s.verdicts.length;
    const olderNote = older > 0 ? ` ${older} older verdicts are in the report.` : '';
    return html`
      <table data-testid="verdicts">
        <thead>
          <tr>
            <th>fault</th>
            <th class="r">at (${eps > 0 ? 'slow' : 'τ'})</th>
            <th>before → after</th>
            <th>persisted</th>
            <th class="r" data-testid="relock-heading">${secondsHeading('re-lock', s.nominalFrequency?.assumed === true)}</th>
            <th class="r">max phase excursion</th>
            <th class="r">full − guide</th>
            <th>prediction</th>
            <th>verdict</th>
          </tr>
        </thead>
        <tbody>
          ${shown.map((r) => this.renderVerdict(r, slow))}
        </tbody>
      </table>
      ${s.pass !== true && shown.some((r) => r.pass) ? html`<p class="caution" data-testid="verdicts-pass-caution">${PASS_CAUTION}</p>` : nothing}
      <p class="small">${newestFirst ? 'Newest first.' : 'In the order the faults were applied.'}${olderNote}</p>
    `;
  }

  /** A pattern never lost needs no re-lock; a lost one re-locked after some time, or never. */
  private relockText(r: Partial<VerdictRow>) {
    if (r.persisted === undefined) return '—';
    if (r.persisted || (r.recovered && !r.timeToRelock)) return html`<span class="small">never lost</span>`;
    if (r.timeToRelock)
      return html`${formatSeconds(r.timeToRelock.seconds)}<span class="small"> ${formatNumber(r.timeToRelock.slow, 3)} slow</span>`;
    return html`<span class="no">${r.complete === false ? 'not yet' : 'never'}</span>`;
  }

  private renderVerdict(r: Partial<VerdictRow> & { id: string; pass: boolean }, slow: (tau: number | null | undefined) => string) {
    // status.json of an older soak may carry only id and pass.
    const detailed = r.action !== undefined;
    const outcome = outcomeOf(r);
    const yesNo = (value: boolean | null | undefined, yes = 'yes', no = 'no') =>
      value === null || value === undefined ? '—' : html`<span class=${value ? 'yes' : 'no'}>${value ? yes : no}</span>`;
    const persisted = !detailed
      ? '—'
      : r.persisted
        ? yesNo(true)
        : outcome === 'incomplete'
          ? html`<span class="open">not yet</span>`
          : yesNo(false, 'yes', r.slipped ? 'no (slip)' : 'no');
    const badge = BADGES[outcome];
    const via = !r.persisted && r.became && r.became.length ? html`<span class="small"> via ${r.became.join(', ')}</span>` : nothing;
    const patternChange = detailed ? html`${r.before} → ${r.final === r.before ? 'the same' : r.final}${via}` : '—';
    return html`
      <tr data-fault=${r.id} data-pass=${String(r.pass)} data-outcome=${outcome}>
        <td>
          <b>${r.id}</b>${detailed ? html`<span class="small"> ${r.action}${r.source === 'random' ? ' (random)' : ''}</span>` : nothing}
        </td>
        <td class="r">${detailed ? slow(r.appliedAt) : '—'}</td>
        <td>${patternChange}</td>
        <td>${persisted}</td>
        <td class="r">${this.relockText(r)}</td>
        <td class="r">${detailed ? `${formatNumber(r.maxPhaseExcursion, 3)} rad` : '—'}</td>
        <td class="r">${r.divergence ? formatNumber(r.divergence.max, 3) : '—'}</td>
        <td>${r.prediction ? yesNo(r.prediction.agreed, 'agreed', 'disagreed') : '—'}</td>
        <td>
          <span class="badge" style="background:${badge.colour}">${badge.text}</span>
          ${outcome === 'pass' ? html`<span class="caution short" title=${PASS_CAUTION}>${PASS_CAUTION_SHORT}</span>` : nothing}
          ${outcome === 'fail' && r.reasons?.length ? html`<span class="reasons">${r.reasons.join('; ')}</span>` : nothing}
          ${r.notes?.length ? html`<span class="notes">${r.notes.join('; ')}</span>` : nothing}
        </td>
      </tr>
    `;
  }
}

/** PASS, FAIL, and INCOMPLETE in a neutral colour: judging stopped before the outcome was decided. */
const BADGES = {
  pass: { text: 'PASS', colour: LOCKED },
  fail: { text: 'FAIL', colour: FAULT },
  incomplete: { text: 'INCOMPLETE', colour: MUTED },
} as const;

/** Rows from soaks written before INCOMPLETE existed carry only `pass`. */
function outcomeOf(r: { pass: boolean; outcome?: VerdictRow['outcome'] }): VerdictRow['outcome'] {
  return r.outcome ?? (r.pass ? 'pass' : 'fail');
}

customElements.define('sr-soak-panel', SoakPanel);
