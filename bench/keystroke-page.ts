// Entry bundled by bench/first-load.ts and run inside Chromium: times bench/keystroke.ts there.
import { makeKeystroke, timeKeystroke } from './keystroke';

export const run = () => timeKeystroke(makeKeystroke());
