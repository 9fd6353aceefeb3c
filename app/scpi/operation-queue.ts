/**
 * Runs async operations one after another, in the order asked, whether the
 * one before succeeded or failed: a link carries one exchange at a time
 * (IEEE 488.2 §6 for the session; one operation per link for VXI-11 and
 * the usbtmc driver).
 */
export class OperationQueue {
  private tail: Promise<unknown> = Promise.resolve();

  run<T>(operation: () => Promise<T>): Promise<T> {
    const result = this.tail.then(operation, operation);
    this.tail = result.catch(() => undefined);
    return result;
  }
}
