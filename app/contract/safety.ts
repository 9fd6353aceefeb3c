/**
 * The cautions shown on first start, in the About pane, in the CLI help and in
 * records. One text, so every surface says the same thing.
 */
export const SAFETY_NOTICE_SHORT =
  'Safety: bench instruments are mains powered and sweeps may leave circuits powered unattended. ' +
  'Respect instrument and part ratings, keep supply and signal levels within the op-amp\'s limits, ' +
  'and follow local electrical codes and your lab\'s rules. Rolloff never drives the generator above the maximum stimulus you set (Vpp; a DC level V counts as 2·|V|).';

export const SAFETY_NOTICE_POINTS: readonly string[] = [
  'Function generators, meters and scopes are mains-powered equipment. Use them as their manuals and your lab\'s rules require; defer to local electrical codes and licensed practice for anything connected to the mains.',
  'Respect the ratings of the instruments and of every part on the board. Keep supply rails and signal levels within the op-amp\'s absolute maximum ratings.',
  'Rolloff never drives the generator above the maximum stimulus you set on the Bench view (or with --max-stimulus VPP). Set it below what the circuit and the parts can take.',
  'An overnight sweep leaves a circuit powered and unattended. Do this only where your lab\'s rules allow it, with current-limited supplies, away from flammable material.',
  'The simulated bench is simulated: its readings describe a computed circuit, not your board.',
];
