/**
 * Panels never talk to the server themselves: they fire `sr-command` (bubbling, crossing shadow
 * roots) and the app decides whether and how it can be sent. `sr-notice` asks the app to show a
 * message (for example why a click did nothing).
 */
export interface CommandDetail {
  action: string;
  fields?: Record<string, unknown>;
}

export interface NoticeDetail {
  kind: 'info' | 'error';
  text: string;
}

export function commandEvent(action: string, fields: Record<string, unknown> = {}): CustomEvent<CommandDetail> {
  return new CustomEvent<CommandDetail>('sr-command', { detail: { action, fields }, bubbles: true, composed: true });
}

export function noticeEvent(kind: NoticeDetail['kind'], text: string): CustomEvent<NoticeDetail> {
  return new CustomEvent<NoticeDetail>('sr-notice', { detail: { kind, text }, bubbles: true, composed: true });
}
