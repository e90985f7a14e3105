import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main } from './cli.js';

/** `node dist/server/main.js [--port P] [--scenario S]` (what `npm start` runs) is `syncring serve`. */
if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  void main(['serve', ...process.argv.slice(2)]).then((code) => {
    if (code >= 0) process.exitCode = code;
  });
}
