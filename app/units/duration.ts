/** Durations for people planning bench time: the one formatter for plans, ETAs and progress. */

/** "0.4 s", "45 s", "3 min 05 s", "2 h 10 min"; "—" for an unknown duration. */
export function formatDuration(seconds: number | undefined): string {
  if (seconds === undefined || !Number.isFinite(seconds) || seconds < 0) return '—';
  // Below 10 s a tenth matters (fast simulated-bench sweeps); above it whole seconds do.
  if (seconds < 9.95) return `${seconds.toFixed(1)} s`;
  const whole = Math.round(seconds);
  if (whole < 60) return `${whole} s`;
  const minutes = Math.floor(whole / 60);
  if (minutes < 60) return `${minutes} min ${String(whole % 60).padStart(2, '0')} s`;
  return `${Math.floor(minutes / 60)} h ${String(minutes % 60).padStart(2, '0')} min`;
}
