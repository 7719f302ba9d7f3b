/**
 * The built pages load nothing from another host: every URL in the served HTML (src, href, action, srcset,
 * content of <link>/<script>/<img>) and in every built CSS file (url(), @import) is same-origin or relative.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, inject, it } from 'vitest';
import { ROOT } from '@/lib/cli/start';

const baseUrl = () => inject('baseUrl');

function cssFiles(dir: string): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir)) {
    const p = join(dir, e);
    if (statSync(p).isDirectory()) out.push(...cssFiles(p));
    else if (p.endsWith('.css')) out.push(p);
  }
  return out;
}

/** Hosts named by absolute or protocol-relative URLs in HTML attributes. */
function foreignInHtml(html: string, ownHost: string): string[] {
  const found: string[] = [];
  for (const m of html.matchAll(/\b(?:src|href|action|srcset|poster|data)\s*=\s*"([^"]*)"/gi)) {
    for (const part of (m[1] ?? '').split(',')) {
      const url = part.trim().split(/\s+/)[0] ?? '';
      const abs = /^(?:[a-z][a-z0-9+.-]*:)?\/\//i.exec(url);
      if (abs) {
        const host = new URL(url.startsWith('//') ? `http:${url}` : url).host;
        if (host !== ownHost) found.push(url);
      }
    }
  }
  return found;
}

/** URLs in CSS that point at another host (url(), @import). */
function foreignInCss(css: string): string[] {
  const found: string[] = [];
  for (const m of css.matchAll(/url\(\s*['"]?([^'")]+)['"]?\s*\)|@import\s+['"]([^'"]+)['"]/gi)) {
    const url = (m[1] ?? m[2] ?? '').trim();
    if (/^(?:https?:)?\/\//i.test(url)) found.push(url);
  }
  return found;
}

describe('self-contained build', () => {
  it('serves pages whose HTML references no other host', async () => {
    const own = new URL(baseUrl()).host;
    for (const path of ['/sign-in', '/sign-up', '/sign-out']) {
      const res = await fetch(baseUrl() + path);
      expect(res.status, path).toBe(200);
      const html = await res.text();
      expect(html).toContain('/_next/static/');
      expect(foreignInHtml(html, own), path).toEqual([]);
    }
  });

  it('ships CSS that references no other host and carries its own fonts', async () => {
    // The stylesheets the sign-in page links, fetched from the server, plus every built CSS file on disk.
    const html = await (await fetch(baseUrl() + '/sign-in')).text();
    const linked = [...html.matchAll(/<link[^>]+rel="stylesheet"[^>]*href="([^"]+)"/g)].map((m) => m[1]!);
    expect(linked.length).toBeGreaterThan(0);
    const served = await Promise.all(linked.map(async (href) => (await fetch(new URL(href, baseUrl()))).text()));
    const onDisk = cssFiles(join(ROOT, '.next', 'static')).map((f) => readFileSync(f, 'utf8'));
    const all = [...served, ...onDisk].join('\n');
    expect(foreignInCss(all)).toEqual([]);
    expect(all).toMatch(/Atkinson Hyperlegible Next/);
    expect(all).toMatch(/IBM Plex Mono/);
    expect(all).toMatch(/url\([^)]*\.woff2/);
  });

  it('finds a foreign host when there is one (the checks can fail)', () => {
    expect(foreignInHtml('<link href="https://fonts.example/x.css"><img src="//cdn.example/a.png">', 'localhost:3000')).toHaveLength(2);
    expect(foreignInCss('@font-face{src:url(https://cdn.example/f.woff2)}')).toHaveLength(1);
    expect(foreignInHtml('<a href="/beds">x</a><img src="/_next/static/a.png">', 'localhost:3000')).toEqual([]);
  });
});
