import { existsSync } from 'node:fs';
import { basename, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import express, { type Express, type RequestHandler } from 'express';
import { builtInScenarioNames, loadBuiltInScenario } from '../../src/scenarios/index.js';
import type { LiveSession } from '../live/live-session.js';
import type { ScenarioChoice } from '../../src/protocol/catalogue-lists.js';
import { HttpError, httpErrorHandler } from './http-error.js';
import { registerNoiseApi } from './noise-api.js';
import { registerPredictionApi } from './prediction-api.js';
import { registerSoakApi } from './soak-api.js';
import { registerSoakControl, type SoakControlOptions } from './soak-control.js';
import { securityHeaders } from './security-headers.js';
import type { WorkerLimits } from './worker-client.js';
import { checkHostAndOrigin, type OriginPolicy } from '../ws/origin.js';

/**
 * Where `vite build` puts the dashboard: dist/web beside dist/server, also when the server runs
 * from its TypeScript sources (tests), whose ../../web/ would be the unbuilt sources.
 */
export const WEB_ROOT = fileURLToPath(new URL(import.meta.url.endsWith('.ts') ? '../../dist/web/' : '../../web/', import.meta.url));

/**
 * HTTP side: the built dashboard and a small JSON API.
 *   GET /api/session    session info and the number of people watching
 *   GET /api/scenarios  the built-in scenarios
 *   GET /api/log        the current session log as an NDJSON download
 *   GET /api/health     liveness
 *   GET /api/catalogue, /api/what-if   prediction on the live parameters (prediction-api.ts)
 *   GET /api/noise      phase noise and deviations of a locked pattern of the live parameters (noise-api.ts)
 *   GET /api/soaks, /soaks/NAME/report.html   soak folders (soak-api.ts)
 *   GET /api/campaigns, POST /api/soaks[/NAME/stop|resume]   starting soaks (soak-control.ts)
 * Before any of them, every request (static files too) gets the security headers and passes the
 * server's Host/Origin policy (ws/origin.ts), the one the WebSocket upgrades pass: a request from
 * another site or under a foreign DNS name is answered 403 and reaches nothing.
 * It returns the app with `close`, which stops the worker threads behind the slow endpoints.
 */
export function createApp(
  live: LiveSession,
  viewers: () => number,
  options: {
    access: AccessOptions;
    soaksDir?: string;
    control?: SoakControlOptions;
    predictionLimits?: Partial<WorkerLimits>;
  },
): { app: Express; close(): Promise<void> } {
  const app = express();
  app.disable('x-powered-by');
  app.use(securityHeaders());
  app.use(hostAndOriginCheck(options.access));
  const background: { close(): Promise<void> }[] = [];
  app.get('/api/health', (_req, res) => {
    res.json({ ok: true });
  });
  app.get('/api/session', (_req, res) => {
    res.json({ ...live.info(), viewers: viewers(), tau: live.tau, tick: live.tick });
  });
  app.get('/api/scenarios', (_req, res) => {
    res.json(builtInScenarioNames.map((name): ScenarioChoice => ({ name, title: loadBuiltInScenario(name).name })));
  });
  app.get('/api/log', async (_req, res, next) => {
    const log = live.log;
    if (!log) {
      res.status(404).json({ error: 'this server keeps no session log (started without a log folder)' });
      return;
    }
    try {
      await log.drain();
      res.download(log.path, basename(log.path), { headers: { 'Content-Type': 'application/x-ndjson' } });
    } catch (error) {
      next(error);
    }
  });
  background.push(registerPredictionApi(app, live, options.predictionLimits));
  background.push(registerNoiseApi(app, live, options.predictionLimits));
  background.push(registerSoakApi(app, options.soaksDir ?? resolve('soaks')));
  if (options.control) registerSoakControl(app, options.soaksDir ?? resolve('soaks'), live, options.control);
  app.use('/api', (_req, res) => {
    res.status(404).json({ error: 'no such API endpoint' });
  });
  if (existsSync(WEB_ROOT)) {
    app.use(express.static(WEB_ROOT, { index: 'index.html' }));
  } else {
    app.get('/', (_req, res) => {
      res.status(503).type('text/plain').send('The dashboard is not built: run `npm run build` (npm start does it).\n');
    });
  }
  app.use((_req, res) => {
    res.status(404).type('text/plain').send('no such page\n');
  });
  app.use(httpErrorHandler);
  return {
    app,
    close: async () => {
      await Promise.all(background.map((b) => b.close()));
    },
  };
}

/** The Host/Origin policy of the server and the port it listens on (known once it listens). */
export interface AccessOptions {
  policy: OriginPolicy;
  port: () => number;
}

function hostAndOriginCheck({ policy, port }: AccessOptions): RequestHandler {
  return (req, _res, next) => {
    const problem = checkHostAndOrigin(req, port(), policy);
    if (problem) throw new HttpError(403, `refused: ${problem}`);
    next();
  };
}
