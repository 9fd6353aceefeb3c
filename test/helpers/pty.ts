/**
 * A socat pseudo-terminal pair for tests that need a real serial port:
 * open one end with serialport as the "instrument", the other as the client.
 * The implementation lives in app/sim (the virtual bench uses it too).
 */
export { openPtyPair, type PtyPair } from '../../app/sim/pty-pair';
