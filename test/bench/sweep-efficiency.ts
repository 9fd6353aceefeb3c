/**
 * Sweep efficiency: wall time of a sweep on the simulated bench with a realistic
 * link (a few ms per reply), divided by the physical minimum the plan requires
 * (Σ settle + averages · integration). Target ≤ 1.10 for the scope case with
 * one acquisition per point at 3 ms per reply.
 *
 * The physical minimum is computed here, independently of the runner and of
 * the plan's own figure (both printed): the grid from·10^(k/perDecade) up to
 * `to`; per point the circuit's settling, −ln(0.001)·τ with τ = RF·CF of the
 * stage's feedback network (handbook RC step response, 0.1 % residual — the
 * plan's default), or the instruments' 10 ms settle if longer; then `averages`
 * acquisitions of `minCycles` whole periods each (a scope has no shortest
 * acquisition; the meter's is its 0.1 s aperture, rounded up to whole periods).
 *
 * The timed window runs from the start of the run to the commit of its last
 * point: that is the measurement. What follows — the run's figures (pass band,
 * −3 dB point, gain-limit point, fits) computed from the committed points — is
 * not measurement and is reported beside it ("analysis after"), as is the
 * set-up before the first stimulus ("set-up", inside the timed window).
 *
 * Run: npx tsx test/bench/sweep-efficiency.ts [--latency-ms 3] [--per-decade 10] [--links socket,vxi11,pty] [--cases scope,scope-averages,meter]
 * Every case runs once per connection kind (raw socket, VXI-11 through the
 * portmapper, started as in the tests when none answers — and a socat PTY), the same link latency
 * added by the simulated instruments on each.
 * Real time (time scale 1), so the figure is what a bench user would see. The
 * simulated bench runs in its own process (`rolloff sim`), as instruments do, so
 * its simulation work is not charged to the sweep.
 *
 * The ratio is measured as before. The "2-reply floor" column is for reading
 * it, not part of it: the ratio a sweep would reach if each point paid exactly
 * two reply latencies and nothing else. Two replies per point cannot overlap
 * the settling: the scope's "acquisition complete" (the stimulus must not move
 * before it) and then the generator's acknowledgement of the next setting
 * (the change happens somewhere between sending it and that reply, so
 * settling is counted from the reply — test/integration/sweep/
 * settle-before-acquire.test.ts checks captures against the bench's own
 * record). Everything else (read-back, next time base, storing) overlaps.
 *
 * Beside the table, the "bare link" ratio: the same exchange (per point a setting and its
 * acknowledgement, the settling, an acquisition and its "complete") between this process and two
 * stand-in instruments with nothing of Rolloff in them (bare-link-instruments.ts), over raw sockets,
 * with the same reply latency and the same waits. It is what any program reaches on this machine; the
 * difference from Rolloff's raw-socket ratio is Rolloff's own cost.
 *
 * A second table attributes every millisecond of the wall time beyond the
 * plan's Σ (settle + record), from the link traffic the service reports (its
 * own timestamps, nothing from inside the runner): set-up before the first
 * generator command, the first step's generator configuration, per point the
 * acquisition's reply beyond its record length, the wait for the generator's
 * acknowledgement of the next setting and the "late start" (end of settling to
 * the next acquisition start: the runner's own work that did not fit inside
 * the settling), re-measured steps, and the last point's read-back and commit.
 * The parts add up exactly (scopeBreakdown says how); their sum is printed
 * beside them. Beside it the CPU time of this process per point
 * (process.cpuUsage) and the load average before and after, so a loaded
 * machine, which stretches the replies of the simulated bench's process, can
 * be told apart from the runner's own cost.
 */
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { connect } from 'node:net';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { openServiceAt } from '../../app/service/open-service';
import { makeDesignFromTemplate } from '../../app/circuit/templates';
import { realClock } from '../../app/bench/clock';
import { ReadlineParser } from '@serialport/parser-readline';
import { startSimProcess } from '../helpers/sim-process';
import { ensurePortmapper } from '../helpers/portmapper';

