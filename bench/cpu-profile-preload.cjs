/*
 * Loaded with NODE_OPTIONS=--require by bench/profile.ts (Node refuses --cpu-prof there): the
 * first SIGUSR2 starts V8's CPU profiler in this process, the second writes the profile to
 * $CPU_PROFILE_DIR/<pid>.cpuprofile, so a profile covers exactly the load window.
 */
const fs = require('node:fs');
const path = require('node:path');
const inspector = require('node:inspector');

const dir = process.env.CPU_PROFILE_DIR;
if (dir) {
  let session = null;
  process.on('SIGUSR2', () => {
    if (!session) {
      session = new inspector.Session();
      session.connect();
      session.post('Profiler.enable', () => session.post('Profiler.setSamplingInterval', { interval: 200 }, () => session.post('Profiler.start')));
      return;
    }
    const s = session;
    session = null;
    s.post('Profiler.stop', (err, res) => {
      if (!err) fs.writeFileSync(path.join(dir, `${process.pid}.cpuprofile`), JSON.stringify(res.profile));
      s.disconnect();
    });
  });
}
