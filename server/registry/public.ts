/** What other resources may use of the registry: reads of crops, ranches, fields and plantings. */
export { listCrops, getPlanting } from './plantings-db';
export { getField } from './fields-db';
export { ranchOptions } from './ranches-db';
export { registryChangesAfter, type RegistryChange } from './history-db';
