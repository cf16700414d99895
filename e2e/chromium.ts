/**
 * The switches Cairn starts Debian's Chromium with, for the browser tests and the phone benchmark:
 * headless in a container, nothing fetched from the network in the background.
 */
export const CHROMIUM_FLAGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--no-first-run',
  '--disable-sync',
  '--disable-quic',
];
