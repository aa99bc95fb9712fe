/** What other resources may use of field walks. */
export { assignWalk, unassignWalk } from './service';