function argument(name: string, fallback: number): number {
  const at = process.argv.indexOf(`--${name}`);
  return at > 0 ? Number(process.argv[at + 1]) : fallback;
}

type Link = 'socket' | 'vxi11' | 'pty';
const LINKS: Link[] = ['socket', 'vxi11', 'pty'];
const CASES = [
  { id: 'scope', name: 'scope, 10 Hz–100 kHz', request: { from: 10, to: 100e3, measurement: 'scope' as const, averages: 1 } },
  { id: 'scope-averages', name: 'scope, 10 Hz–100 kHz, 3 averages', request: { from: 10, to: 100e3, measurement: 'scope' as const, averages: 3 } },
  { id: 'meter', name: 'meter, 10 Hz–100 kHz', request: { from: 10, to: 100e3, measurement: 'meter' as const, averages: 1 } },
];

/** The comma-separated values of option `--name`, each one of `allowed`; all of them when absent. */
function listArgument<T extends string>(name: string, allowed: readonly T[]): T[] {
  const at = process.argv.indexOf(`--${name}`);
  if (at < 0) return [...allowed];
  const values = (process.argv[at + 1] ?? '').split(',') as T[];
  for (const value of values) if (!allowed.includes(value)) throw new Error(`--${name}: "${value}" is not one of ${allowed.join(', ')}`);
  return values;
}

