/** What other resources may use of field walks. */
export { assignWalk, unassignWalk } from './service';
export { listActiveAssignees, listAssignmentsBySampler, listAssignmentsOfPlanting, plannedTerminationOf, type AssignmentRow } from './assignments-db';
