/**
 * How the service asks a running sweep to pause or stop. Requests are honoured
 * between steps, so a point is either fully measured and stored or not at all.
 * A run another process has taken over is given up at once (`claimLost`): the
 * sweep then sends nothing more and writes nothing more.
 */
export class RunControl {
  private request: 'none' | 'pause' | 'stop' | 'lost' = 'none';
  private lostBecause: Error | undefined;

  requestPause(): void {
    if (this.request === 'none') this.request = 'pause';
  }

  requestStop(): void {
    if (this.request !== 'lost') this.request = 'stop';
  }

  /** The run is no longer this process's (its heartbeat renewal was refused); `reason` is thrown by the sweep. */
  claimLost(reason: Error): void {
    this.request = 'lost';
    this.lostBecause = reason;
  }

  get pending(): 'none' | 'pause' | 'stop' | 'lost' {
    return this.request;
  }

  /** Why the claim was lost, once it was. */
  get lostReason(): Error | undefined {
    return this.lostBecause;
  }
}
