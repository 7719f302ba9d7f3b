/** Types of lib/security/headers.mjs (see its header). */
export declare function contentSecurityPolicy(opts: { production: boolean }): string;
export declare function securityHeaders(opts: { production: boolean }): { key: string; value: string }[];
export declare function httpsOnlyHeaders(opts: { production: boolean }): { key: string; value: string }[];
