/**
 * Registers the service worker that precaches the capture app (built by vite-plugin-pwa, served by
 * the server at /capture/sw.js with scope /capture). Service workers need a secure context:
 * HTTPS, or localhost; on plain HTTP over a farm network the app still works online, and walks
 * are still kept on the phone (IndexedDB), but it cannot open without signal.
 */
export const SW_URL = '/capture/sw.js';
export const SW_SCOPE = '/capture';

export function registerServiceWorker() {
  if (import.meta.env.DEV || !('serviceWorker' in navigator) || !window.isSecureContext) return;
  const register = () => {
    navigator.serviceWorker.register(SW_URL, { scope: SW_SCOPE }).catch(() => {
      // No worker: the app still works online; nothing else depends on it.
    });
  };
  if (document.readyState === 'complete') register();
  else window.addEventListener('load', register, { once: true });
}
