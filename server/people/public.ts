/** What other resources may use of people: the user, their units, the organisation's users and who may be asked to walk. */
export { getUser, listAssignableSamplers, listUsers, type Units, type User } from './db';
