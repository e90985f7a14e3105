import { InputError } from '../src/util/input-error.js';
import { simulate } from './commands/simulate.js';
import { UsageError, callError } from './usage-error.js';

const USAGE = `usage:
  syncring simulate SCENARIO.json --until TAU [--out FILE.ndjson] [--mode micro|envelope|auto]
  syncring predict SCENARIO.json [--basins N] [--continue PARAM [--pattern INDEX] [--range MIN:MAX] [--max-steps N]]
                PARAM: detuning:K | coupling | reactive | dissipative | link:A-B | edge:A-B
  syncring explain SCENARIO.json
  syncring noise SCENARIO.json [--pattern INDEX] [--bandwidth HZ] [--part-noise h0=VALUE,h-1=VALUE,...]
  syncring serve [--port PORT] [--host HOST] [--allow-host NAME[:PORT],...] [--scenario SCENARIO.json]
                [--speed UNITS_PER_SECOND|max] [--soaks DIR]
  syncring soak SCENARIO.json --campaign CAMPAIGN.json --until TAU --out DIR [--resume] [--pace SLOW_UNITS_PER_SECOND]
                [--segment-bytes BYTES] [--checkpoint-every TAU] [--fail-incomplete]
  syncring report DIR [--out FILE.html] [--overlay OTHER_DIR_OR_FILE [--overlay-label TEXT] [--overlay-tau0 S] [--overlay-type phase|frequency]]
  syncring stability FILE [--tau0 SECONDS] [--type phase|frequency] [--mask MASK] [--html OUT.html]
                [--spacing octave|decade|1-2-5] [--confidence P]
  syncring yield STUDY.json --out DIR [--workers N] [--redis URL] [--resume]
  syncring yield STUDY.json --board INDEX     (the scenario of one sample, to open with serve --scenario)
  syncring worker --redis URL [--threads N] [--lock-seconds S]

SCENARIO may also name a built-in scenario (timing-board-8, ring-one-way-5, pair-adler),
CAMPAIGN a built-in campaign (timing-board-8-campaign).`;

interface Parsed {
  positional: string[];
  flags: Map<string, string | true>;
}

/** Split argv into positionals and --flags (a flag takes the next word unless it is a flag). */
export function parseArgs(argv: string[], valued: readonly string[]): Parsed {
  const positional: string[] = [];
  const flags = new Map<string, string | true>();
  for (let i = 0; i < argv.length; i++) {
    const word = argv[i];
    if (!word.startsWith('--')) {
      positional.push(word);
      continue;
    }
    const [name, inline] = word.slice(2).split('=', 2);
    if (valued.includes(name)) {
      const value = inline ?? argv[++i];
      if (value === undefined) throw callError(`--${name} needs a value`);
      flags.set(name, value);
    } else if (inline === undefined) {
      flags.set(name, true);
    } else {
      throw new UsageError(`--${name} takes no value`);
    }
  }
  return { positional, flags };
}

function onlyFlags(parsed: Parsed, allowed: readonly string[]): void {
  for (const name of parsed.flags.keys()) {
    if (!allowed.includes(name)) throw callError(`unknown option --${name}`);
  }
}

function numberFlag(parsed: Parsed, name: string): number | undefined {
  const value = parsed.flags.get(name);
  if (value === undefined) return undefined;
  const n = Number(value);
  if (value === true || !Number.isFinite(n))
    throw new UsageError(`--${name} must be a number (got ${value === true ? 'nothing' : JSON.stringify(value)})`);
  return n;
}

