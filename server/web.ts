/**
 * Serves the exported Expo web build (WEB_DIST) beside the API on one port.
 *  - `.wasm` as application/wasm (WebAssembly streaming compile requires it);
 *  - index.html, every other .html and any service-worker script: `Cache-Control: no-cache`
 *    (always revalidated, so a new deploy is picked up at once);
 *  - content-hashed assets (`/_expo/static/…`, `name.<hex hash>.ext`): cached for a year, immutable;
 *  - any other GET outside /api that names no file: index.html (single-page app routing).
 */
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { basename, extname, join, relative, sep } from 'node:path';
import express, { type RequestHandler, type Response } from 'express';

const NO_CACHE = 'no-cache';
const IMMUTABLE = 'public, max-age=31536000, immutable';
const SHORT = 'public, max-age=3600';

const SERVICE_WORKER = /^(sw|service-?worker)([.-][\w-]+)?\.m?js$/i;
const HASHED_NAME = /[.-][0-9a-f]{16,}\.[a-z0-9]+$/i;

export function cacheControlFor(relPath: string): string {
  const p = relPath.split(sep).join('/').replace(/^\/+/, '');
  const name = basename(p);
  if (extname(name).toLowerCase() === '.html' || SERVICE_WORKER.test(name)) return NO_CACHE;
  if (p.startsWith('_expo/static/') || HASHED_NAME.test(name)) return IMMUTABLE;
  return SHORT;
}

export function webDistPresent(dir: string | undefined): dir is string {
  return !!dir && existsSync(join(dir, 'index.html')) && statSync(dir).isDirectory();
}

function htmlFiles(dir: string, limit = 2000): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      if (out.length >= limit) return;
      const p = join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.name.endsWith('.html')) out.push(p);
    }
  };
  walk(dir);
  return out;
}

/**
 * CSP source expressions ('sha256-…') of the inline scripts in the build's HTML files, e.g.
 * Expo Router's hydration flag, so they may run without allowing 'unsafe-inline'.
 */
export function inlineScriptHashes(dir: string): string[] {
  const hashes = new Set<string>();
  const re = /<script\b([^>]*)>([\s\S]*?)<\/script>/gi;
  for (const file of htmlFiles(dir)) {
    const html = readFileSync(file, 'utf8');
    for (const m of html.matchAll(re)) {
      if (/\bsrc\s*=/i.test(m[1]) || m[2].length === 0) continue;
      hashes.add(`'sha256-${createHash('sha256').update(m[2], 'utf8').digest('base64')}'`);
    }
  }
  return [...hashes].sort();
}

export function webRouter(dir: string): RequestHandler[] {
  const setHeaders = (res: Response, path: string) => {
    if (path.toLowerCase().endsWith('.wasm')) res.setHeader('Content-Type', 'application/wasm');
    res.setHeader('Cache-Control', cacheControlFor(relative(dir, path)));
  };
  const statics = express.static(dir, {
    index: ['index.html'],
    extensions: ['html'],
    cacheControl: false,
    etag: true,
    lastModified: true,
    redirect: false,
    setHeaders,
  });
  const indexFile = join(dir, 'index.html');
  const spaFallback: RequestHandler = (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    if (req.path === '/api' || req.path.startsWith('/api/')) return next();
    // A missing file (it has an extension) stays a 404; a route path gets the app.
    const ext = extname(req.path);
    if (ext && ext !== '.html') return next();
    res.setHeader('Cache-Control', NO_CACHE);
    res.sendFile(indexFile, { headers: { 'Cache-Control': NO_CACHE }, cacheControl: false });
  };
  return [statics, spaFallback];
}
