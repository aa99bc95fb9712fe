// React 18+ has useSyncExternalStore built in; react-i18next still imports the pre-18 shim
// (CommonJS). vite.config.ts points that import here so the first screen does not carry it.
export { useSyncExternalStore } from 'react';
