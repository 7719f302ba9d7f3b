/** A tiny cookie-keeping HTTP client for the e2e tests (one per simulated person). */
import { inject } from 'vitest';

export class Client {
  cookie = '';
  constructor(readonly baseUrl: string = inject('baseUrl')) {}

  async req(method: string, path: string, body?: unknown, headers: Record<string, string> = {}) {
    const res = await fetch(this.baseUrl + path, {
      method,
      redirect: 'manual',
      headers: { ...(body === undefined ? {} : { 'content-type': 'application/json' }), ...(this.cookie ? { cookie: this.cookie } : {}), ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const set = res.headers.get('set-cookie');
    if (set) this.cookie = set.split(';')[0] ?? '';
    const text = await res.text();
    let json: unknown = null;
    try {
      json = text ? JSON.parse(text) : null;
    } catch {
      json = null;
    }
    return { status: res.status, json, text, headers: res.headers };
  }
}

let n = 0;
export const e2eEmail = (tag: string) => `${tag}.${Date.now().toString(36)}.${n++}@e2e.example`;
export const E2E_PASSWORD = 'sawdust and square edges';
