// Entry point for `npm run bench` (tsx bench/run.ts). Add further benches here.
import { printTable, runCalcBench } from './calc';

printTable('Estimation core (shared/calc)', runCalcBench());
