/**
 * Registers /sw.js (written by scripts/service-worker.mjs into the web export) once the page has
 * loaded, so the app shell loads with no network next time. Skipped in development (Metro's
 * dev server has no sw.js) and where service workers are not available (insecure context).
 */
export type ServiceWorkerOutcome = 'registered' | 'unsupported' | 'failed';

export const SERVICE_WORKER_URL = '/sw.js';

export function registerServiceWorker(): Promise<ServiceWorkerOutcome> {
  if (typeof window === 'undefined' || typeof navigator === 'undefined' || !('serviceWorker' in navigator)) {
    return Promise.resolve('unsupported');
  }
  if (process.env.NODE_ENV !== 'production') return Promise.resolve('unsupported');
  const register = async (): Promise<ServiceWorkerOutcome> => {
    try {
      await navigator.serviceWorker.register(SERVICE_WORKER_URL, { scope: '/' });
      return 'registered';
    } catch (e) {
      console.warn('Trueround: the offline app shell could not be installed', e);
      return 'failed';
    }
  };
  if (document.readyState === 'complete') return register();
  return new Promise((resolve) => window.addEventListener('load', () => void register().then(resolve), { once: true }));
}
