/** SCPI message layer: transports, addresses, the session and its named errors. */
export * from './errors';
export * from './transport';
export * from './address';
export * from './reading';
export * from './identity';
export * from './error-entry';
export * from './block';
export * from './reply-framer';
export * from './traffic-log';
export * from './session';
export * from './memory-transport';
export * from './tcp-transport';
export * from './serial-transport';
export * from './vxi11/vxi11-transport';
export * from './open-transport';
export * from './connect';
export * from './ports';
