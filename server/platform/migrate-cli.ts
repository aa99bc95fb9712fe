// `npm run migrate`: applies pending migrations to DATABASE_URL (or DATABASE_FILE) without starting the server.
import { loadConfig } from './config';
import { migrateLatest, openConfiguredDatabase } from './database';

const config = loadConfig();
const db = openConfiguredDatabase(config);
const applied = await migrateLatest(db);
console.log(applied.length ? `Applied: ${applied.join(', ')}` : 'The database is up to date.');
await db.destroy();
