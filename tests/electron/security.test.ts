/** The app scheme's file mapping and the CSP (electron/security.ts). */
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { appResponseHeaders, contentSecurityPolicy, resolveAppAsset, withCsp } from '../../electron/security';

const root = resolve('/srv/app/out/renderer');

describe('resolveAppAsset', () => {
  it('maps app://biquadrant paths into the renderer folder with a content type', () => {
    expect(resolveAppAsset(root, 'app://biquadrant/index.html')).toEqual({ file: join(root, 'index.html'), mimeType: 'text/html; charset=utf-8' });
    expect(resolveAppAsset(root, 'app://biquadrant/')).toEqual({ file: join(root, 'index.html'), mimeType: 'text/html; charset=utf-8' });
    expect(resolveAppAsset(root, 'app://biquadrant/assets/index-abc.js?v=1')).toEqual({
      file: join(root, 'assets', 'index-abc.js'),
      mimeType: 'text/javascript; charset=utf-8',
    });
    expect(resolveAppAsset(root, 'app://biquadrant/assets/my%20font.woff2')?.file).toBe(join(root, 'assets', 'my font.woff2'));
    expect(resolveAppAsset(root, 'app://biquadrant/blob.bin')?.mimeType).toBe('application/octet-stream');
  });

  it('refuses anything that would leave the folder, other hosts and schemes, and malformed escapes', () => {
    // Dot segments in the URL itself are resolved by the URL parser, at the root at most.
    expect(resolveAppAsset(root, 'app://biquadrant/../secret.txt')?.file).toBe(join(root, 'secret.txt'));
    expect(resolveAppAsset(root, 'app://biquadrant/%2e%2e/secret.txt')?.file).toBe(join(root, 'secret.txt'));
    // Encoded separators only become ".." after decoding: refused.
    for (const url of [
      'app://biquadrant/assets/%2e%2e%2f%2e%2e%2fsecret.txt',
      'app://biquadrant/..%5c..%5csecret.txt',
      'app://biquadrant/a%00b.js',
      'app://biquadrant/%E0%A4%A',
      'app://other/index.html',
      'file:///etc/passwd',
      'https://biquadrant/index.html',
      'not a url',
    ]) {
      expect(resolveAppAsset(root, url), url).toBeNull();
    }
  });
});

describe('content security policy', () => {
  it('allows scripts only from the app (WebAssembly compile allowed, no inline, no eval) and refuses plugins, frames, forms', () => {
    const csp = contentSecurityPolicy();
    const directives = Object.fromEntries(csp.split('; ').map((d) => [d.split(' ')[0], d.split(' ').slice(1)]));
    expect(directives['default-src']).toEqual(["'none'"]);
    expect(directives['script-src']).toEqual(["'self'", "'wasm-unsafe-eval'"]);
    expect(csp).not.toContain("'unsafe-eval'");
    expect(directives['script-src']).not.toContain("'unsafe-inline'");
    expect(directives['object-src']).toEqual(["'none'"]);
    expect(directives['frame-src']).toEqual(["'none'"]);
    expect(directives['base-uri']).toEqual(["'none'"]);
    expect(directives['form-action']).toEqual(["'none'"]);
    expect(directives['connect-src']).toEqual(["'self'"]);
  });

  it('in development adds only the dev server socket to connect-src', () => {
    const dev = contentSecurityPolicy('http://localhost:5173/');
    expect(dev).toContain("connect-src 'self' ws://localhost:5173");
    expect(dev.replace(" ws://localhost:5173", '')).toBe(contentSecurityPolicy());
  });

  it('withCsp replaces a server CSP whatever its letter case; headers carry it', () => {
    const out = withCsp({ 'content-security-policy': ["default-src *"], 'Content-Type': 'text/html' }, 'X');
    expect(out).toEqual({ 'Content-Type': ['text/html'], 'Content-Security-Policy': ['X'] });
    expect(appResponseHeaders('text/html', 'X')['Content-Security-Policy']).toBe('X');
    expect(appResponseHeaders('text/html', 'X')['X-Content-Type-Options']).toBe('nosniff');
  });
});
