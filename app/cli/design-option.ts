/**
 * How a command is told which design: one rule everywhere (sweep, schedule,
 * build, sim, theory). A number is a stored design's id (rolloff design list);
 * anything else is the path of a design file (write ./12 for a file named 12).
 */
import { readFileSync } from 'node:fs';
import { UserError, ValidationError } from '../errors';
import type { LocalService } from '../service/local-service';
import type { OptionSpec } from './args';

export const DESIGN_PLACEHOLDER = 'ID|FILE';

export function designOption(description: string): OptionSpec {
  return { name: 'design', kind: 'string', placeholder: DESIGN_PLACEHOLDER, description: `${description}: a stored design's id (rolloff design list) or a design file` };
}

export type DesignChoice = { storedId: number; where: string } | { path: string; content: unknown; where: string };

/** Reads what the user gave: a stored id, or a design file's JSON (read and parsed here, checked by the service). */
export function chooseDesign(text: string, where = '--design'): DesignChoice {
  if (/^\d+$/.test(text.trim())) return { storedId: Number(text), where };
  return { path: text, content: readDesignFile(text, where), where };
}

/** The stored design's id: the one given, or a file's design stored now. */
export async function storedDesignId(service: LocalService, choice: DesignChoice): Promise<number> {
  if ('storedId' in choice) return (await storedDesign(service, choice)).id;
  return (await service.saveDesign(choice.content)).id;
}

/** The design's JSON: a file's content, or a stored design's. */
export async function designContent(service: LocalService, choice: DesignChoice): Promise<unknown> {
  return 'storedId' in choice ? (await storedDesign(service, choice)).design : choice.content;
}

/** The stored designs that are this choice: the one with its id, or those stored with exactly a file's content. */
export async function matchingDesignIds(service: LocalService, choice: DesignChoice): Promise<number[]> {
  if ('storedId' in choice) return [(await storedDesign(service, choice)).id];
  const text = JSON.stringify(choice.content);
  const ids = (await service.listDesigns()).filter((d) => JSON.stringify(d.design) === text).map((d) => d.id);
  if (ids.length === 0) throw new ValidationError(choice.where, `no stored design is ${choice.path}`, `Store it with: rolloff design add ${choice.path}`);
  return ids;
}

async function storedDesign(service: LocalService, choice: { storedId: number; where: string }) {
  const found = (await service.listDesigns()).find((d) => d.id === choice.storedId);
  if (!found) throw new ValidationError(choice.where, `no stored design ${choice.storedId}`, 'See rolloff design list for the ids, or give a design file.');
  return found;
}

/** A design file's JSON; file and JSON errors name the file and say what to do. */
export function readDesignFile(path: string, where: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a directory' : code === 'EACCES' ? 'permission denied' : String((error as Error).message);
    throw new UserError(`${where}: cannot read design file ${path}: ${reason}`, 'Give a stored design\'s id (rolloff design list) or the path of a design JSON file; "rolloff template ID --out FILE" writes one.');
  }
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new ValidationError(`${where} ${path}`, `is not valid JSON (${(error as Error).message})`, 'Fix the syntax (a design file is one JSON object), or make one with rolloff template.');
  }
}