export async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case 'simulate': {
        const parsed = parseArgs(rest, ['until', 'out', 'mode']);
        onlyFlags(parsed, ['until', 'out', 'mode']);
        if (parsed.positional.length !== 1) throw callError('simulate needs exactly one SCENARIO');
        const until = numberFlag(parsed, 'until');
        if (until === undefined) throw callError('simulate needs --until TAU');
        const out = parsed.flags.get('out');
        const mode = parsed.flags.get('mode');
        const result = simulate({
          scenario: parsed.positional[0],
          until,
          out: typeof out === 'string' ? out : undefined,
          mode: typeof mode === 'string' ? mode : undefined,
        });
        process.stdout.write(`${JSON.stringify(result)}\n`);
        return result.status === 'halted' ? 3 : 0;
      }
      case 'predict': {
        const valued = ['continue', 'pattern', 'range', 'max-steps', 'basins'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, valued);
        if (parsed.positional.length !== 1) throw callError('predict needs exactly one SCENARIO');
        const text = (name: string): string | undefined => parsed.flags.get(name) as string | undefined;
        const { predict } = await import('./commands/predict.js');
        const result = predict({
          scenario: parsed.positional[0],
          continueIn: text('continue'),
          pattern: numberFlag(parsed, 'pattern'),
          range: text('range'),
          maxSteps: numberFlag(parsed, 'max-steps'),
          basins: numberFlag(parsed, 'basins'),
        });
        process.stdout.write(`${JSON.stringify(result)}\n`);
        return 0;
      }
      case 'explain': {
        const parsed = parseArgs(rest, []);
        onlyFlags(parsed, []);
        if (parsed.positional.length !== 1) throw callError('explain needs exactly one SCENARIO');
        const { explain } = await import('./commands/explain.js');
        process.stdout.write(`${JSON.stringify(explain(parsed.positional[0]))}\n`);
        return 0;
      }
      case 'noise': {
        const valued = ['pattern', 'bandwidth', 'part-noise'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, valued);
        if (parsed.positional.length !== 1) throw callError('noise needs exactly one SCENARIO');
        const { noise } = await import('./commands/noise.js');
        const result = noise({
          scenario: parsed.positional[0],
          pattern: numberFlag(parsed, 'pattern'),
          bandwidth: numberFlag(parsed, 'bandwidth'),
          partNoise: parsed.flags.get('part-noise') as string | undefined,
        });
        process.stdout.write(`${JSON.stringify(result)}\n`);
        return 0;
      }
      case 'serve': {
        const { serve, commaList } = await import('./commands/serve.js');
        const valued = ['port', 'scenario', 'host', 'allow-host', 'speed', 'soaks'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, valued);
        const speed = parsed.flags.get('speed') === 'max' ? 'max' : numberFlag(parsed, 'speed');
        if (typeof speed === 'number' && !(speed > 0)) throw new UsageError(`--speed must be > 0 or "max" (got ${speed})`);
        const running = await serve({
          speed,
          port: numberFlag(parsed, 'port'),
          scenario: parsed.flags.get('scenario') as string | undefined,
          host: parsed.flags.get('host') as string | undefined,
          allowedHosts: commaList(parsed.flags.get('allow-host') as string | undefined),
          soaksDir: parsed.flags.get('soaks') as string | undefined,
        });
        const stop = () => void running.close().then(() => process.exit(0));
        process.once('SIGINT', stop);
        process.once('SIGTERM', stop);
        return -1;
      }
      case 'soak': {
        const valued = ['campaign', 'until', 'out', 'pace', 'segment-bytes', 'checkpoint-every'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, [...valued, 'resume', 'fail-incomplete']);
        if (parsed.positional.length !== 1) throw callError('soak needs exactly one SCENARIO');
        const campaign = parsed.flags.get('campaign');
        const out = parsed.flags.get('out');
        if (typeof campaign !== 'string') throw callError('soak needs --campaign CAMPAIGN.json');
        if (typeof out !== 'string') throw callError('soak needs --out DIR');
        const resume = parsed.flags.get('resume') === true;
        const until = numberFlag(parsed, 'until');
        if (until === undefined && !resume) throw callError('soak needs --until TAU');
        const { soak } = await import('./commands/soak.js');
        return await soak({
          scenario: parsed.positional[0],
          campaign,
          until,
          out,
          resume,
          pace: numberFlag(parsed, 'pace'),
          segmentBytes: numberFlag(parsed, 'segment-bytes'),
          checkpointEvery: numberFlag(parsed, 'checkpoint-every'),
          failIncomplete: parsed.flags.get('fail-incomplete') === true,
        });
      }
      case 'yield': {
        const valued = ['out', 'workers', 'redis', 'board'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, [...valued, 'resume']);
        if (parsed.positional.length !== 1) throw callError('yield needs exactly one STUDY');
        const board = numberFlag(parsed, 'board');
        if (board !== undefined) {
          const { boardScenario } = await import('./commands/yield.js');
          process.stdout.write(`${JSON.stringify(boardScenario(parsed.positional[0], board))}\n`);
          return 0;
        }
        const out = parsed.flags.get('out');
        if (typeof out !== 'string') throw callError('yield needs --out DIR');
        const { yieldCommand } = await import('./commands/yield.js');
        const summary = await yieldCommand({
          study: parsed.positional[0],
          out,
          workers: numberFlag(parsed, 'workers'),
          redis: parsed.flags.get('redis') as string | undefined,
          resume: parsed.flags.get('resume') === true,
        });
        process.stdout.write(`${JSON.stringify(summary)}\n`);
        return 0;
      }
      case 'worker': {
        const valued = ['redis', 'threads', 'lock-seconds'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, valued);
        if (parsed.positional.length !== 0) throw callError('worker takes no positional arguments');
        const redis = parsed.flags.get('redis');
        if (typeof redis !== 'string') throw callError('worker needs --redis URL');
        const { worker } = await import('./commands/worker.js');
        const running = await worker({ redis, threads: numberFlag(parsed, 'threads'), lockSeconds: numberFlag(parsed, 'lock-seconds') });
        const stop = () => void running.close().then(() => process.exit(0));
        process.once('SIGINT', stop);
        process.once('SIGTERM', stop);
        return -1;
      }
      case 'report': {
        const valued = ['out', 'overlay', 'overlay-label', 'overlay-tau0', 'overlay-type'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, valued);
        if (parsed.positional.length !== 1) throw callError('report needs exactly one DIR (the --out folder of a soak)');
        const text = (name: string): string | undefined => parsed.flags.get(name) as string | undefined;
        const overlay = text('overlay');
        if (
          overlay === undefined &&
          (parsed.flags.has('overlay-label') || parsed.flags.has('overlay-tau0') || parsed.flags.has('overlay-type'))
        )
          throw callError('--overlay-label, --overlay-tau0 and --overlay-type go with --overlay');
        const { report } = await import('./commands/report.js');
        const written = report(parsed.positional[0], text('out'), {
          overlay,
          overlayLabel: text('overlay-label'),
          overlayTau0: numberFlag(parsed, 'overlay-tau0'),
          overlayType: text('overlay-type'),
        });
        process.stdout.write(`${JSON.stringify({ report: written })}\n`);
        return 0;
      }
      case 'stability': {
        const valued = ['tau0', 'type', 'mask', 'html', 'spacing', 'confidence'];
        const parsed = parseArgs(rest, valued);
        onlyFlags(parsed, valued);
        if (parsed.positional.length !== 1) throw callError('stability needs exactly one data FILE');
        const text = (name: string): string | undefined => parsed.flags.get(name) as string | undefined;
        const { stabilityCommand } = await import('./commands/stability.js');
        const result = stabilityCommand({
          file: parsed.positional[0],
          tau0: numberFlag(parsed, 'tau0'),
          type: text('type'),
          mask: text('mask'),
          html: text('html'),
          spacing: text('spacing'),
          confidence: numberFlag(parsed, 'confidence'),
        });
        process.stdout.write(`${JSON.stringify(result)}\n`);
        return 0;
      }
      case undefined:
      case 'help':
      case '--help':
        process.stdout.write(`${USAGE}\n`);
        return command === undefined ? 2 : 0;
      default:
        throw callError(`unknown command ${JSON.stringify(command)}`);
    }
  } catch (error) {
    if (error instanceof InputError) {
      process.stderr.write(`syncring: ${error.message}\n`);
      if (error instanceof UsageError && error.showUsage) process.stderr.write(`${USAGE}\n`);
      return 2;
    }
    throw error;
  }
}
