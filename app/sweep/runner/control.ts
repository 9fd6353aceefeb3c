/**
 * How the service asks a running sweep to pause or stop. Requests are honoured
 * between steps, so a point is either fully measured and stored or not at all.
 */
export class RunControl {
  private request: 'none' | 'pause' | 'stop' = 'none';

  requestPause(): void {
    if (this.request === 'none') this.request = 'pause';
  }

  requestStop(): void {
    this.request = 'stop';
  }

  get pending(): 'none' | 'pause' | 'stop' {
    return this.request;
  }
}
