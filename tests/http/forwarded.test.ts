/**
 * The client address behind our own proxies. The rule is the usual rightmost-trusted one (common practice;
 * the X-Forwarded-For format and the advice to count trusted hops from the right are described on MDN's
 * X-Forwarded-For page): each proxy appends the address it received from, so only the last `n` entries were
 * written by proxies we run and everything left of them is whatever the client sent. Addresses are from the
 * documentation ranges of RFC 5737 (IPv4) and RFC 3849 (IPv6).
 */
import { describe, expect, it } from 'vitest';
import { canonicalAddress, clientAddress, clientScheme, normaliseForwarding, trustedHopsFrom } from '@/lib/http/forwarded.mjs';

describe('client address', () => {
  it('is the socket peer when no proxy is trusted, whatever the client wrote', () => {
    expect(clientAddress('203.0.113.66', '198.51.100.7', 0)).toBe('198.51.100.7');
    expect(clientAddress(['203.0.113.66', '203.0.113.67'], '198.51.100.7', 0)).toBe('198.51.100.7');
    expect(clientAddress(undefined, '198.51.100.7', 0)).toBe('198.51.100.7');
  });

  it('is the entry our one proxy appended, not one the client put before it', () => {
    // client sent "X-Forwarded-For: 203.0.113.66"; our proxy at 10.0.0.2 appended the client's real address
    expect(clientAddress('203.0.113.66, 192.0.2.44', '10.0.0.2', 1)).toBe('192.0.2.44');
    expect(clientAddress('192.0.2.44', '10.0.0.2', 1)).toBe('192.0.2.44');
  });

  it('counts two hops from the right behind a load balancer and a proxy', () => {
    expect(clientAddress('203.0.113.66, 192.0.2.44, 10.0.0.9', '10.0.0.2', 2)).toBe('192.0.2.44');
  });

  it('falls back to the leftmost entry when the chain is shorter than the hops promised', () => {
    expect(clientAddress(undefined, '10.0.0.2', 2)).toBe('10.0.0.2');
    expect(clientAddress('192.0.2.44', '10.0.0.2', 3)).toBe('192.0.2.44');
  });

  it('writes addresses one way: mapped IPv4, brackets, ports, case', () => {
    expect(canonicalAddress('::ffff:192.0.2.1')).toBe('192.0.2.1');
    expect(canonicalAddress('[2001:DB8::1]:443')).toBe('2001:db8::1');
    expect(canonicalAddress('192.0.2.1:8080')).toBe('192.0.2.1');
    expect(canonicalAddress('2001:db8::1')).toBe('2001:db8::1');
    expect(canonicalAddress(' unknown ')).toBeNull();
    expect(canonicalAddress('')).toBeNull();
  });
});

describe('forwarding headers', () => {
  it('leave only the trusted address, drop a host claim and put the socket\'s own scheme when no proxy is trusted', () => {
    const h: Record<string, string | string[] | undefined> = {
      'x-forwarded-for': '203.0.113.66', 'x-real-ip': '203.0.113.66', 'x-forwarded-host': 'evil.example', 'x-forwarded-proto': 'https', host: 'gridproof.test',
    };
    normaliseForwarding(h, '::ffff:198.51.100.7', 0);
    expect(h).toEqual({ 'x-forwarded-for': '198.51.100.7', 'x-forwarded-proto': 'http', host: 'gridproof.test' });
    const tls: Record<string, string | string[] | undefined> = { 'x-forwarded-proto': 'http' };
    normaliseForwarding(tls, '198.51.100.7', 0, 'https');
    expect(tls['x-forwarded-proto']).toBe('https');
  });

  it('take the scheme a trusted proxy wrote, n hops from the right, or the socket\'s when it wrote none', () => {
    // the same "trust n hops" rule as the address: [...X-Forwarded-Proto, socket scheme]
    expect(clientScheme('https', 'http', 1)).toBe('https');
    expect(clientScheme(undefined, 'http', 1)).toBe('http');
    expect(clientScheme('https, http', 'http', 1)).toBe('http'); // the client's own claim is the leftmost entry
    expect(clientScheme('http, https', 'http', 2)).toBe('http');
    expect(clientScheme(['HTTPS'], 'http', 1)).toBe('https');
  });

  it('keep the proxy\'s host and scheme behind a trusted proxy', () => {
    const h: Record<string, string | string[] | undefined> = { 'x-forwarded-for': '203.0.113.66, 192.0.2.44', 'x-forwarded-host': 'beds.example', 'x-forwarded-proto': 'https' };
    normaliseForwarding(h, '10.0.0.2', 1);
    expect(h).toEqual({ 'x-forwarded-for': '192.0.2.44', 'x-forwarded-host': 'beds.example', 'x-forwarded-proto': 'https' });
  });

  it('remove the address when there is none to believe', () => {
    const h: Record<string, string | string[] | undefined> = { 'x-forwarded-for': 'unknown' };
    normaliseForwarding(h, undefined, 0);
    expect(h).toEqual({ 'x-forwarded-proto': 'http' });
  });
});

describe('TRUST_PROXY_HOPS', () => {
  it('is 0 unless set, and must be a whole number from 0 to 10', () => {
    expect(trustedHopsFrom(undefined)).toBe(0);
    expect(trustedHopsFrom('')).toBe(0);
    expect(trustedHopsFrom('2')).toBe(2);
    for (const bad of ['-1', '1.5', 'one', '11']) expect(() => trustedHopsFrom(bad)).toThrow(/TRUST_PROXY_HOPS/);
  });
});
