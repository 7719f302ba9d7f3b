/**
 * The route table of the app, read from the files themselves: every app/api/**\/route.ts and the HTTP
 * methods it exports, with its path (`/api/checks/[id]/photo`) and the names of its dynamic segments.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { pathToFileURL } from 'node:url';

export const ROUTE_METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
export type RouteMethod = (typeof ROUTE_METHODS)[number];
export type RouteHandler = (req: Request, ctx?: { params: Promise<Record<string, string | string[] | undefined>> }) => Promise<Response>;

export interface RouteEntry {
  /** `POST /api/beds/[id]/checks` */
  key: string;
  file: string;
  method: RouteMethod;
  path: string;
  /** Names of the path's dynamic segments, in order (`['id', 'commentId']`). */
  params: string[];
}

/** Every exported handler of every route file under `app/api` of `root`, sorted by path and method. */
export function routeTable(root = process.cwd(), methods: readonly RouteMethod[] = ROUTE_METHODS): RouteEntry[] {
  const app = join(root, 'app');
  const files = readdirSync(join(app, 'api'), { recursive: true, encoding: 'utf8' })
    .filter((f) => f === 'route.ts' || f.endsWith('/route.ts') || f.endsWith('\\route.ts'))
    .map((f) => join(app, 'api', f));
  const out: RouteEntry[] = [];
  for (const file of files) {
    const src = readFileSync(file, 'utf8');
    const path = '/' + relative(app, file).split('\\').join('/').replace(/\/route\.ts$/, '');
    const params = [...path.matchAll(/\[(\w+)\]/g)].map((m) => m[1]!);
    for (const method of methods) {
      if (new RegExp(`export\\s+(const|async\\s+function|function)\\s+${method}\\b`).test(src)) out.push({ key: `${method} ${path}`, file, method, path, params });
    }
  }
  return out.sort((a, b) => a.key.localeCompare(b.key));
}

/** The handler an entry names. */
export async function loadHandler(entry: RouteEntry): Promise<RouteHandler> {
  const mod = (await import(/* @vite-ignore */ pathToFileURL(entry.file).href)) as Record<string, RouteHandler>;
  const handler = mod[entry.method];
  if (!handler) throw new Error(`${entry.key}: no ${entry.method} export`);
  return handler;
}
