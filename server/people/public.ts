/** What other resources may use of people: the user, their units, and the organisation's users. */
export { getUser, listUsers, type Units, type User } from './db';
