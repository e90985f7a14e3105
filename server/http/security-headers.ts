import type { RequestHandler, Response } from 'express';

/**
 * Headers every response carries (README "Security"): no framing by any site (frame-ancestors
 * and, for browsers without it, X-Frame-Options), no content sniffing, no Referer leaving the
 * page (the operator URL carries the token in its query), and the dashboard's Content Security
 * Policy: script only from this server's files (the bundle has no inline script), styles from
 * its files plus the style attributes the dashboard's templates bind, no data: or other
 * origins, and the WebSocket only to this server. `connect-src` names ws://HOST beside 'self'
 * because browsers that predate CSP 3 do not count ws: as 'self'; the Host has passed the
 * Host/Origin policy before this runs.
 */
export function securityHeaders(): RequestHandler {
  return (req, res, next) => {
    res.set({
      'Content-Security-Policy': dashboardPolicy(req.headers.host ?? ''),
      'X-Frame-Options': 'DENY',
      'X-Content-Type-Options': 'nosniff',
      'Referrer-Policy': 'no-referrer',
    });
    next();
  };
}

function dashboardPolicy(host: string): string {
  const socket = /^[a-z0-9.\-[\]:]+$/i.test(host) ? ` ws://${host}` : '';
  return [
    "default-src 'self'",
    "script-src 'self'",
    "style-src 'self'",
    "style-src-attr 'unsafe-inline'",
    "img-src 'self'",
    `connect-src 'self'${socket}`,
    "object-src 'none'",
    "base-uri 'none'",
    "form-action 'none'",
    "frame-ancestors 'none'",
  ].join('; ');
}

/**
 * A soak report is one self-contained page: inline CSS and SVG, no script, nothing loaded. Its
 * policy allows exactly that, so even text injected into it could neither run nor fetch.
 */
export function useReportPolicy(res: Response): void {
  res.set(
    'Content-Security-Policy',
    "default-src 'none'; style-src 'unsafe-inline'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'",
  );
}
