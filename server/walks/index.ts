/** What server/app.ts mounts from field walks: the capture API, the today list, assignments and the review pages. */
export { walksApi } from './routes';
export { todayApi } from './today-routes';
export { walkReviewPages } from './review-pages';
export { tissueNApi } from './tissue-n-routes';
export { assignmentPages } from './assignment-pages';
export { assignmentsApi } from './assignments-routes';
