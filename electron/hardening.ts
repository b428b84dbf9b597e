/**
 * Security for every session and web contents (Electron's security checklist): permissions
 * limited to clipboard writes and full screen on the app's own page, the CSP on every response of
 * the app scheme, the app scheme serving only the built renderer, and navigation, redirects, new
 * windows and webviews refused.
 */
import { protocol, session, type WebContents } from 'electron';
import { readFile } from 'node:fs/promises';
import { APP_SCHEME, appResponseHeaders, resolveAppAsset, withCsp } from './security';
import { isAppUrl } from './validate';

export interface HardeningOptions {
  /** Origin of the app's page (the app scheme, or the dev server). */
  appUrlBase: string;
  csp: string;
  /** Folder of the built renderer the app scheme serves. */
  rendererRoot: string;
}

export function hardenSessions({ appUrlBase, csp, rendererRoot }: HardeningOptions): void {
  const ses = session.defaultSession;
  // Clipboard writes (copying coefficients) and full screen are all the page may ask for.
  const allowed = (url: string, permission: string) => isAppUrl(url, appUrlBase) && (permission === 'clipboard-sanitized-write' || permission === 'fullscreen');
  ses.setPermissionRequestHandler((contents, permission, callback) => callback(allowed(contents.getURL(), permission)));
  ses.setPermissionCheckHandler((_contents, permission, requestingOrigin) => allowed(requestingOrigin, permission));
  ses.webRequest.onHeadersReceived((details, callback) => {
    if (isAppUrl(details.url, appUrlBase)) callback({ responseHeaders: withCsp(details.responseHeaders, csp) });
    else callback({});
  });
  protocol.handle(APP_SCHEME, async (request) => {
    const asset = resolveAppAsset(rendererRoot, request.url);
    if (!asset || request.method !== 'GET') return new Response('Not found', { status: 404 });
    try {
      const body = await readFile(asset.file);
      return new Response(new Uint8Array(body), { status: 200, headers: appResponseHeaders(asset.mimeType, csp) });
    } catch {
      return new Response('Not found', { status: 404 });
    }
  });
}

/** For every web contents created: no new windows, no navigation, no redirects, no webviews. */
export function hardenWebContents(contents: WebContents): void {
  contents.setWindowOpenHandler(() => ({ action: 'deny' }));
  contents.on('will-navigate', (event) => event.preventDefault());
  contents.on('will-redirect', (event) => event.preventDefault());
  contents.on('will-attach-webview', (event) => event.preventDefault());
}
