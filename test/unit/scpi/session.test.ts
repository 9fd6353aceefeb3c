/**
 * The session over the in-process transport pair, against a scripted peer.
 * Expected behaviour follows IEEE 488.2 (one query's reply read before the
 * next; §8.5 terminators; §8.7.9 blocks), SCPI-1999 (SYSTem:ERRor? until
 * 0,"No error"), or is marked common practice.
 */
import { describe, expect, it } from 'vitest';
import {
  encodeBlock,
  memoryTransportPair,
  ScpiDisconnectedError,
  ScpiInstrumentError,
  ScpiMalformedReplyError,
  ScpiSession,
  ScpiTimeoutError,
  type Transport,
} from '../../../app/scpi';
import { SeededRandom } from '../../../app/numeric';

type Responder = (line: string) => Uint8Array | string | undefined;

/** A fake instrument on the far end: answers each received line via `respond`. */
function scriptedPeer(respond: Responder, options: { maxErrorReads?: number } = {}): { session: ScpiSession; peer: Transport; received: string[] } {
  const { a, b } = memoryTransportPair('test link');
  const received: string[] = [];
  let pending = '';
  b.onData((bytes) => {
    pending += new TextDecoder('latin1').decode(bytes);
    let at: number;
    while ((at = pending.indexOf('\n')) >= 0) {
      const line = pending.slice(0, at);
      pending = pending.slice(at + 1);
      received.push(line);
      const reply = respond(line);
      if (reply !== undefined) void b.write(typeof reply === 'string' ? new TextEncoder().encode(reply) : reply);
    }
  });
  return { session: new ScpiSession(a, { timeoutS: 0.3, ...options }), peer: b, received };
}

