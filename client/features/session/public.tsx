import { lazy } from 'react';

/** What other features use of the session: the signed-in user, their formatter and language. */
export { useFormat, useUser } from './api';
export { LanguageToggle } from './components/preferences';
/** Units and language; loaded when first shown, not with the first screen. */
export const PreferencesPanel = lazy(() => import('./components/preferences-panel'));
