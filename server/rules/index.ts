/** What server/app.ts mounts from the credit rule. */
export { rulesApi } from './routes';
export { rulesPages } from './pages';
