/** What server/app.ts mounts from credit registers. */
export { registersApi } from './routes';
export { registerPages } from './pages';
