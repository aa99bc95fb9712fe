import { i18n } from '../lib/i18n';
import { screensEn } from './screens-en';
import { screensEs } from './screens-es';

// Imported by every lazily loaded screen: adds their text, in both languages, to i18next.
i18n.addResourceBundle('en', 'translation', screensEn, true, false);
i18n.addResourceBundle('es', 'translation', screensEs, true, false);
