/** What server/main.ts starts from reminders: the daily job. */
export { scheduleDailyJobs } from './daily';