async function main(): Promise<void> {
  const links = listArgument('links', LINKS);
  const caseIds = listArgument('cases', CASES.map((c) => c.id));
  const latencyMs = argument('latency-ms', 3);
  const perDecade = argument('per-decade', 10);
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-bench-'));
  const designFile = makeDesignFromTemplate('inverting-lowpass', {});
  writeFileSync(join(folder, 'design.json'), JSON.stringify(designFile));
  const simArgs = ['--design', join(folder, 'design.json'), '--latency', String(latencyMs / 1000), '--measurement-noise', '1e-4'];
  // VXI-11 clients find the instruments through the portmapper: started here when none answers, as the tests do.
  if (links.includes('vxi11')) await ensurePortmapper();
  // One process serves the raw socket and VXI-11, another the PTYs (a sim serves TCP or PTYs, not both).
  const lan = await startSimProcess([...simArgs, '--port', '0', ...(links.includes('vxi11') ? ['--vxi11'] : [])]);
  const serial = links.includes('pty') ? await startSimProcess([...simArgs, '--pty', mkdtempSync(join(folder, 'pty-'))]).catch((error: Error) => {
    lan.stop();
    throw error;
  }) : undefined;
  const addressesOf = (link: Link) => (link === 'pty' ? serial!.addresses.pty : lan.addresses[link]);
  const service = await openServiceAt(join(folder, 'bench.sqlite'), { maxStimulusVpp: 1 });
  try {
    const design = await service.saveDesign(designFile);
    const build = await service.createBuild({ designId: design.id, label: 'bench', notes: '', actualValues: {} });
    const cases = CASES.filter((c) => caseIds.includes(c.id));
    const tracing = process.argv.includes('--trace');
    const traceStart = performance.now();
    // Trace lines are kept in memory and written after each case, so writing them does not delay the sweep.
    const traceLines: string[] = [];
    const trace = (text: string) => traceLines.push(`${(performance.now() - traceStart).toFixed(1).padStart(9)} ${text}\n`);
    const flushTrace = () => process.stderr.write(traceLines.splice(0).join(''));
    if (tracing) {
      service.on('traffic', (t) => trace(`${t.role.padEnd(9)} ${t.direction.padEnd(8)} ${t.text.slice(0, 50)}`));
      service.on('point', (p) => trace(`POINT ${p.index}`));
    }
    const breakdowns: string[] = [];
    console.log(`sweep efficiency on the simulated bench: link latency ${latencyMs} ms per reply, ${perDecade} points/decade, real time, per connection kind`);
    console.log('link    case                                   points  physical min (plan)   wall time   ratio   set-up   overhead/point   2-reply floor   analysis after');
    for (const link of links) {
    const addresses = addressesOf(link);
    for (const role of ['generator', 'meter', 'scope'] as const) await service.connect({ role, address: addresses[role]!, profileId: `scpi-${role}` });
    for (const c of cases) {
      const request = sweepRequest(c.request, build.id, perDecade);
      const plan = await service.planSweep(request);
      const minimumS = physicalMinimumS(independentSteps(designFile, request));
      let lastPointMs = 0;
      let firstSentMs = 0;
      const timeline: TrafficMoment[] = [];
      const stopPoints = service.on('point', () => (lastPointMs = performance.now()));
      const stopTraffic = service.on('traffic', (t) => {
        if (!firstSentMs && t.role === 'generator' && t.direction === 'sent') firstSentMs = performance.now();
        timeline.push({ atMs: performance.now(), role: t.role, direction: t.direction, text: t.text });
      });
      const loadBefore = loadavg()[0];
      const simProcess = link === 'pty' ? serial! : lan;
      const simCpuBeforeMs = cpuMsOfProcess(simProcess.process.pid!);
      const cpuBefore = process.cpuUsage();
      const started = performance.now();
      if (tracing) trace(`START ${c.name}`);
      const run = await service.startRun(request);
      await service.waitForRun(run.id);
      const doneMs = performance.now();
      const cpu = process.cpuUsage(cpuBefore);
      const simCpuMs = cpuMsOfProcess(simProcess.process.pid!) - simCpuBeforeMs;
      stopPoints();
      stopTraffic();
      const wallS = (lastPointMs - started) / 1000;
      const setupMs = firstSentMs - started;
      const analysisMs = doneMs - lastPointMs;
      if (tracing) {
        trace(`END ${c.name}`);
        flushTrace();
      }
      const ratio = wallS / minimumS;
      const overheadMs = ((wallS - minimumS) / plan.steps.length) * 1000;
      const floorRatio = twoReplyFloorRatio(minimumS, plan.steps.length, latencyMs);
      const parts = c.request.measurement === 'scope' ? scopeBreakdown(timeline, plan.steps, request.averages, started, lastPointMs) : undefined;
      const cpuMsPerPoint = (cpu.user + cpu.system) / 1000 / plan.steps.length;
      const simCpuMsPerPoint = simCpuMs / plan.steps.length;
      breakdowns.push(`${link.padEnd(7)} ${c.name.padEnd(38)} ${parts ? describeParts(parts, plan.steps.length) : describeNoParts()}   ${cpuMsPerPoint.toFixed(1).padStart(5)} ms  ${simCpuMsPerPoint.toFixed(1).padStart(5)} ms  ${loadBefore.toFixed(2)}/${loadavg()[0].toFixed(2)}`);
      if (parts && parts.settlingShort > 0) breakdowns.push(`        ^ ${parts.settlingShort} acquisition(s) started before the settling counted from the generator's acknowledgement was over`);
      console.log(
        `${link.padEnd(7)} ${c.name.padEnd(38)} ${String(plan.steps.length).padStart(6)}  ${minimumS.toFixed(3).padStart(8)} s (${plan.estimatedDurationS.toFixed(3)})  ${wallS.toFixed(3).padStart(8)} s  ${ratio.toFixed(3).padStart(6)}  ${setupMs.toFixed(0).padStart(4)} ms  ${overheadMs.toFixed(1).padStart(8)} ms  ${floorRatio.toFixed(3).padStart(13)}  ${analysisMs.toFixed(0).padStart(8)} ms`,
      );
    }
    }
    console.log('target: ratio ≤ 1.10 (scope case, one acquisition per point, 3 ms per reply)');
    const scopeCase = cases.find((c) => c.id === 'scope');
    if (scopeCase) {
      const steps = independentSteps(designFile, sweepRequest(scopeCase.request, build.id, perDecade));
      const bare = await bareLinkRatio(latencyMs, steps);
      const floor = twoReplyFloorRatio(physicalMinimumS(steps), steps.length, latencyMs);
      console.log(`bare link, the same exchange over a raw socket with nothing of Rolloff (${steps.length} points; the best any program reaches here): ratio ${bare.toFixed(3)}, 2-reply floor ${floor.toFixed(3)}`);
    }
    console.log('');
    console.log('where the wall time beyond the physical minimum goes, from the link traffic (scope cases; ms in all, and per point in brackets: mean/median):');
    console.log('  set-up       = start of the run to the first generator command (store, plan, events)');
    console.log('  first stim.  = the first step\'s generator configuration, to its acknowledgement');
    console.log('  acquisition  = start of acquisition to "complete", less the record length (the physical part)');
    console.log('  generator    = "complete" to the generator\'s acknowledgement of the next setting');
    console.log('  late start   = end of settling (acknowledgement + settle time) to the next acquisition start: the runner\'s');
    console.log('                 own work (fits, store commit, events, scope set-up) that did not fit inside the settling');
    console.log('  re-measure   = acquisitions repeated with a wider scale (clipped records)');
    console.log('  end          = the last "complete" to the commit of the last point (read-back, fits, store)');
    console.log('  sum          = all of these; equals wall time − the plan\'s Σ (settle + record)');
    console.log('  CPU          = user+system CPU per point of this process (runner, store, fits) and of the simulated bench\'s process');
    console.log('  load avg     = 1-minute load average before/after the case (2 cores: above ~1 the figures stretch)');
    console.log('link    case                                    set-up  first stim.         acquisition           generator          late start  re-measure     end   sum (per point)   CPU/point: run   sim   load avg');
    for (const line of breakdowns) console.log(line);
  } finally {
    await service.close();
    lan.stop();
    serial?.stop();
    await new Promise((resolve) => setTimeout(resolve, 500)); // the sims unregister from the portmapper and close their PTYs
    rmSync(folder, { recursive: true, force: true });
  }
}

