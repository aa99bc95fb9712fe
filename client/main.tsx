import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { startLanguage } from './lib/i18n';
import { Providers } from './app/providers';
import { App } from './app/router';
import { registerServiceWorker } from './app/service-worker';
import './styles/capture.css';

const root = document.getElementById('root');
if (!root) throw new Error('#root is missing from index.html');

// The text of the language the app opens in arrives first (a small chunk; precached offline).
void startLanguage()
  .catch(() => undefined)
  .finally(() => {
    createRoot(root).render(
      <StrictMode>
        <Providers>
          <App />
        </Providers>
      </StrictMode>,
    );
  });

registerServiceWorker();
