// Entry point for `npm run bench` (tsx bench/run.ts). Add further benches here.
import { printTable, runCalcBench } from './calc';
import './capture-size';
import { runHttpBench } from './http';

printTable('Estimation core (shared/calc)', runCalcBench());
await runHttpBench();
