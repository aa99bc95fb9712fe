/** What other features use of data entry: the walk drafts kept on the phone. */
export { newDraft, saveDraft, DEFAULT_STOPS, type WalkDraft } from './drafts';
export { listDrafts } from './draft-list';
