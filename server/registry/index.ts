/** What server/app.ts mounts from the registry: ranches, fields, plantings, crops, history, import. */
export { ranchesApi } from './ranches-routes';
export { fieldsApi } from './fields-routes';
export { boundaryProposalsApi } from './boundary-proposals-routes';
export { boundaryProposalPages } from './boundary-proposals-pages';
export { plantingsApi } from './plantings-routes';
export { cropsApi } from './crops-routes';
export { historyApi } from './history-routes';
export { registryPages, boundaryUpload, FIELD_FORM_PATHS } from './pages';
export { seasonPages } from './season-pages';
export { historyPages } from './history-pages';
export { registryImportPages, importUploadBeforeCsrf, IMPORT_UPLOAD_PATHS } from './import/pages';
