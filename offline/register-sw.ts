/**
 * The service worker is a web thing: on native there is nothing to register. The web build
 * resolves ./register-sw.web.ts instead (platform file, same exports).
 */
export type ServiceWorkerOutcome = 'registered' | 'unsupported' | 'failed';

export async function registerServiceWorker(): Promise<ServiceWorkerOutcome> {
  return 'unsupported';
}