describe('ScpiSession', () => {
  it('queries, parses *IDN? and sends writes without waiting for a reply', async () => {
    const { session, received } = scriptedPeer((line) => (line === '*IDN?' ? 'Invented Maker,Unit 7,0,2.1\n' : undefined));
    await session.write('*RST');
    expect(await session.identify()).toEqual({ manufacturer: 'Invented Maker', model: 'Unit 7', serialNumber: '0', firmware: '2.1' });
    expect(received).toEqual(['*RST', '*IDN?']);
  });

  it('accepts CR LF terminated replies (common practice on serial links)', async () => {
    const { session } = scriptedPeer(() => '+1.00000000E+03\r\n');
    expect(await session.queryReading('SOUR:FREQ?')).toEqual({ value: 1000, flag: 'ok' });
  });

  it('keeps one command in flight: concurrent queries get their own replies in order (IEEE 488.2 §6)', async () => {
    const { session, received } = scriptedPeer((line) => `${line.replace('?', '')}-reply\n`);
    const replies = await Promise.all(['A?', 'B?', 'C?'].map((q) => session.query(q)));
    expect(replies).toEqual(['A-reply', 'B-reply', 'C-reply']);
    expect(received).toEqual(['A?', 'B?', 'C?']);
  });

  it('returns block data intact, including bytes equal to LF and CR (IEEE 488.2 §8.7.9)', async () => {
    const data = new Uint8Array(1000).map((_, i) => [0x0a, 0x0d, 0x23, i & 0xff][i % 4]);
    const { session } = scriptedPeer(() => Uint8Array.from([...encodeBlock(data), 0x0a]));
    const got = await session.queryBlock('WAV:DATA?');
    expect(got.length).toBe(1000);
    expect(Buffer.from(got).equals(Buffer.from(data))).toBe(true);
  });

  it('times out with ScpiTimeoutError naming the command, and stays usable afterwards', async () => {
    const { session } = scriptedPeer((line) => (line === 'SILENT?' ? undefined : 'ok\n'));
    const started = performance.now();
    const error = await session.query('SILENT?', { timeoutS: 0.1 }).catch((e) => e);
    expect(error).toBeInstanceOf(ScpiTimeoutError);
    expect((error as ScpiTimeoutError).command).toBe('SILENT?');
    expect(performance.now() - started).toBeGreaterThanOrEqual(95);
    expect(await session.query('NEXT?')).toBe('ok');
  });

  it('drops a late reply that arrives after its timeout instead of handing it to the next query (common practice)', async () => {
    let first = true;
    const { session, peer } = scriptedPeer((line) => {
      if (line === 'SLOW?' && first) {
        first = false;
        setTimeout(() => void peer.write(new TextEncoder().encode('late\n')), 150);
        return undefined;
      }
      return 'fresh\n';
    });
    await expect(session.query('SLOW?', { timeoutS: 0.05 })).rejects.toBeInstanceOf(ScpiTimeoutError);
    await new Promise((resolve) => setTimeout(resolve, 250));
    expect(await session.query('OTHER?')).toBe('fresh');
    expect(session.traffic.recent().some((e) => e.text.includes('discarded'))).toBe(true);
  });

  it('reports a pulled link as ScpiDisconnectedError, for the query in flight and for later commands', async () => {
    const { session, peer } = scriptedPeer(() => undefined);
    const inFlight = session.query('MEAS?', { timeoutS: 5 });
    setTimeout(() => void peer.close(), 20);
    await expect(inFlight).rejects.toBeInstanceOf(ScpiDisconnectedError);
    await expect(session.write('*CLS')).rejects.toBeInstanceOf(ScpiDisconnectedError);
    expect(session.isOpen).toBe(false);
  });

  it('drains the error queue until 0,"No error" (SCPI-1999 SYSTem:ERRor?) and raises the first as ScpiInstrumentError', async () => {
    const queue = ['-113,"Undefined header"', '-222,"Data out of range"'];
    const { session } = scriptedPeer((line) => (line === 'SYSTem:ERRor?' ? `${queue.shift() ?? '0,"No error"'}\n` : undefined));
    const error = await session.throwIfErrors('FREQ 1e12').catch((e) => e);
    expect(error).toBeInstanceOf(ScpiInstrumentError);
    expect(error).toMatchObject({ code: -113, instrumentMessage: 'Undefined header', command: 'FREQ 1e12' });
    expect(await session.drainErrors()).toEqual([]);
  });

  it('bounds drainErrors when the queue never empties (common practice: no endless loop)', async () => {
    const { session, received } = scriptedPeer(() => '-350,"Queue overflow"\n', { maxErrorReads: 5 });
    const entries = await session.drainErrors();
    expect(entries).toHaveLength(5);
    expect(received.filter((r) => r === 'SYSTem:ERRor?')).toHaveLength(5);
  });

  it('reads *OPC? and *ESR? (IEEE 488.2 §10.18, §10.12, recalled)', async () => {
    const { session } = scriptedPeer((line) => (line === '*OPC?' ? '1\n' : line === '*ESR?' ? '32\n' : undefined));
    await expect(session.operationComplete()).resolves.toBeUndefined();
    expect(await session.eventStatus()).toBe(32);
  });

  it('refuses a command containing a line break before sending anything', async () => {
    const { session, received } = scriptedPeer(() => 'x\n');
    await expect(session.write('FREQ 1\n*RST')).rejects.toThrow(/line break/);
    expect(received).toEqual([]);
  });

  it('survives a few hundred random garbage replies: each query resolves or fails with a named error, never hangs or crashes (common practice)', async () => {
    const random = new SeededRandom(1234);
    let garbage = new Uint8Array(0);
    const { session } = scriptedPeer(() => garbage);
    const outcomes = { text: 0, malformed: 0, timeout: 0, other: 0 };
    for (let i = 0; i < 300; i++) {
      const length = 1 + Math.floor(random.nextUniform() * 48);
      garbage = new Uint8Array(length).map(() => Math.floor(random.nextUniform() * 256));
      // Half the time end it with LF so framing completes; otherwise it must time out cleanly.
      if (random.nextUniform() < 0.5) garbage = Uint8Array.from([...garbage, 0x0a]);
      try {
        await session.queryReading('READ?', { timeoutS: 0.02 });
        outcomes.text++;
      } catch (error) {
        if (error instanceof ScpiMalformedReplyError) outcomes.malformed++;
        else if (error instanceof ScpiTimeoutError) outcomes.timeout++;
        else outcomes.other++;
      }
    }
    expect(outcomes.other).toBe(0);
    expect(outcomes.malformed).toBeGreaterThan(50);
    // The session still works with a proper reply after the fuzzing.
    garbage = new TextEncoder().encode('+2.5E+00\n');
    await new Promise((resolve) => setTimeout(resolve, 30));
    expect(await session.queryReading('READ?')).toEqual({ value: 2.5, flag: 'ok' });
  }, 30_000);
});
