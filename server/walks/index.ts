/** What server/app.ts mounts from field walks: the capture API, the today list and the review pages. */
export { walksApi } from './routes';
export { todayApi } from './today-routes';
export { walkReviewPages } from './review-pages';
export { tissueNApi } from './tissue-n-routes';
export { assignmentPages } from './assignment-pages';
