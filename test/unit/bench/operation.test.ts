/**
 * OperationRunner: a query operation's commands go out as one program message,
 * headers rooted with ':' (SCPI-1999 Vol. 1 §6.2, recalled from memory), so the
 * instrument gets the query with the commands before it in one write.
 */
import { describe, expect, it } from 'vitest';
import { OperationRunner } from '../../../app/bench/operation';
import { findProfile } from '../../../app/bench/profile-store';
import type { ScpiSession } from '../../../app/scpi/session';

/** Records what the runner sends; answers every query with `reply`. */
function recordingSession(reply: string): { session: ScpiSession; sent: string[] } {
  const sent: string[] = [];
  const session = {
    link: 'recording',
    async write(command: string) {
      sent.push(command);
    },
    async query(command: string) {
      sent.push(command);
      return reply;
    },
  } as unknown as ScpiSession;
  return { session, sent };
}

describe('OperationRunner query operations', () => {
  it('sends a several-command query operation as one rooted program message', async () => {
    const { session, sent } = recordingSession('1');
    const runner = new OperationRunner(session, findProfile('scpi-scope', 'scope'));
    expect(await runner.setThenQuery('acquire', '*OPC?')).toBe('1');
    // scpi-scope.json: "acquire": "INITiate", completed by *OPC? — a common (*) command keeps its header as it is.
    expect(sent).toEqual([':INITiate;*OPC?']);
  });

  it('sends a single-command query as written', async () => {
    const { session, sent } = recordingSession('+1.0E+00');
    const runner = new OperationRunner(session, findProfile('scpi-scope', 'scope'));
    await runner.queryText('waveformScaling', { channel: 2 });
    expect(sent).toEqual(['TRACe:SCALing? CH2']);
  });
});

describe('OperationRunner settings end at a confirmed moment', () => {
  it('with error checks on, the settings carry the error-queue read (SCPI-1999 SYSTem:ERRor?)', async () => {
    const { session, sent } = recordingSession('0,"No error"');
    const runner = new OperationRunner(session, findProfile('scpi-meter', 'meter'));
    await runner.set('acRangeAuto');
    await runner.flush();
    expect(sent).toHaveLength(1);
    expect(sent[0]).toMatch(/;:SYSTem:ERRor\?$/);
  });

  it('with error checks off, the settings end with *OPC? and the reply 1 is required (IEEE 488.2 §10.19, recalled)', async () => {
    const profile = { ...findProfile('scpi-meter', 'meter'), checkErrors: false };
    const { session, sent } = recordingSession('1');
    const runner = new OperationRunner(session, profile);
    await runner.set('acRangeAuto');
    await runner.flush();
    expect(sent).toHaveLength(1);
    expect(sent[0]).toMatch(/;\*OPC\?$/);
    const wrong = recordingSession('0');
    const refused = new OperationRunner(wrong.session, profile);
    await refused.set('acRangeAuto');
    await expect(refused.flush()).rejects.toThrow(/not the operation-complete reply 1/);
  });
});
