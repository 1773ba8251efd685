/**
 * Registers the service worker that keeps the built app for offline use (sw.js, written by the build:
 * scripts/offline/offlinePlugin.mjs). Only in the production build and where the browser has service workers;
 * a failure leaves the app working online.
 */
export function serviceWorkerRegister(): void {
  if (!import.meta.env.PROD || typeof navigator === 'undefined' || !('serviceWorker' in navigator)) return;
  navigator.serviceWorker.register(new URL('./sw.js', document.baseURI), { scope: './' }).catch((e: unknown) => {
    console.warn(`offline use is not available: ${e instanceof Error ? e.message : String(e)}`);
  });
}
