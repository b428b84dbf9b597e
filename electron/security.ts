/**
 * Where the renderer's page comes from, and the Content Security Policy it runs under.
 *
 * Plain Node. A build serves `out/renderer/` from the privileged custom scheme `app://biquadrant/`
 * (Electron's security checklist: prefer a custom protocol to `file://`, which would give the page
 * a shared, overly broad origin). In development the page comes from electron-vite's dev server.
 * The CSP is sent as a response header by main (protocol handler and `webRequest`); the renderer
 * also carries it in a `<meta>` tag, so the browser mode has the same policy.
 */
import { extname, resolve, sep } from 'node:path';

export const APP_SCHEME = 'app';
export const APP_HOST = 'biquadrant';
export const APP_BASE = `${APP_SCHEME}://${APP_HOST}`;
export const APP_ENTRY_URL = `${APP_BASE}/index.html`;

/**
 * The policy for a build. Scripts only from the app itself (no inline script, no eval of
 * JavaScript; WebAssembly compilation is allowed for the core's response kernel); styles
 * from the app plus inline style attributes (the UI framework and the chart library set element
 * styles); images from the app, `data:` and `blob:` (chart snapshots); no plugins, frames, forms
 * or base-URL changes; `connect-src 'self'` only.
 */
export function contentSecurityPolicy(devServerUrl: string | null = null): string {
  let connect = "'self'";
  if (devServerUrl) {
    // The dev server's hot-reload socket.
    const u = new URL(devServerUrl);
    connect += ` ${u.protocol === 'https:' ? 'wss:' : 'ws:'}//${u.host}`;
  }
  return [
    "default-src 'none'",
    // 'wasm-unsafe-eval' lets the core compile its WebAssembly response kernel; it does not allow
    // eval() or new Function() of JavaScript.
    "script-src 'self' 'wasm-unsafe-eval'",
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    `connect-src ${connect}`,
    "worker-src 'self'",
    "manifest-src 'self'",
    "media-src 'none'",
    "object-src 'none'",
    "frame-src 'none'",
    "child-src 'none'",
    "base-uri 'none'",
    "form-action 'none'",
    "frame-ancestors 'none'",
  ].join('; ');
}

const MIME_TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
  '.bqplan': 'application/json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.jpg': 'image/jpeg',
  '.ico': 'image/x-icon',
  '.webp': 'image/webp',
  '.woff': 'font/woff',
  '.woff2': 'font/woff2',
  '.ttf': 'font/ttf',
  '.txt': 'text/plain; charset=utf-8',
  '.wasm': 'application/wasm',
};

export interface AppAsset {
  /** Absolute path inside the renderer folder. */
  file: string;
  mimeType: string;
}

/**
 * Maps an `app://biquadrant/...` request to a file inside `root`. Returns null for another
 * scheme or host, a malformed escape, a NUL, or any path that would leave `root` (`..`, encoded
 * separators): the handler answers those with 404.
 */
export function resolveAppAsset(root: string, requestUrl: string): AppAsset | null {
  let url: URL;
  try {
    url = new URL(requestUrl);
  } catch {
    return null;
  }
  if (url.protocol !== `${APP_SCHEME}:` || url.host !== APP_HOST || url.username || url.password) return null;
  let pathname: string;
  try {
    pathname = decodeURIComponent(url.pathname);
  } catch {
    return null;
  }
  if (pathname.includes('\0') || pathname.includes('\\')) return null;
  if (pathname === '/' || pathname === '') pathname = '/index.html';
  const base = resolve(root);
  const file = resolve(base, '.' + pathname);
  if (!file.startsWith(base + sep)) return null;
  return { file, mimeType: MIME_TYPES[extname(file).toLowerCase()] ?? 'application/octet-stream' };
}

/** Headers of every response served from the app scheme. */
export function appResponseHeaders(mimeType: string, csp: string): Record<string, string> {
  return {
    'Content-Type': mimeType,
    'Content-Security-Policy': csp,
    'X-Content-Type-Options': 'nosniff',
    'Cross-Origin-Opener-Policy': 'same-origin',
    'Cache-Control': 'no-cache',
  };
}

/** Response headers with any CSP the server sent replaced by ours (header names are case-insensitive). */
export function withCsp(headers: Record<string, string[] | string> | undefined, csp: string): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const [k, v] of Object.entries(headers ?? {})) {
    if (k.toLowerCase() === 'content-security-policy') continue;
    out[k] = Array.isArray(v) ? v : [v];
  }
  out['Content-Security-Policy'] = [csp];
  return out;
}
