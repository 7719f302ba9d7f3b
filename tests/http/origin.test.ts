import { describe, expect, it } from 'vitest';
import { assertSameOrigin } from '@/lib/http/origin';

const h = (o: Record<string, string>) => new Headers(o);

// The checks follow the Fetch standard's Origin and Sec-Fetch-Site headers (WHATWG Fetch; W3C Fetch Metadata).
describe('same-origin check', () => {
  it('lets a same-origin browser POST through', () => {
    expect(() => assertSameOrigin('POST', h({ host: 'shop.local:3000', origin: 'http://shop.local:3000', 'sec-fetch-site': 'same-origin' }))).not.toThrow();
  });

  it('refuses a POST whose Origin is another host', () => {
    expect(() => assertSameOrigin('POST', h({ host: 'shop.local:3000', origin: 'http://evil.example' }))).toThrow(/another site/);
  });

  it('refuses a POST marked cross-site by the browser even without Origin', () => {
    expect(() => assertSameOrigin('DELETE', h({ host: 'shop.local', 'sec-fetch-site': 'cross-site' }))).toThrow(/another site/);
  });

  it('refuses the opaque "null" origin', () => {
    expect(() => assertSameOrigin('PATCH', h({ host: 'shop.local', origin: 'null' }))).toThrow(/another site/);
  });

  it('treats another port as another origin', () => {
    expect(() => assertSameOrigin('POST', h({ host: 'shop.local:3000', origin: 'http://shop.local:4000' }))).toThrow();
  });

  it('lets scripts without browser headers through, and never checks GET', () => {
    expect(() => assertSameOrigin('POST', h({ host: 'shop.local' }))).not.toThrow();
    expect(() => assertSameOrigin('GET', h({ host: 'shop.local', origin: 'http://evil.example', 'sec-fetch-site': 'cross-site' }))).not.toThrow();
  });

  it('accepts the forwarded host behind a proxy', () => {
    expect(() => assertSameOrigin('POST', h({ host: '127.0.0.1:3000', 'x-forwarded-host': 'gridproof.shop.example', origin: 'https://gridproof.shop.example' }))).not.toThrow();
  });
});
