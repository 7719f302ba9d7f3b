/** Types of lib/http/forwarded.mjs (see its header). */
export declare function canonicalAddress(raw: string | undefined | null): string | null;
export declare function clientAddress(forwardedFor: string | string[] | undefined, peer: string | undefined, trustedHops: number): string | null;
export declare function normaliseForwarding(headers: Record<string, string | string[] | undefined>, peer: string | undefined, trustedHops: number): void;
export declare function trustedHopsFrom(raw: string | undefined): number;
