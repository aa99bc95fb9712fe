// Public API of Crowntip's estimation core: pure functions, plain JSON in and out.
export * from './light';
export { fitCalibration } from './fit';
export * from './compare';
