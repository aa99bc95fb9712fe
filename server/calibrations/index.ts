/** What server/app.ts mounts from calibrations. */
export { calibrationsApi } from './routes';
export { calibrationPages, calibrationUpload, CALIBRATION_UPLOAD_PATHS } from './pages';
