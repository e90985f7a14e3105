import { request } from 'node:http';

export interface RawAnswer {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}

/**
 * One HTTP request with exactly the headers given (fetch will not forge Host or Origin) and,
 * optionally, from another loopback address (`localAddress` 127.0.0.2: another source to the
 * server, on the same machine). The path is sent as written, percent-escapes included.
 */
export function rawRequest(
  url: string,
  options: { method?: string; path?: string; headers?: Record<string, string>; localAddress?: string; body?: string } = {},
): Promise<RawAnswer> {
  const target = new URL(url);
  return new Promise((resolve, reject) => {
    const req = request(
      {
        host: target.hostname,
        port: target.port,
        method: options.method ?? 'GET',
        path: options.path ?? `${target.pathname}${target.search}`,
        headers: options.headers,
        localAddress: options.localAddress,
        agent: false,
      },
      (res) => {
        let body = '';
        res.setEncoding('utf8');
        res.on('data', (chunk: string) => (body += chunk));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body }));
      },
    );
    req.on('error', reject);
    req.end(options.body);
  });
}