interface TrafficMoment {
  atMs: number;
  role: string;
  direction: string;
  text: string;
}

/** Wall time beyond the physical minimum, ms, by where it went (see scopeBreakdown). */
interface OverheadParts {
  setUpMs: number;
  firstStimulusMs: number;
  acquisitionMs: number[];
  generatorMs: number[];
  lateMs: number[];
  remeasureMs: number;
  endMs: number;
  /** Late starts below zero: an acquisition that began before its settling was over (must not happen). */
  settlingShort: number;
}

/**
 * Every millisecond of the timed window beyond Σ (settle + record), from the link traffic alone (the
 * service's own timestamps, nothing from inside the runner). With s_j the scope's acquisition starts
 * (INITiate), c_j the "complete" reply after each, a_j the last generator acknowledgement before s_j and
 * settle_j, record_j the plan's figures for its step:
 *   set-up         start of the run → first generator command
 *   first stimulus first generator command → a_0 (the first step's whole configuration)
 *   acquisition    c_j − s_j − record_j                   (the "complete" reply beyond the record)
 *   generator      a_{j+1} − c_j                           (waiting for the next setting's acknowledgement)
 *   late start     s_j − (a_j + settle_j)                   (settling is counted from a_j)
 *   re-measure     s_{j+1} − s_j when no new setting came between them (a clipped record measured again)
 *   end            commit of the last point − its c_j        (read-back, fits, store)
 * They add up to the wall time less Σ (settle + record) over the plan's steps, exactly: the window is
 * set-up + first stimulus + Σ (s_{j+1} − s_j) + the last step's part, and each interval splits as above.
 */
