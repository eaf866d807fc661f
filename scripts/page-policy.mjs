// The served edition's Content-Security-Policy and the HTTP headers that
// README ("Publishing on a static host") documents for hosts that send
// headers. One source for scripts/finish-page.mjs (the <meta> policy),
// scripts/static-server.mjs (TERN_HEADERS=1) and the browser test, which
// also checks that README shows exactly these values.

// What neither edition may ever do: connect anywhere (fetch, XHR,
// WebSocket, beacons), load fonts or plugins, move its base URL, submit.
const NEVER = ["connect-src 'none'", "font-src 'none'", "object-src 'none'", "base-uri 'none'", "form-action 'none'"];

/** A policy that allows these sources and nothing else. */
export function policy({ scripts, styles, images, manifest, worker }) {
  return [
    "default-src 'none'",
    `script-src ${scripts} 'wasm-unsafe-eval'`,
    `style-src ${styles}`,
    `img-src ${images}`,
    `manifest-src ${manifest}`,
    `worker-src ${worker}`,
    ...NEVER,
  ].join('; ');
}

/** The served edition's policy: its own folder's files only, no connection. */
export const SERVED_POLICY = policy({ scripts: "'self'", styles: "'self'", images: "'self' data:", manifest: "'self'", worker: "'self'" });

/**
 * Headers by file: the page (index.html) gets the policy plus what only a
 * header can say (frame-ancestors); the service worker's own policy must let
 * it fetch the build's files into its cache (connect-src 'self'); every file
 * is sent as its declared type.
 */
export function headersFor(file) {
  const common = { 'X-Content-Type-Options': 'nosniff', 'Referrer-Policy': 'no-referrer' };
  if (file.endsWith('.html')) return { ...common, 'Content-Security-Policy': `${SERVED_POLICY}; frame-ancestors 'none'` };
  if (file.endsWith('sw.js')) return { ...common, 'Content-Security-Policy': "default-src 'none'; connect-src 'self'" };
  return common;
}
