/** What other features use of Today: its list query (the walk plan reads the planting from it). */
export { todayQuery } from './api';
