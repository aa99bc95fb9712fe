/**
 * The yardstick of the HTTP bench: a bare Express JSON route in its own process (so the load
 * generator does not share its thread). Prints one JSON line ({url}) once it is listening.
 */
import type { AddressInfo } from 'node:net';
import express from 'express';

const app = express();
app.get('/ping', (_req, res) => {
  res.json({ ok: true });
});
const server = app.listen(0, '127.0.0.1', () => {
  console.log(JSON.stringify({ url: `http://127.0.0.1:${(server.address() as AddressInfo).port}` }));
});
process.on('SIGTERM', () => {
  server.close();
  process.exit(0);
});
