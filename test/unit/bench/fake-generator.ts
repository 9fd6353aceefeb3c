/**
 * A fake generator on an in-memory link: accepts every command, records what
 * it got, and answers queries (*IDN?, SYSTem:ERRor? with no error, anything
 * else by `answer`, by default a frequency of 1 kHz).
 */
import { memoryTransportPair } from '../../../app/scpi';
import { findProfile, openInstrument, type GeneratorControl, type GeneratorProfile } from '../../../app/bench';

export async function fakeGenerator(
  maxStimulusVpp: number,
  profile: GeneratorProfile = findProfile('scpi-generator', 'generator'),
  answer: (query: string) => string = () => '+1.0E+03',
): Promise<{ control: GeneratorControl; received: string[]; messages: string[] }> {
  const { a, b } = memoryTransportPair('fake generator');
  const received: string[] = [];
  /** Whole program messages as they came, one per write. */
  const messages: string[] = [];
  let pending = '';
  b.onData((bytes) => {
    pending += new TextDecoder().decode(bytes);
    let at: number;
    while ((at = pending.indexOf('\n')) >= 0) {
      const line = pending.slice(0, at);
      pending = pending.slice(at + 1);
      messages.push(line);
      // A program message may hold several units (';'), headers rooted with ':' (IEEE 488.2 §7, SCPI-1999 §6.2,
      // recalled from memory); one response message answers its queries in order.
      const units = line.split(';').map((unit) => unit.replace(/^:/, ''));
      received.push(...units);
      const replies = units
        .filter((unit) => unit.split(' ')[0].endsWith('?'))
        .map((unit) => (unit === '*IDN?' ? 'Test,Fake generator,1,1' : unit === 'SYSTem:ERRor?' ? '0,"No error"' : answer(unit)));
      if (replies.length > 0) void b.write(new TextEncoder().encode(`${replies.join(';')}\n`));
    }
  });
  const opened = await openInstrument('memory', 'generator', profile, { maxStimulusVpp, transport: a });
  return { control: opened.control, received, messages };
}
