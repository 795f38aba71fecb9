/** Debian's Chromium, headless, as every browser test starts it (never a downloaded browser). */
export const CHROMIUM_PATH = '/usr/bin/chromium';

/** No sandbox (root in CI), no GPU, no network chatter: this machine has no network to talk to. */
export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];
