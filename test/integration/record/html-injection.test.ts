/**
 * Text from the store cannot inject markup into an HTML record: hostile labels,
 * notes, event messages and instrument replies are put in, the file is parsed
 * by a real browser (Debian's Chromium through playwright-core), and the DOM is
 * checked for script elements, event-handler attributes and external resources.
 * Run data: fixture theory plus seeded noise (test/unit/record/fixtures.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser } from 'playwright-core';
import { buildRunRecord, buildComparisonRecord, renderRecord } from '../../../app/record';
import { acRunDetail, comparisonFixture, fixtureBuild, FIXTURE_DESIGN } from '../../unit/record/fixtures';
import { CHROMIUM_ARGS, CHROMIUM_PATH } from '../../e2e/helpers/chromium';
import { requireTool } from '../../helpers/required-tool';

const hasChromium = requireTool('chromium');

const HOSTILE = [
  '<script>alert(1)</script>',
  `"&'<>`,
  '<img src=x onerror="alert(2)">',
  '"><svg onload=alert(3)>',
  "'; background:url(http://127.0.0.1/x); '",
  '</title><script src="http://127.0.0.1/evil.js"></script>',
  '<!-- <a href="javascript:alert(4)">x</a> -->',
];

let browser: Browser;

beforeAll(async () => {
  if (hasChromium) browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS });
});

afterAll(async () => {
  await browser?.close();
});

function hostileRecord() {
  const detail = acRunDetail();
  detail.request.notes = HOSTILE.join(' | ');
  detail.request.operator = HOSTILE[0];
  detail.designName = HOSTILE[5];
  detail.events.push({ at: '2026-11-30T10:03:00.000Z', level: 'error', message: HOSTILE[2] });
  detail.verdict = { pass: false, reasons: [HOSTILE[3]] };
  detail.bench = detail.bench.map((i) => ({ ...i, address: HOSTILE[4], identity: { ...i.identity, model: HOSTILE[1], firmware: HOSTILE[6] } }));
  const build = fixtureBuild({ label: HOSTILE[0], notes: HOSTILE.join('\n') });
  const design = { ...FIXTURE_DESIGN, description: HOSTILE[2], parts: [...FIXTURE_DESIGN.parts, { id: HOSTILE[3], type: 'resistor', nodes: ['a', HOSTILE[0]], value: 1 }] };
  return buildRunRecord(detail, { design, build, generatedAt: '2026-12-01T12:00:00.000Z' });
}

interface DomFindings {
  scripts: number;
  handlerAttributes: string[];
  externalUrls: string[];
  texts: string;
  dialogs: number;
}

async function inspect(html: string): Promise<DomFindings> {
  const context = await browser.newContext({ javaScriptEnabled: true });
  const page = await context.newPage();
  let dialogs = 0;
  page.on('dialog', async (dialog) => {
    dialogs++;
    await dialog.dismiss();
  });
  // Any network request at all would mean an external resource; none may be made.
  const requests: string[] = [];
  await page.route('**/*', async (route) => {
    requests.push(route.request().url());
    await route.abort();
  });
  await page.setContent(html, { waitUntil: 'load' });
  const findings = await page.evaluate(() => {
    const all = Array.from(document.querySelectorAll('*'));
    return {
      scripts: document.querySelectorAll('script').length,
      handlerAttributes: all.flatMap((el) => Array.from(el.attributes).filter((a) => a.name.toLowerCase().startsWith('on')).map((a) => `${el.tagName}.${a.name}`)),
      externalUrls: all.flatMap((el) => ['src', 'href', 'xlink:href', 'action', 'data'].map((n) => el.getAttribute(n)).filter((v): v is string => v !== null)),
      texts: document.body.innerText,
    };
  });
  await context.close();
  return { ...findings, externalUrls: [...findings.externalUrls, ...requests], dialogs };
}

describe.skipIf(!hasChromium)('HTML record escaping (parsed by Chromium)', () => {
  it('hostile store text stays text: no script, no handlers, no external URLs, no dialogs', async () => {
    const html = new TextDecoder().decode((await renderRecord(hostileRecord(), 'html')).bytes);
    const found = await inspect(html);
    expect(found.scripts).toBe(0);
    expect(found.handlerAttributes).toEqual([]);
    expect(found.externalUrls).toEqual([]);
    expect(found.dialogs).toBe(0);
    // The text itself survives, visibly, exactly as typed.
    expect(found.texts).toContain('<script>alert(1)</script>');
    expect(found.texts).toContain(`"&'<>`);
    expect(found.texts).toContain('<img src=x onerror="alert(2)">');
  });

  it('the same holds for a comparison record with a hostile build label', async () => {
    const { comparison, contexts } = comparisonFixture(12);
    contexts.get(15)!.build.label = '<script>alert(5)</script>';
    comparison.figureTable[1].label = '<b onmouseover=alert(6)>x</b>';
    const record = buildComparisonRecord(comparison, { runs: contexts, generatedAt: '2026-12-01T12:00:00.000Z' });
    const found = await inspect(new TextDecoder().decode((await renderRecord(record, 'html')).bytes));
    expect(found.scripts).toBe(0);
    expect(found.handlerAttributes).toEqual([]);
    expect(found.texts).toContain('<script>alert(5)</script>');
  });

  it('the check can fail: an unescaped script would be found (guards against a vacuous pass)', async () => {
    const found = await inspect('<!DOCTYPE html><html><body><p>ok</p><script>void 0</script><img src="x.png" onerror="void 0"></body></html>');
    expect(found.scripts).toBe(1);
    expect(found.handlerAttributes).toEqual(['IMG.onerror']);
    expect(found.externalUrls.length).toBeGreaterThan(0);
  });
});
