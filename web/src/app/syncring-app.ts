import { LitElement, css, unsafeCSS, html, nothing } from 'lit';
import type { Role, ServerMessage } from '../../../src/protocol/messages.js';
import { ConnectionClient, socketUrl, type ConnectionState } from '../data/connection.js';
import { FrameStore } from '../data/frame-store.js';
import { tokenFrom } from '../data/page-address.js';
import { getJson } from '../data/api-client.js';
import { ReplayError, ReplayLog } from '../replay/replay-log.js';
import type { CommandDetail, NoticeDetail } from '../panels/commands.js';
import type { ScenarioChoice } from '../../../src/protocol/catalogue-lists.js';
import type { ToastStack } from '../panels/toast-stack.js';
import { BRAND, FOOTER_INK, INK, MUTED, PAGE, SURFACE, TAB_BORDER, UNWANTED } from '../theme.js';
import { SIMULATION_CAUTION } from '../../../src/campaign/cautions.js';
import '../panels/status-header.js';
import '../panels/connection-banner.js';
import '../panels/ring-view.js';
import '../panels/pattern-panel.js';
import '../panels/control-panel.js';
import '../panels/event-timeline.js';
import '../panels/toast-stack.js';
import '../charts/phase-chart.js';
import '../charts/amplitude-chart.js';
import '../charts/lock-chart.js';
import '../replay/replay-bar.js';
import '../panels/prediction-view.js';
import '../panels/soak-panel.js';
import '../panels/noise-view.js';

/** The views of the dashboard; the live view is the default, the others are a hash away (#prediction, #noise, #soaks). */
const VIEWS = [
  { id: 'live', label: 'Live' },
  { id: 'prediction', label: 'Prediction' },
  { id: 'noise', label: 'Noise' },
  { id: 'soaks', label: 'Soaks' },
] as const;
type View = (typeof VIEWS)[number]['id'];

