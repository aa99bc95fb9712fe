// One formatter for every figure and verdict sentence: pure, no I/O, the same in the browser and on
// the server. Values in SI; words in the reader's language ('en' | 'es') and units ('us' | 'metric').
export * from './figures';
export * from './messages';
export * from './walk';
