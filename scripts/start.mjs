/*
 * `npm start`: runs the built server (dist-server/main.js), building it first when it is missing
 * or older than any of its sources (scripts/build-server.mjs). The server runs in this process:
 * no TypeScript compiler at run time.
 */
import { pathToFileURL } from 'node:url';
import { SERVER_BUILD, buildServer, staleBecause } from './build-server.mjs';

const stale = staleBecause();
if (stale) {
  console.log(`Building the server (${stale === 'missing' ? 'no build yet' : stale})…`);
  await buildServer();
}
process.setSourceMapsEnabled(true); // errors name the TypeScript source lines
await import(pathToFileURL(SERVER_BUILD).href);