function scopeBreakdown(timeline: TrafficMoment[], steps: Array<{ settleS: number; integrateS: number }>, averages: number, startedMs: number, lastPointMs: number): OverheadParts | undefined {
  const starts = timeline.flatMap((t, i) => (t.role === 'scope' && t.direction === 'sent' && /^:?INIT/i.test(t.text) ? [i] : []));
  const firstSent = timeline.findIndex((t) => t.role === 'generator' && t.direction === 'sent');
  if (starts.length === 0 || firstSent < 0) return undefined;
  const completeAfter = (i: number) => timeline.findIndex((t, k) => k > i && t.role === 'scope' && t.direction === 'received');
  /** The last generator acknowledgement in (from, to), or -1. */
  const lastAckBetween = (from: number, to: number) => {
    for (let k = to - 1; k > from; k--) if (timeline[k].role === 'generator' && timeline[k].direction === 'received') return k;
    return -1;
  };
  const ms = (i: number) => timeline[i].atMs;
  const parts: OverheadParts = { setUpMs: ms(firstSent) - startedMs, firstStimulusMs: 0, acquisitionMs: [], generatorMs: [], lateMs: [], remeasureMs: 0, endMs: 0, settlingShort: 0 };
  let step = -1;
  let previousComplete = -1;
  for (const [j, start] of starts.entries()) {
    const ack = lastAckBetween(previousComplete < 0 ? firstSent - 1 : previousComplete, start);
    if (ack < 0) {
      // The same step again: the acquisition before was of no use, all of it is overhead.
      parts.remeasureMs += ms(start) - ms(starts[j - 1]);
      parts.acquisitionMs.pop();
    } else {
      step++;
      if (step === 0) parts.firstStimulusMs = ms(ack) - ms(firstSent);
      else parts.generatorMs.push(ms(ack) - ms(previousComplete));
      const late = ms(start) - (ms(ack) + steps[step].settleS * 1000);
      if (late < 0) parts.settlingShort++;
      parts.lateMs.push(late);
    }
    const complete = completeAfter(start);
    if (complete < 0) return undefined;
    parts.acquisitionMs.push(ms(complete) - ms(start) - averages * steps[step].integrateS * 1000);
    previousComplete = complete;
  }
  if (step !== steps.length - 1) return undefined; // not the plan's steps (refinement, a failed run): no exact split
  parts.endMs = lastPointMs - ms(previousComplete);
  return parts;
}

/** User+system CPU time of a process so far, ms (Linux /proc; clock ticks of 1/100 s). */
function cpuMsOfProcess(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').replace(/^.*\) /, '').split(' ');
  // After "pid (comm) ", utime and stime are the 12th and 13th fields (proc(5)); USER_HZ is 100 on Linux.
  return ((Number(fields[11]) + Number(fields[12])) * 1000) / 100;
}

function describeParts(parts: OverheadParts, points: number): string {
  const sum = (values: number[]) => values.reduce((a, b) => a + b, 0);
  const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)] ?? 0;
  const total = parts.setUpMs + parts.firstStimulusMs + sum(parts.acquisitionMs) + sum(parts.generatorMs) + sum(parts.lateMs) + parts.remeasureMs + parts.endMs;
  // In all, then mean and median per point: on a loaded machine the median shows the usual point, the mean its stalls.
  const perPoint = (values: number[]) => `${sum(values).toFixed(0).padStart(4)} (${(sum(values) / Math.max(1, values.length)).toFixed(2)}/${median(values).toFixed(2)})`;
  return [
    parts.setUpMs.toFixed(0).padStart(6),
    parts.firstStimulusMs.toFixed(0).padStart(11),
    perPoint(parts.acquisitionMs).padStart(18),
    perPoint(parts.generatorMs).padStart(18),
    perPoint(parts.lateMs).padStart(18),
    parts.remeasureMs.toFixed(0).padStart(10),
    parts.endMs.toFixed(0).padStart(6),
    `${total.toFixed(0).padStart(6)} (${(total / points).toFixed(2)})`.padStart(16),
  ].join('  ');
}

function describeNoParts(): string {
  return [6, 11, 18, 18, 18, 10, 6, 16].map((width) => '—'.padStart(width)).join('  ');
}

/** The benchmark's sweep request for one case: the case's range, measurement and averages over the shared defaults. */
function sweepRequest(caseRequest: (typeof CASES)[number]['request'], buildId: number, pointsPerDecade: number) {
  return {
    buildId, kind: 'ac' as const, pointsPerDecade, spacing: 'log' as const, amplitude: { mode: 'auto' as const },
    minCycles: 5, refine: false, operator: 'benchmark', notes: '', ...caseRequest,
  };
}

