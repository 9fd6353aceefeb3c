/** IPC channel names shared by the main process and the preload. */
export const CALL_CHANNEL = 'rolloff:call';
export const EVENT_CHANNEL = 'rolloff:event';
