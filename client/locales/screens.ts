import { i18n } from '../lib/i18n';
import { screensEn } from './screens-en';
import { screensEs } from './screens-es';

// Imported by every lazily loaded screen: adds their text, in both languages.
i18n.addResources('en', screensEn);
i18n.addResources('es', screensEs);
