/**
 * The browser contract: the shapes of what the server sends the islands. Server modules build
 * these types; islands read them as `Wire<T>`. Importable from both sides: imports nothing from
 * the server or the database.
 */
export * from './wire';
export * from './reviews';
export * from './sheets';
export * from './teams';
export * from './log-uploads';
export * from './log-comparisons';
export * from './matrix';
export * from './search';
export * from './non-finite-json';