/** The ratio a sweep would reach if each point paid exactly two reply latencies and nothing else (see the file comment). */
function twoReplyFloorRatio(minimumS: number, points: number, latencyMs: number): number {
  return (minimumS + points * 2 * (latencyMs / 1000)) / minimumS;
}

/**
 * Per point, the settling and the record time from the design file and the request alone (see the file
 * comment). The shortest acquisition is the meter's 0.1 s aperture; a scope has none.
 */
function independentSteps(design: { parts: ReadonlyArray<Record<string, unknown>> }, request: ReturnType<typeof sweepRequest>): Array<{ settleS: number; recordS: number }> {
  const minIntegrationS = request.measurement === 'meter' ? 0.1 : 0;
  const value = (id: string) => Number(design.parts.find((p) => p.id === id)!.value);
  const tauS = value('RF') * value('CF');
  const settleS = Math.max(-Math.log(1e-3) * tauS, 0.01);
  const decades = Math.log10(request.to / request.from);
  const count = Math.round(decades * request.pointsPerDecade) + 1;
  return Array.from({ length: count }, (_, k) => {
    const frequencyHz = request.from * 10 ** (k / request.pointsPerDecade);
    const periods = Math.max(request.minCycles, Math.ceil(minIntegrationS * frequencyHz - 1e-9));
    return { settleS, recordS: (request.averages * periods) / frequencyHz };
  });
}

/** The physical minimum: Σ (settle + averages · acquisition). */
function physicalMinimumS(steps: Array<{ settleS: number; recordS: number }>): number {
  return steps.reduce((total, step) => total + step.settleS + step.recordS, 0);
}

/**
 * The same exchange as a scope sweep with nothing of Rolloff in it: per point a setting to the bare
 * generator and its acknowledgement, the settling, then "ACQUIRE" to the bare scope and its "complete"
 * (bare-link-instruments.ts, replies exactly as late as the simulated bench's). Its ratio is the best any
 * program can reach on this machine over a raw socket; the difference from Rolloff's ratio is Rolloff's
 * own cost (SCPI, runner, fits, store).
 */
async function bareLinkRatio(latencyMs: number, steps: Array<{ settleS: number; recordS: number }>): Promise<number> {
  const child = spawn(process.execPath, ['--import', 'tsx', join(import.meta.dirname, 'bare-link-instruments.ts'), String(latencyMs / 1000)], { stdio: ['ignore', 'pipe', 'inherit'] });
  try {
    const banner = await new Promise<string>((resolve, reject) => {
      child.stdout!.once('data', (chunk) => resolve(String(chunk)));
      child.once('exit', () => reject(new Error('the bare-link instruments exited before they listened')));
    });
    const [, generatorPort, scopePort] = /generator (\d+) scope (\d+)/.exec(banner)!;
    const generator = await lineLink(Number(generatorPort));
    const scope = await lineLink(Number(scopePort));
    const startedMs = performance.now();
    for (const step of steps) {
      await generator.ask('SET');
      await realClock.sleepS(step.settleS);
      await scope.ask(`ACQUIRE ${step.recordS}`);
    }
    const wallS = (performance.now() - startedMs) / 1000;
    generator.close();
    scope.close();
    return wallS / physicalMinimumS(steps);
  } finally {
    child.kill('SIGINT');
  }
}

/** A TCP connection that sends a line and resolves with the next line received (framed by @serialport/parser-readline). */
async function lineLink(port: number): Promise<{ ask(line: string): Promise<string>; close(): void }> {
  const socket = connect(port, '127.0.0.1');
  await once(socket, 'connect');
  socket.setNoDelay(true);
  let waiting: ((line: string) => void) | undefined;
  socket.pipe(new ReadlineParser({ delimiter: '\n', encoding: 'latin1' })).on('data', (line: string) => {
    const resolve = waiting;
    waiting = undefined;
    resolve?.(line);
  });
  return {
    ask: (line) => new Promise((resolve) => {
      waiting = resolve;
      socket.write(`${line}\n`);
    }),
    close: () => socket.destroy(),
  };
}

await main();
