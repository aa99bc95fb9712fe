/** What other resources may use of registers: fields with their plantings and latest walk, as registers read them. */
export { fieldsWithPlanting, latestWalkStatuses, type FieldWithPlanting } from './inputs-db';
