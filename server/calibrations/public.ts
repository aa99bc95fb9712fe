/** What other resources may use of calibrations: the calibration a crop's walks are estimated with. */
export { assignedCalibrationFor, getCalibration } from './db';
