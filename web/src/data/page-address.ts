/** The operator token the page was opened with (`?token=...`), or null for a viewer. */
export function tokenFrom(search: string): string | null {
  const token = new URLSearchParams(search).get('token');
  return token && token.trim() !== '' ? token : null;
}

/** A same-origin URL relative to the page, so the dashboard also works behind a path prefix. */
export function apiUrl(path: string): string {
  return new URL(path.replace(/^\//, './'), document.baseURI).toString();
}