function viewFromHash(hash: string): View {
  const id = hash.replace(/^#/, '');
  return VIEWS.find((v) => v.id === id)?.id ?? 'live';
}

/**
 * The dashboard: lays the panels out and routes data. Live messages go into the live store;
 * an opened log goes into a separate replay store, so the live run keeps streaming underneath
 * and "back to live" is instant. Panels fire sr-command; only this element sends.
 */
export class SyncringApp extends LitElement {
  static override properties = {
    role: { state: true },
    connection: { state: true },
    viewers: { state: true },
    scenarios: { state: true },
    replay: { state: true },
    replayIndex: { state: true },
    lastCommand: { state: true },
    view: { state: true },
  };
  static override styles = css`
    :host {
      display: flex;
      flex-direction: column;
      height: 100vh;
      background: ${unsafeCSS(PAGE)};
    }
    main {
      flex: 1;
      min-height: 0;
      display: grid;
      grid-template-columns: minmax(400px, 33fr) minmax(0, 42fr) minmax(380px, 25fr);
      gap: 12px;
      padding: 12px;
      align-items: stretch;
    }
    .column {
      display: flex;
      flex-direction: column;
      gap: 12px;
      min-width: 0;
      min-height: 0;
      overflow-y: auto;
    }
    sr-event-timeline {
      flex: 1 1 0;
      min-height: 180px;
    }
    nav.views {
      display: flex;
      gap: 4px;
      padding: 6px 12px 0;
      border-bottom: 1px solid ${unsafeCSS(TAB_BORDER)};
    }
    nav.views button {
      font: inherit;
      font-size: 15px;
      font-weight: 700;
      letter-spacing: 0.03em;
      color: ${unsafeCSS(MUTED)};
      background: transparent;
      border: 1px solid transparent;
      border-bottom: 0;
      border-radius: 8px 8px 0 0;
      padding: 5px 18px 6px;
      cursor: pointer;
    }
    nav.views button:hover {
      color: ${unsafeCSS(INK)};
    }
    nav.views button[aria-selected='true'] {
      color: ${unsafeCSS(INK)};
      background: ${unsafeCSS(SURFACE)};
      border-color: ${unsafeCSS(TAB_BORDER)};
      margin-bottom: -1px;
      box-shadow: inset 0 3px 0 ${unsafeCSS(BRAND)};
    }
    main[hidden],
    .view[hidden] {
      display: none !important;
    }
    .view {
      flex: 1;
      min-height: 0;
    }
    main.replaying sr-ring-view,
    main.replaying sr-pattern-panel {
      outline: 3px solid ${unsafeCSS(UNWANTED)};
      outline-offset: -1px;
    }
    footer {
      padding: 8px 18px 12px;
      color: ${unsafeCSS(MUTED)};
      font-size: 14px;
      display: flex;
      justify-content: space-between;
      gap: 20px;
      flex-wrap: wrap;
    }
    footer .caution {
      font-weight: 600;
      color: ${unsafeCSS(FOOTER_INK)};
    }
    @media (max-width: 1250px), (max-height: 800px) {
      :host {
        height: auto;
        min-height: 100vh;
      }
      .column {
        overflow: visible;
      }
    }
    @media (max-width: 1250px) {
      main {
        grid-template-columns: 1fr 1fr;
      }
      .column.side {
        grid-column: 1 / -1;
      }
    }
  `;

  declare role: Role | null;
  declare connection: ConnectionState | null;
  declare viewers: number;
  declare scenarios: ScenarioChoice[];
  declare replay: ReplayLog | null;
  declare replayIndex: number;
  declare lastCommand: string;
  declare view: View;

  private readonly live = new FrameStore();
  private readonly replayStore = new FrameStore();
  private readonly client: ConnectionClient;
  private readonly pending = new Map<number, string>();

  constructor() {
    super();
    this.role = null;
    this.connection = null;
    this.viewers = 0;
    this.scenarios = [];
    this.replay = null;
    this.replayIndex = 0;
    this.lastCommand = '';
    this.view = viewFromHash(location.hash);
    this.client = new ConnectionClient(socketUrl(location, tokenFrom(location.search)), {
      onMessage: (m) => this.receive(m),
      onState: (s) => (this.connection = s),
    });
    this.addEventListener('sr-command', (e) => this.command((e as CustomEvent<CommandDetail>).detail));
    this.addEventListener('sr-notice', (e) =>
      this.toast((e as CustomEvent<NoticeDetail>).detail.kind, (e as CustomEvent<NoticeDetail>).detail.text),
    );
    this.addEventListener('sr-retry', () => this.client.retryNow());
    this.addEventListener('sr-open-log', (e) => void this.openLog((e as CustomEvent<File>).detail));
    this.addEventListener('sr-scrub', (e) => this.showReplayAt((e as CustomEvent<number>).detail));
    this.addEventListener('sr-leave-replay', () => this.leaveReplay());
  }

  private readonly followHash = () => (this.view = viewFromHash(location.hash));

  private show(view: View): void {
    this.view = view;
    history.replaceState(null, '', view === 'live' ? location.pathname + location.search : `#${view}`);
  }

  override connectedCallback(): void {
    super.connectedCallback();
    this.client.start();
    void this.loadScenarios();
    window.addEventListener('hashchange', this.followHash);
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.client.stop();
    window.removeEventListener('hashchange', this.followHash);
  }

  private get canEdit(): boolean {
    return this.replay === null && this.role === 'operator' && this.connection?.phase === 'open';
  }

  private get readOnlyReason(): string {
    if (this.replay) return 'Replay is read-only — go back to live to change the run';
    if (this.connection?.phase !== 'open') return 'Not connected to the live run';
    if (this.role !== 'operator') return 'View only — changes need the operator link (page opened with ?token=…)';
    return '';
  }

  private receive(message: ServerMessage): void {
    switch (message.type) {
      case 'hello':
        this.role = message.role;
        this.viewers = message.viewers;
        this.live.reset(message.session, message.history, message.events);
        return;
      case 'frame':
        this.live.pushFrame(message.frame);
        return;
      case 'event':
        this.live.pushEvent(message.event);
        return;
      case 'status':
        this.live.setSession(message.session);
        this.viewers = message.viewers;
        return;
      case 'ack': {
        const action = typeof message.id === 'number' ? (this.pending.get(message.id) ?? message.action) : message.action;
        if (typeof message.id === 'number') this.pending.delete(message.id);
        this.lastCommand = `✓ ${action} accepted`;
        return;
      }
      case 'error': {
        const action = typeof message.id === 'number' ? this.pending.get(message.id) : undefined;
        if (typeof message.id === 'number') this.pending.delete(message.id);
        const where = message.path ? ` (${message.path})` : '';
        this.toast('error', `${action ? `${action} refused` : 'Server error'}: ${message.reason}${where}`);
        if (action) this.lastCommand = `✗ ${action} refused`;
        return;
      }
    }
  }

  private command({ action, fields }: CommandDetail): void {
    if (this.replay) {
      this.toast('info', 'Replay is read-only: go back to live to send commands.');
      return;
    }
    const id = this.client.send(action, fields ?? {});
    if (id === null) {
      this.toast('error', `${action} not sent: not connected to the live run.`);
      return;
    }
    this.pending.set(id, action);
    this.lastCommand = `… ${action} sent`;
  }

  private toast(kind: 'info' | 'error', text: string): void {
    (this.renderRoot.querySelector('sr-toast-stack') as ToastStack | null)?.show(kind, text);
  }

  private async loadScenarios(): Promise<void> {
    try {
      const list = await getJson<ScenarioChoice[]>('/api/scenarios');
      this.scenarios = Array.isArray(list)
        ? list.filter((c) => typeof c?.name === 'string').map((c) => ({ name: c.name, title: c.title ?? c.name }))
        : [];
    } catch (error) {
      console.warn('syncring: could not list the built-in scenarios', error);
    }
  }

  private async openLog(file: File): Promise<void> {
    try {
      const replay = ReplayLog.fromText(await file.text(), file.name);
      this.replay = replay;
      this.showReplayAt(replay.frames.length - 1);
      const problems = replay.problems.length
        ? ` (${replay.problems.length} problem${replay.problems.length > 1 ? 's' : ''} in the file, intact records used)`
        : '';
      this.toast('info', `Replaying ${file.name}: ${replay.frames.length} samples, ${replay.events.length} events${problems}.`);
    } catch (error) {
      this.toast('error', error instanceof ReplayError ? error.message : `Could not open ${file.name}: ${(error as Error).message}`);
    }
  }

  private showReplayAt(index: number): void {
    const r = this.replay;
    if (!r) return;
    const i = Math.max(0, Math.min(r.frames.length - 1, Math.round(index)));
    this.replayIndex = i;
    const frame = r.frames[i];
    this.replayStore.reset(r.sessionAt(i), r.points.slice(0, i + 1), r.eventsUntil(frame.tau), frame);
    this.replayStore.frameCount = i + 1;
  }

  private leaveReplay(): void {
    this.replay = null;
  }

  override render() {
    const store = this.replay ? this.replayStore : this.live;
    const canEdit = this.canEdit;
    const reason = this.readOnlyReason;
    return html`
      <sr-status-header
        .store=${store}
        .role=${this.role}
        .connection=${this.connection}
        .viewers=${this.viewers}
        ?replaying=${this.replay !== null}
      ></sr-status-header>
      ${this.replay ? nothing : html`<sr-connection-banner .state=${this.connection}></sr-connection-banner>`}
      ${this.replay ? html`<sr-replay-bar .replay=${this.replay} .index=${this.replayIndex}></sr-replay-bar>` : nothing}
      <nav class="views" role="tablist" aria-label="views">
        ${VIEWS.map((v) => html`<button role="tab" data-view=${v.id} aria-selected=${String(this.view === v.id)} @click=${() => this.show(v.id)}>${v.label}</button>`)}
      </nav>
      <sr-prediction-view
        class="view"
        .store=${this.live}
        ?active=${this.view === 'prediction'}
        ?hidden=${this.view !== 'prediction'}
      ></sr-prediction-view>
      <sr-noise-view class="view" .store=${this.live} ?active=${this.view === 'noise'} ?hidden=${this.view !== 'noise'}></sr-noise-view>
      <sr-soak-panel class="view" ?active=${this.view === 'soaks'} ?hidden=${this.view !== 'soaks'}></sr-soak-panel>
      <main class=${this.replay ? 'replaying' : ''} ?hidden=${this.view !== 'live'}>
        <div class="column">
          <sr-ring-view .store=${store} ?canEdit=${canEdit} .readOnlyReason=${reason}></sr-ring-view>
          <sr-pattern-panel .store=${store}></sr-pattern-panel>
        </div>
        <div class="column">
          <sr-phase-chart .store=${store}></sr-phase-chart>
          <sr-amplitude-chart .store=${store}></sr-amplitude-chart>
          <sr-lock-chart .store=${store}></sr-lock-chart>
        </div>
        <div class="column side">
          <sr-control-panel
            .store=${store}
            .scenarios=${this.scenarios}
            ?canEdit=${canEdit}
            ?replaying=${this.replay !== null}
            .readOnlyReason=${reason}
            .lastCommand=${this.lastCommand}
          ></sr-control-panel>
          <sr-event-timeline .store=${store}></sr-event-timeline>
        </div>
      </main>
      <footer>
        <span class="caution" data-testid="caution">${SIMULATION_CAUTION}</span>
        <span>syncring · full equations beside the averaged guiding system, one clock</span>
      </footer>
      <sr-toast-stack></sr-toast-stack>
    `;
  }
}

customElements.define('syncring-app', SyncringApp);
