/** The seven views and their keyboard shortcuts (Alt+1 … Alt+6, Alt+0 for About; Alt keeps Ctrl+digit for the browser's tabs). */
export const VIEWS = [
  { id: 'bench', title: 'Bench', key: '1' },
  { id: 'design', title: 'Design', key: '2' },
  { id: 'sweep', title: 'Sweep', key: '3' },
  { id: 'history', title: 'History', key: '4' },
  { id: 'compare', title: 'Compare', key: '5' },
  { id: 'record', title: 'Record', key: '6' },
  { id: 'about', title: 'About', key: '0' },
] as const;

export type ViewId = (typeof VIEWS)[number]['id'];

export function viewForShortcut(event: { altKey: boolean; ctrlKey: boolean; metaKey: boolean; key: string; code?: string }): ViewId | undefined {
  if (!event.altKey || event.ctrlKey || event.metaKey) return undefined;
  // On some layouts Alt+digit yields another character; the physical key code still says which digit.
  const digit = /^Digit(\d)$/.exec(event.code ?? '')?.[1] ?? event.key;
  return VIEWS.find((view) => view.key === digit)?.id;
}
