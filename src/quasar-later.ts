import type { App } from 'vue';

/**
 * Quasar's parts that only the facilitator's screens use (the Notify and Dialog plugins and the MDI icon
 * set of its components' built-in icons), installed when the first such screen opens: a phone never
 * downloads or runs them. `main.ts` hands the app over; the router waits for `installFacilitatorQuasar`
 * before any screen that is not a phone's.
 */
let app: App | null = null;
let installing: Promise<void> | null = null;

export function keepQuasarApp(vueApp: App): void {
  app = vueApp;
}

/** Installs Notify, Dialog and the icon set once (later calls wait for the first). */
export function installFacilitatorQuasar(): Promise<void> {
  installing ??= import('./quasar-facilitator').then(({ install }) => install(app!));
  return installing;
}
