/** What other features use of the estimate: the live estimate, its panels and the stored verdict's view. */
export { liveEstimate, type LiveEstimate } from './live';
export { EstimateFigures, EstimatePanel } from './components/estimate-panel';
export { EstimateSummary, readerOf } from './components/estimate-summary';
export { storedVerdictView } from './verdict-view';
