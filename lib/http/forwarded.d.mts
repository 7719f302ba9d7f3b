/** Types of lib/http/forwarded.mjs (see its header). */
export declare function canonicalAddress(raw: string | undefined | null): string | null;
export declare function clientAddress(forwardedFor: string | string[] | undefined, peer: string | undefined, trustedHops: number): string | null;
export declare function clientScheme(forwardedProto: string | string[] | undefined, socketScheme: 'http' | 'https', trustedHops: number): 'http' | 'https';
export declare function normaliseForwarding(headers: Record<string, string | string[] | undefined>, peer: string | undefined, trustedHops: number, socketScheme?: 'http' | 'https'): void;
export declare function trustedHopsFrom(raw: string | undefined): number;
